/**
 * The weeks a review view covers, and their bounds as local days for SQL. A range asked for with
 * only one end gets the default length (8 weeks) from that end; none at all: the last 8 weeks
 * ending with the current week in the team's zone (shared/weeks.ts, date-fns).
 */
import type { ReviewRangeQuery } from '../../../shared/schemas/review';
import { addIsoWeeks, defaultWeekRange, DEFAULT_REVIEW_WEEKS, weeksBetween, weekStartDay } from '../../../shared/weeks';

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
  else if (!from) from = addIsoWeeks(to!, -(DEFAULT_REVIEW_WEEKS - 1));
  else if (!to) to = addIsoWeeks(from, DEFAULT_REVIEW_WEEKS - 1);
  return weekRange(from!, to!);
}

export const weekRange = (from: string, to: string): WeekRange => ({
  from,
  to,
  weeks: weeksBetween(from, to),
  startDay: weekStartDay(from),
  endDay: weekStartDay(addIsoWeeks(to, 1)),
});
