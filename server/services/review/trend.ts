/**
 * The trend sign of a review row: is a cue's "needs work" share going down?
 *
 * Our own rule, kept plain so a coach can check it against the counts on screen:
 * - Compare the LAST 4 weeks of the range shown with the 4 weeks BEFORE them (so a range shorter
 *   than 8 weeks has 'not enough data').
 * - In each window take the share of "needs work" among all marks of the cue
 *   (needsWork / (needsWork + good)).
 * - Either window with fewer than 3 marks: 'not enough data' (one or two taps say nothing).
 * - The recent share at least 15 percentage points below the earlier one: 'fewer' (the fault is
 *   marked less often); at least 15 points above: 'more'; anything between: 'steady'.
 * A share, not a raw count, so a week with more ice time does not look like a worse week.
 */
import type { ReviewTrend } from '../../../shared/schemas/review';

export const TREND_WINDOW_WEEKS = 4;
export const TREND_MIN_MARKS = 3;
export const TREND_THRESHOLD = 0.15;

export interface WeekCount {
  week: string;
  needsWork: number;
  good: number;
}

export function trendOf(weeks: readonly string[], counts: readonly WeekCount[]): ReviewTrend {
  if (weeks.length < TREND_WINDOW_WEEKS * 2) return 'not enough data';
  const recent = new Set(weeks.slice(-TREND_WINDOW_WEEKS));
  const earlier = new Set(weeks.slice(-TREND_WINDOW_WEEKS * 2, -TREND_WINDOW_WEEKS));
  const sum = (window: Set<string>) =>
    counts.reduce(
      (acc, c) => (window.has(c.week) ? { needsWork: acc.needsWork + c.needsWork, marks: acc.marks + c.needsWork + c.good } : acc),
      { needsWork: 0, marks: 0 },
    );
  const now = sum(recent);
  const before = sum(earlier);
  if (now.marks < TREND_MIN_MARKS || before.marks < TREND_MIN_MARKS) return 'not enough data';
  const change = now.needsWork / now.marks - before.needsWork / before.marks;
  // A small epsilon so exactly 15 points counts as a change despite floating point.
  if (change <= -TREND_THRESHOLD + 1e-9) return 'fewer';
  if (change >= TREND_THRESHOLD - 1e-9) return 'more';
  return 'steady';
}
