/**
 * Cue follow-up (issue #10 §3): after a week in which a cue was stressed for a skater, did the
 * fault fade over the next four ISO weeks? The rule lives here, once, pure, so the server's reply
 * and the words on screen cannot drift apart (tests/unit/follow-up.test.ts).
 *
 * The rule, in a coach's words (FOLLOW_UP_RULE says the same on screen):
 * - A cue is STRESSED in a week when it got at least N "needs work" marks for the skater that
 *   week (N set by the coach, default 3, 1 to 20).
 * - Its FOLLOW-UP is the next four ISO weeks. Only weeks that have begun count (the current week
 *   with what it has so far); later ones are "to come".
 * - Over the counted follow-up weeks, add up the cue's marks. Fewer than 3 marks: "not enough data"
 *   (one or two taps say nothing, the same floor as the trend rule in server/services/review/trend.ts).
 * - "fading": at least half of those marks are "good" AND either the good share is at least 15
 *   percentage points above the stressed week's own good share (the trend rule's 15 points) or no
 *   "needs work" mark follows at all (a week already mostly good cannot rise 15 points, yet a
 *   clean follow-up is the fault fading).
 * - otherwise "persisting": fewer than half good, or half or more good but neither up 15 points
 *   nor clean.
 * The verdict rests on the marks; the lap times are shown beside it as figures, never folded in.
 *
 * Related lap times: the skater's most-timed distance (track and distance with the most finished,
 * fully timed runs in the weeks asked for and the four follow-up weeks after the last of them, the
 * same runs the follow-up weeks' laps come from), and per week the mean lap time of those runs, the
 * first section (the opener, or the standing-start first lap) left out, with the number of runs.
 * Laps come from shared/timing.ts (runResult, the same rule as the CSV, the weekly sheet and the
 * lap chart); nothing here redoes that arithmetic.
 */
import { runResult, type Track } from './timing';

export const DEFAULT_STRESS_THRESHOLD = 3;
export const MIN_STRESS_THRESHOLD = 1;
export const MAX_STRESS_THRESHOLD = 20;
/** Weeks looked at after a stressed week. */
export const FOLLOW_UP_WEEKS = 4;
/** Fewer marks than this over the follow-up: not enough data (the trend rule's floor). */
export const FOLLOW_UP_MIN_MARKS = 3;
/** The good share must rise by at least this much (the trend rule's 15 points). */
export const FOLLOW_UP_CHANGE = 0.15;
/** ... and reach at least this share. */
export const FOLLOW_UP_GOOD_SHARE = 0.5;

export type FollowUpVerdict = 'fading' | 'persisting' | 'not enough data';

export interface MarkCount {
  needsWork: number;
  good: number;
}

export interface FollowUpWeekMarks extends MarkCount {
  week: string;
  /** False for a week that has not begun yet: shown as "to come", never counted. */
  counted: boolean;
}

export interface VerdictFigures {
  verdict: FollowUpVerdict;
  /** The stressed week: good marks, all marks. */
  stressedGood: number;
  stressedMarks: number;
  /** The counted follow-up weeks added up. */
  afterGood: number;
  afterMarks: number;
  /** Follow-up weeks that have begun (0..4). */
  weeksCounted: number;
  /** Good share after minus good share in the stressed week, in percentage points (1 decimal); null without marks after. */
  changePoints: number | null;
}

/** True when the week's "needs work" count reaches the threshold. */
export const isStressed = (count: MarkCount, threshold: number): boolean => count.needsWork >= threshold;

/** "2/5" style share as a fraction, or null with no marks. */
export const goodShare = (good: number, marks: number): number | null => (marks > 0 ? good / marks : null);

const round1 = (x: number) => Math.round(x * 10) / 10;

/** The verdict for one stressed (cue, week), with the counts it rests on. */
export function followUpVerdict(stressed: MarkCount, weeks: readonly FollowUpWeekMarks[]): VerdictFigures {
  const counted = weeks.filter((w) => w.counted);
  const afterGood = counted.reduce((sum, w) => sum + w.good, 0);
  const afterMarks = counted.reduce((sum, w) => sum + w.good + w.needsWork, 0);
  const stressedMarks = stressed.good + stressed.needsWork;
  const before = goodShare(stressed.good, stressedMarks) ?? 0;
  const after = goodShare(afterGood, afterMarks);
  const figures = {
    stressedGood: stressed.good,
    stressedMarks,
    afterGood,
    afterMarks,
    weeksCounted: counted.length,
    changePoints: after === null ? null : round1((after - before) * 100),
  };
  if (after === null || afterMarks < FOLLOW_UP_MIN_MARKS) return { verdict: 'not enough data', ...figures };
  // A small epsilon so exactly 15 points and exactly half count despite floating point.
  const afterNeedsWork = afterMarks - afterGood;
  const fading = after >= FOLLOW_UP_GOOD_SHARE - 1e-9 && (after - before >= FOLLOW_UP_CHANGE - 1e-9 || afterNeedsWork === 0);
  return { verdict: fading ? 'fading' : 'persisting', ...figures };
}

