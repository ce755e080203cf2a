/**
 * The weeks a review view covers, and their bounds as local days for SQL. A range asked for with
 * only one end gets the default length (8 weeks) from that end, kept within the weeks a label may
 * name (2000-W01 to 2100's last); none at all: the last 8 weeks
 * ending with the current week in the team's zone (shared/weeks.ts, date-fns).
 */
import { addDays, format, parseISO } from 'date-fns';
import type { ReviewRangeQuery } from '../../../shared/schemas/review';
import { addIsoWeeks, defaultWeekRange, DEFAULT_REVIEW_WEEKS, isIsoWeek, weeksBetween, weekStartDay } from '../../../shared/weeks';

export interface WeekRange {
  from: string;
  to: string;
  weeks: string[];
  /** The Monday of `from` (local day): the range starts at its midnight in the team's zone. */
  startDay: string;
  /** The Monday after `to` (local day): the range ends before its midnight. */
  endDay: string;
}

export function resolveRange(query: ReviewRangeQuery, timeZone: string, now = Date.now()): WeekRange {
  let { from, to } = query;
  if (!from && !to) ({ from, to } = defaultWeekRange(timeZone, now));
  else if (!from) from = weeksBefore(to!, DEFAULT_REVIEW_WEEKS - 1);
  else if (!to) to = weeksAfter(from, DEFAULT_REVIEW_WEEKS - 1);
  return weekRange(from!, to!);
}

/** The week `count` weeks after `week`, or the last week a label may name (2100's) when that is past it. */
export function weeksAfter(week: string, count: number): string {
  let n = count;
  while (n > 0 && !isIsoWeek(addIsoWeeks(week, n))) n -= 1;
  return addIsoWeeks(week, n);
}

/** The week `count` weeks before `week`, or the first week a label may name (2000-W01) when that is before it. */
export function weeksBefore(week: string, count: number): string {
  let n = count;
  while (n > 0 && !isIsoWeek(addIsoWeeks(week, -n))) n -= 1;
  return addIsoWeeks(week, -n);
}

/** The day after a week's Sunday (calendar arithmetic: no week label past 2100 is needed). */
const dayAfterWeek = (week: string) => format(addDays(parseISO(weekStartDay(week)), 7), 'yyyy-MM-dd');

export const weekRange = (from: string, to: string): WeekRange => ({
  from,
  to,
  weeks: weeksBetween(from, to),
  startDay: weekStartDay(from),
  endDay: dayAfterWeek(to),
});
