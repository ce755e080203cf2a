/**
 * What the lap-time section draws, worked out from the server's reply (shared/schemas/review-laps):
 * the names of a distance's sections, the points of one measure (the finish or one section) with
 * their best and target, the default pair of runs to compare and the side-by-side rows. No lap
 * arithmetic here: sections, finishes and bests come from the server (shared/timing.ts there);
 * times are written with shared/timing's formatRaceTime and formatGap.
 */
import { format, parseISO } from 'date-fns';
import { TZDate } from '@date-fns/tz';

import type { LapRun, LapTrend } from '../../../shared/schemas/review-laps';
import { formatGap, formatRaceTime } from '../../../shared/timing';

/** 'finish', or the 0-based section index (0 = the opener when the distance has one). */
export type Measure = 'finish' | number;

const metres = (m: number) => `${Number.isInteger(m) ? m : m.toFixed(2)} m`;

/** "Opener 300 m", "Lap 1", … for each section of the distance. */
export function sectionNames(trend: Pick<LapTrend, 'splitsAtM' | 'openerM'>): { short: string; long: string }[] {
  const hasOpener = trend.openerM > 0;
  return trend.splitsAtM.map((at, i) => {
    const length = at - (i === 0 ? 0 : trend.splitsAtM[i - 1]);
    if (hasOpener && i === 0) return { short: 'Opener', long: `Opener (${metres(length)})` };
    const n = hasOpener ? i : i + 1;
    return { short: `Lap ${n}`, long: `Lap ${n} (${metres(length)})` };
  });
}

export const measureName = (trend: LapTrend, measure: Measure) =>
  measure === 'finish' ? `Finish (${trend.distanceM} m)` : (sectionNames(trend)[measure]?.long ?? `Section ${measure + 1}`);

export const distanceName = (distanceM: number, track: 'long' | 'short') => `${distanceM} m \u00B7 ${track} track`;

/** "Tue 6 Oct 2026" for a local day. */
export const dayName = (day: string) => format(parseISO(day), 'EEE d MMM yyyy');
/** "Tue 6 Oct" for chips. */
export const shortDay = (day: string) => format(parseISO(day), 'EEE d MMM');
/** "11:00", the start's time of day in the team's zone. */
export const startTime = (run: Pick<LapRun, 'startedAt'>, timeZone: string) => format(new TZDate(new Date(run.startedAt).getTime(), timeZone), 'HH:mm');

/** Why a run has no finish time, in a coach's words; null for a complete run. */
export function runStateText(run: LapRun, splits: number): string | null {
  const laps = run.crossingsMs.length;
  const taps = `${laps} of ${splits} crossing${splits === 1 ? '' : 's'}`;
  switch (run.state) {
    case 'complete':
      return null;
    case 'partial':
      return `Finished with ${taps}: laps shown, no finish time`;
    case 'stopped':
      return `Stopped${run.stopReason ? ` (${run.stopReason})` : ''} after ${taps}: not a finish time`;
    case 'running':
      return `Never ended (${taps}): not a finish time`;
    case 'unordered':
      return 'Two crossings at the same instant: laps cannot be read, not counted';
  }
}

export interface ChartPoint {
  run: LapRun;
  ms: number;
  /** A complete run's figure (drawn filled and joined by the line); else a partial run's lap. */
  counted: boolean;
  best: boolean;
}

/** The points of one measure, oldest first: finishes of complete runs, or one section of every run that has it. */
export function pointsOf(trend: LapTrend, measure: Measure): ChartPoint[] {
  const bestRun = measure === 'finish' ? trend.bests.finish?.runId : trend.bests.laps[measure]?.runId;
  const points: ChartPoint[] = [];
  for (const run of trend.runs) {
    const ms = measure === 'finish' ? run.finishMs : measure < trend.splitsAtM.length ? run.lapsMs[measure] : undefined;
    if (ms === null || ms === undefined) continue;
    points.push({ run, ms, counted: run.state === 'complete', best: run.id === bestRun });
  }
  return points;
}

export const targetOf = (trend: LapTrend, measure: Measure): number | null =>
  !trend.target ? null : measure === 'finish' ? trend.target.targetMs : (trend.target.sectionsMs[measure] ?? null);

export const bestOf = (trend: LapTrend, measure: Measure) => (measure === 'finish' ? trend.bests.finish : (trend.bests.laps[measure] ?? null));

/** The two runs compared by default: the latest complete run and the complete run before it (else the latest runs). */
export function defaultPair(runs: readonly LapRun[]): [string | null, string | null] {
  const complete = runs.filter((r) => r.state === 'complete');
  const pool = complete.length >= 2 ? complete : runs;
  if (pool.length === 0) return [null, null];
  if (pool.length === 1) return [null, pool[0].id];
  return [pool[pool.length - 2].id, pool[pool.length - 1].id];
}

export interface CompareRow {
  key: string;
  name: string;
  a: number | null;
  b: number | null;
  /** B minus A (positive: B slower), null unless both have it. */
  diffMs: number | null;
  targetMs: number | null;
}

/** Lap by lap, then the finish: A, B and B − A. */
export function compareRows(trend: LapTrend, a: LapRun | null, b: LapRun | null): CompareRow[] {
  const names = sectionNames(trend);
  const rows: CompareRow[] = names.map((name, i) => {
    const av = a?.lapsMs[i] ?? null;
    const bv = b?.lapsMs[i] ?? null;
    return { key: String(i), name: name.long, a: av, b: bv, diffMs: av !== null && bv !== null ? bv - av : null, targetMs: trend.target?.sectionsMs[i] ?? null };
  });
  const af = a?.finishMs ?? null;
  const bf = b?.finishMs ?? null;
  rows.push({ key: 'finish', name: 'Finish', a: af, b: bf, diffMs: af !== null && bf !== null ? bf - af : null, targetMs: trend.target?.targetMs ?? null });
  return rows;
}

export const timeText = (ms: number | null) => (ms === null ? '\u2013' : formatRaceTime(ms));
export const gapText = (ms: number | null) => (ms === null ? '\u2013' : formatGap(ms));
/** A gap in words for screen readers: "0.42 slower", "0.12 faster", "same time". */
export function gapWords(ms: number | null): string {
  if (ms === null) return 'no difference: one of the two has no time';
  const text = formatGap(ms);
  if (text === '0.00') return 'same time to the hundredth';
  return `${text.slice(1)} ${ms > 0 ? 'slower' : 'faster'}`;
}

/** A run's one-line summary for a point's name and the text alternative. */
export function runSummary(trend: LapTrend, run: LapRun, measure: Measure, ms: number, timeZone: string): string {
  const state = runStateText(run, trend.splitsAtM.length);
  const what = measure === 'finish' ? 'finish' : sectionNames(trend)[measure]?.short.toLowerCase();
  return `${dayName(run.day)} ${startTime(run, timeZone)}, ${what} ${formatRaceTime(ms)}${state ? `; ${state}` : ''}`;
}