// ---------------------------------------------------------------------------------------------
// Related lap times

export interface TimedRun {
  /** The ISO week of the run's rink day. */
  week: string;
  distanceM: number;
  track: Track;
  /** Crossing times (ms since the gun) in order. */
  crossingsMs: readonly number[];
  /** The run's status; the server reads finished runs only, so it defaults to finished. */
  status?: string;
}

export interface LapBasis {
  distanceM: number;
  track: Track;
  /** Fully timed runs at this distance in the weeks asked for plus the four follow-up weeks after them. */
  runs: number;
}

export interface WeekLaps {
  runs: number;
  laps: number;
  /** Mean lap (first section left out), whole ms; null without laps. */
  meanLapMs: number | null;
}

/**
 * The laps of a complete run (shared/timing.ts runResult: finished, exactly one crossing per
 * split, strictly increasing) after its first section, or null when the run is not complete:
 * free laps (no distance), a crossing missing or extra, crossings not increasing.
 */
export function lapsAfterOpener(run: Pick<TimedRun, 'distanceM' | 'track' | 'crossingsMs' | 'status'>): number[] | null {
  const result = runResult(run.distanceM, run.track, run.status ?? 'finished', run.crossingsMs);
  return result.complete ? result.laps.slice(1) : null;
}

/**
 * The most-timed distance among the complete runs given that have at least one lap after the first
 * section; a tie goes to the shorter distance, then long track. Null when there is none. The server
 * passes the runs of the weeks asked for plus the FOLLOW_UP_WEEKS after the last of them (the same
 * runs the follow-up weeks' laps come from), so that is what `runs` in the reply counts.
 */
export function lapBasisOf(runs: readonly TimedRun[]): LapBasis | null {
  const tally = new Map<string, LapBasis>();
  for (const run of runs) {
    const laps = lapsAfterOpener(run);
    if (!laps || laps.length === 0) continue;
    const key = `${run.track}:${run.distanceM}`;
    const entry = tally.get(key) ?? { distanceM: run.distanceM, track: run.track, runs: 0 };
    entry.runs += 1;
    tally.set(key, entry);
  }
  const sorted = [...tally.values()].sort(
    (a, b) => b.runs - a.runs || a.distanceM - b.distanceM || (a.track === b.track ? 0 : a.track === 'long' ? -1 : 1),
  );
  return sorted[0] ?? null;
}

/** The lap figures of the basis distance over the given weeks (pooled laps of all its runs there). */
export function lapsInWeeks(runs: readonly TimedRun[], basis: LapBasis | null, weeks: readonly string[]): WeekLaps {
  if (!basis) return { runs: 0, laps: 0, meanLapMs: null };
  const wanted = new Set(weeks);
  let count = 0;
  let laps = 0;
  let total = 0;
  for (const run of runs) {
    if (!wanted.has(run.week) || run.distanceM !== basis.distanceM || run.track !== basis.track) continue;
    const after = lapsAfterOpener(run);
    if (!after || after.length === 0) continue;
    count += 1;
    laps += after.length;
    total += after.reduce((a, b) => a + b, 0);
  }
  return { runs: count, laps, meanLapMs: laps > 0 ? Math.round(total / laps) : null };
}

/** Follow-up mean lap minus the stressed week's (negative: faster), or null when either is missing. */
export const lapChangeMs = (stressed: WeekLaps, after: WeekLaps): number | null =>
  stressed.meanLapMs === null || after.meanLapMs === null ? null : after.meanLapMs - stressed.meanLapMs;

/** The rule in a coach's words, shown under the follow-up list. */
export const FOLLOW_UP_RULE =
  `A cue is stressed in a week when it got at least N \u201Cneeds work\u201D marks that week. ` +
  `Over the next ${FOLLOW_UP_WEEKS} weeks (only weeks that have begun), its marks are added up: ` +
  `fewer than ${FOLLOW_UP_MIN_MARKS} marks \u2013 not enough data; at least half of them good and either the good share ` +
  `${Math.round(FOLLOW_UP_CHANGE * 100)} points or more above the stressed week\u2019s or no \u201Cneeds work\u201D mark at all ` +
  `\u2013 fault fading; otherwise \u2013 fault persisting.`;

export const LAP_RULE =
  'Lap times: the skater\u2019s most-timed distance (fully timed, finished runs), the mean lap per week with the first ' +
  'section (the opener) left out, and how many runs it comes from. Shown beside the verdict, not part of it.';
