/**
 * Words the review repeats: week headings, days, a cell's spoken name, the trend signs. Calendar
 * work goes through shared/weeks.ts (date-fns); nothing here counts weeks by hand.
 */
import { format, parseISO } from 'date-fns';

import type { ReviewTrend } from '../../shared/schemas/review';
import { weekStartDay } from '../../shared/weeks';

/** "W14" over "30 Mar": the week number and its Monday, the two things a coach looks for. */
export function weekHeading(week: string): { number: string; monday: string } {
  return { number: `W${week.slice(-2)}`, monday: format(parseISO(weekStartDay(week)), 'd MMM') };
}

/** "Tue 31 Mar 2026" for a local day (YYYY-MM-DD). */
export const longDay = (day: string) => format(parseISO(day), 'EEE d MMM yyyy');

/** "Mon 30 Mar – Sun 5 Apr 2026": what a week covers. */
export function weekSpanText(week: string): string {
  const monday = parseISO(weekStartDay(week));
  const sunday = new Date(monday.getTime() + 6 * 86_400_000);
  return `${format(monday, 'EEE d MMM')} – ${format(sunday, 'EEE d MMM yyyy')}`;
}

/** A cell's accessible name: "Sit lower, week 2026-W14: 3 needs work, 1 good". */
export const cellName = (what: string, week: string, needsWork: number, good: number) =>
  needsWork + good === 0 ? `${what}, week ${week}: no marks` : `${what}, week ${week}: ${needsWork} needs work, ${good} good`;

export const trendSigns: Record<ReviewTrend, { glyph: string; word: string }> = {
  fewer: { glyph: '\u2193', word: 'fewer' },
  more: { glyph: '\u2191', word: 'more' },
  steady: { glyph: '\u2192', word: 'steady' },
  'not enough data': { glyph: '\u2013', word: 'not enough data' },
};

/** The server's rule (server/services/review/trend.ts), in a coach's words. */
export const TREND_RULE =
  'Trend compares the last 4 weeks shown with the 4 weeks before them: the share of \u201Cneeds work\u201D among a cue\u2019s marks. ' +
  '15 points or more lower: \u2193 fewer; 15 or more higher: \u2191 more; in between: \u2192 steady. ' +
  'Fewer than 3 marks in either 4 weeks, or fewer than 8 weeks shown: \u2013 not enough data.';
