/**
 * The clock screen's own arithmetic, on top of shared/timing.ts: what each lane shows after its
 * crossings (last lap, last split, km/h, gap to the schedule, laps to go, predicted finish), the
 * schedule a run is measured against, the double-tap rule, the start offset for a gun heard from
 * the far side, and turning a pointer event's timestamp into a stored crossing. Pure functions:
 * no React, no store, so the client tests check the strings the coach reads.
 *
 * Times shown go through formatRaceTime / formatGap (hundredths truncated, never rounded); km/h is
 * shown with two decimals (rounded: a speed is not a race time).
 */
import {
  LONG_TRACK_LAP_M,
  SHORT_TRACK_LAP_M,
  distanceLayout,
  formatGap,
  formatRaceTime,
  gunSoundDelayMs,
  lapsFromCrossings,
  paceSchedule,
  predictFinishMs,
  speakSplit,
  speedKmh,
  type DistanceLayout,
  type PaceEntry,
  type Track,
} from '../../shared/timing';

export type ClockLane = 'inner' | 'outer' | 'group';
export type RunStatus = 'running' | 'finished' | 'stopped';

/** One stored crossing as the screen needs it (the store's row has these fields and more). */
export interface ClockCrossing {
  id: string;
  atMs: number;
  handTimed: boolean;
}

/** The fields of a stored run the screen reads (the store's RunWithCrossings has them all). */
export interface ClockRun {
  id: string;
  heatId: string;
  skaterId: string;
  day: string;
  distanceM: number;
  track: Track;
  lane: ClockLane;
  startedAt: string;
  startOffsetMs: number;
  targetMs: number | null;
  status: RunStatus;
  stopReason: string;
  note: string;
  crossings: readonly ClockCrossing[];
}

/** A target as the screen needs it (the store's Target row has these fields and more). */
export interface ClockTarget {
  skaterId: string;
  distanceM: number;
  track: Track;
  targetMs: number;
  plan: 'even' | 'shares';
  openerMs: number | null;
  sharesPct: readonly number[] | null;
  note?: string;
}

/** 0 m is "free laps": training laps with no set distance. */
export const FREE_LAPS = 0;

/** The distances offered as chips (short track: whole half laps of 111.12 m, e.g. 500 m = 4.5 laps). */
export const DISTANCES: Record<Track, readonly number[]> = {
  long: [500, 1000, 1500, 3000, 5000, 10000, FREE_LAPS],
  short: [222, 333, 500, 777, 1000, 1500, 3000, FREE_LAPS],
};

/** Up to this many skaters are timed at once in a group. */
export const GROUP_MAX = 6;

/**
 * A second tap on the same lane this soon after the last one is a glove bouncing, not a lap: the
 * fastest lap anyone skates (a short-track lap, about 8 s; a long-track lap, 25 s and more) is far
 * longer. Two seconds is our own choice, well inside that, and taps on DIFFERENT lanes are never
 * compared (a pair crossing 0.3 s apart both count). A lane's first tap is measured from the start.
 */
export const DOUBLE_TAP_MS = 2000;

/** Rink air for the gun offset: 5 °C (a cold hall) — the speed of sound there is about 334 m/s. */
export const GUN_AIR_C = 5;

/** The largest start offset a run stores. */
export const MAX_OFFSET_MS = 5000;

export const lapLengthM = (track: Track) => (track === 'long' ? LONG_TRACK_LAP_M : SHORT_TRACK_LAP_M);

export const distanceLabel = (distanceM: number) => (distanceM === FREE_LAPS ? 'Free laps' : `${distanceM} m`);
export const trackLabel = (track: Track) => (track === 'long' ? 'Long track' : 'Short track');
export const laneWord = (lane: ClockLane) => (lane === 'inner' ? 'Inner' : lane === 'outer' ? 'Outer' : 'Group');

/**
 * The layout a run is timed against. Free laps: every crossing is one lap of the track (400 m, or
 * 111.12 m on short track), as many as are skated, so `splitsAtM` grows with the crossings.
 */
export function layoutFor(distanceM: number, track: Track, crossings = 0): DistanceLayout & { free: boolean } {
  if (distanceM === FREE_LAPS) {
    const lap = lapLengthM(track);
    const n = Math.max(crossings, 1);
    return { free: true, openerM: 0, laps: n, splitsAtM: Array.from({ length: n }, (_, i) => Math.round((i + 1) * lap * 100) / 100) };
  }
  return { free: false, ...distanceLayout(distanceM, track) };
}

/** The plan words for a target: "even pace", "even after a 26.80 opener", "section shares". */
export function planWords(target: Pick<ClockTarget, 'plan' | 'openerMs'>): string {
  if (target.plan === 'shares') return 'section shares';
  return target.openerMs ? `even after a ${formatRaceTime(target.openerMs)} opener` : 'even pace';
}

/** The target for a skater on this distance and track, if one is set. */
export function targetFor(
  targets: readonly ClockTarget[] | undefined,
  skaterId: string,
  distanceM: number,
  track: Track,
): ClockTarget | undefined {
  if (distanceM === FREE_LAPS) return undefined;
  return targets?.find((t) => t.skaterId === skaterId && t.distanceM === distanceM && t.track === track);
}

/** The schedule for a target, or undefined when the plan does not fit (it is then shown as even pace). */
export function scheduleForTarget(target: ClockTarget): PaceEntry[] | undefined {
  try {
    if (target.plan === 'shares' && target.sharesPct) {
      return paceSchedule(target.distanceM, target.targetMs, { track: target.track, sharesPct: target.sharesPct });
    }
    return paceSchedule(target.distanceM, target.targetMs, {
      track: target.track,
      openerMs: target.openerMs ?? undefined,
    });
  } catch {
    return undefined;
  }
}

/**
 * The schedule a run is measured against. The run keeps a snapshot of the target time taken at the
 * start; the plan comes from the skater's target while it still has that time, otherwise the
 * snapshot is paced evenly (a target changed later does not rewrite an old run's gaps).
 */
export function scheduleForRun(
  run: Pick<ClockRun, 'distanceM' | 'track' | 'targetMs' | 'skaterId'>,
  targets?: readonly ClockTarget[],
): PaceEntry[] | undefined {
  if (run.distanceM === FREE_LAPS || !run.targetMs) return undefined;
  const target = targetFor(targets, run.skaterId, run.distanceM, run.track);
  if (target && target.targetMs === run.targetMs) {
    const planned = scheduleForTarget(target);
    if (planned) return planned;
  }
  try {
    return paceSchedule(run.distanceM, run.targetMs, { track: run.track });
  } catch {
    return undefined;
  }
}

/** km/h with two decimals. */
export const kmhText = (kmh: number) => kmh.toFixed(2);

export type GapSide = 'behind' | 'ahead' | 'level';

export interface GapView {
  ms: number;
  /** "+0.30", "−0.12", "0.00" (formatGap: truncated toward zero, true minus sign). */
  text: string;
  side: GapSide;
  /** The word beside the figure, so the side is never told by colour alone. */
  word: string;
}

export function gapView(ms: number): GapView {
  const text = formatGap(ms);
  const side: GapSide = text === '0.00' ? 'level' : ms > 0 ? 'behind' : 'ahead';
  return { ms, text, side, word: side === 'behind' ? 'behind' : side === 'ahead' ? 'ahead' : 'on schedule' };
}

/** The name of a section by its 0-based crossing index: "Opener", "Lap 3", "Finish". */
export function sectionName(index: number, layout: Pick<DistanceLayout, 'openerM' | 'splitsAtM'> & { free?: boolean }): string {
  if (!layout.free && index === layout.splitsAtM.length - 1) return 'Finish';
  if (layout.openerM > 0) return index === 0 ? 'Opener' : `Lap ${index}`;
  return `Lap ${index + 1}`;
}

export interface LaneReadout {
  crossings: number;
  /** Name of the last section ("Opener", "Lap 2", "Finish"), null before the first crossing. */
  lastName: string | null;
  lastLap: string | null;
  lastSplit: string | null;
  /** Metres at the last split ("700 m"). */
  lastAt: string | null;
  kmh: string | null;
  gap: GapView | null;
  /** "3 laps to go", "Last lap", "Finished", "Opener + 3 laps"; free laps: "7 laps". */
  toGo: string;
  predicted: string | null;
  finished: boolean;
}

function toGoText(layout: DistanceLayout & { free: boolean }, done: number): string {
  if (layout.free) return done === 1 ? '1 lap' : `${done} laps`;
  const left = layout.splitsAtM.length - done;
  if (left <= 0) return 'Finished';
  if (done === 0 && layout.openerM > 0) {
    const laps = left - 1;
    return `Opener + ${laps} ${laps === 1 ? 'lap' : 'laps'}`;
  }
  if (left === 1) return 'Last lap';
  return `${left} laps to go`;
}

/**
 * What a lane shows after its crossings (ms since the gun, increasing). With a schedule the gap
 * and the predicted finish follow it; without one the prediction carries the last lap's speed.
 */
export function laneReadout(
  run: Pick<ClockRun, 'distanceM' | 'track'>,
  crossingsMs: readonly number[],
  schedule?: readonly PaceEntry[],
): LaneReadout {
  const n = crossingsMs.length;
  const layout = layoutFor(run.distanceM, run.track, n);
  const over = !layout.free && n > layout.splitsAtM.length;
  const counted = over ? crossingsMs.slice(0, layout.splitsAtM.length) : crossingsMs;
  const k = counted.length;
  if (k === 0) {
    return { crossings: 0, lastName: null, lastLap: null, lastSplit: null, lastAt: null, kmh: null, gap: null, toGo: toGoText(layout, 0), predicted: null, finished: false };
  }
  const sections = lapsFromCrossings(counted);
  const i = k - 1;
  const sectionM = layout.splitsAtM[i] - (i === 0 ? 0 : layout.splitsAtM[i - 1]);
  const plan = !layout.free && schedule && schedule.length === layout.splitsAtM.length ? schedule : undefined;
  const predicted = layout.free ? null : predictFinishMs(layout.splitsAtM, counted, plan);
  return {
    crossings: k,
    lastName: sectionName(i, layout),
    lastLap: formatRaceTime(sections[i]),
    lastSplit: formatRaceTime(counted[i]),
    lastAt: `${Math.round(layout.splitsAtM[i])} m`,
    kmh: kmhText(speedKmh(sectionM, sections[i])),
    gap: plan ? gapView(counted[i] - plan[i].cumulativeMs) : null,
    toGo: toGoText(layout, k),
    predicted: predicted === null ? null : formatRaceTime(predicted),
    finished: !layout.free && k >= layout.splitsAtM.length,
  };
}

/** The finished run's table: one row per crossing, with the crossing's id (to edit it). */
export interface TableRow {
  crossingId: string;
  index: number;
  name: string;
  atM: string;
  lap: string;
  split: string;
  kmh: string;
  gap: GapView | null;
  handTimed: boolean;
}

export function runTable(run: Pick<ClockRun, 'distanceM' | 'track' | 'crossings'>, schedule?: readonly PaceEntry[]): TableRow[] {
  const crossings = [...run.crossings].sort((a, b) => a.atMs - b.atMs);
  const layout = layoutFor(run.distanceM, run.track, crossings.length);
  const plan = !layout.free && schedule && schedule.length === layout.splitsAtM.length ? schedule : undefined;
  const rows: TableRow[] = [];
  crossings.forEach((c, i) => {
    const before = i === 0 ? 0 : crossings[i - 1].atMs;
    const lapMs = c.atMs - before;
    const known = i < layout.splitsAtM.length;
    const sectionM = known ? layout.splitsAtM[i] - (i === 0 ? 0 : layout.splitsAtM[i - 1]) : 0;
    rows.push({
      crossingId: c.id,
      index: i,
      name: known ? sectionName(i, layout) : `Extra ${i + 1 - layout.splitsAtM.length}`,
      atM: known ? `${Math.round(layout.splitsAtM[i])} m` : '—',
      lap: lapMs > 0 ? formatRaceTime(lapMs) : '—',
      split: formatRaceTime(c.atMs),
      kmh: known && lapMs > 0 ? kmhText(speedKmh(sectionM, lapMs)) : '—',
      gap: plan && known ? gapView(c.atMs - plan[i].cumulativeMs) : null,
      handTimed: c.handTimed,
    });
  });
  return rows;
}

/** A section's name in a run's table, with " (hand)" when its crossing was hand-timed. */
export const rowLabel = (row: Pick<TableRow, 'name' | 'handTimed'>) => `${row.name}${row.handTimed ? ' (hand)' : ''}`;

/**
 * The line under a run's table saying what its marks mean: the gap's signs when the run has a
 * schedule (`whose`: "the" schedule on the coach's clock, "your" on the skater's page), and
 * "(hand)" when a row carries it; null when there is neither.
 */
export function tableLegend(rows: readonly Pick<TableRow, 'handTimed'>[], hasSchedule: boolean, whose: 'the' | 'your'): string | null {
  const hand = rows.some((r) => r.handTimed) ? '(hand): hand-timed.' : '';
  if (hasSchedule) return `Gap to ${whose} schedule: + behind, \u2212 ahead.${hand ? ` ${hand}` : ''}`;
  return hand || null;
}

/** The sentence read aloud at a crossing ("Lap three, twenty-nine eight, plus three tenths"). */
export function splitSentence(
  run: Pick<ClockRun, 'distanceM' | 'track'>,
  crossingsMs: readonly number[],
  schedule?: readonly PaceEntry[],
  who?: string,
): string {
  const layout = layoutFor(run.distanceM, run.track, crossingsMs.length);
  const plan = !layout.free && schedule && schedule.length === layout.splitsAtM.length ? schedule : undefined;
  const sentence = speakSplit(crossingsMs, { layout: layout.free ? undefined : layout, schedule: plan });
  return who ? `${who}, ${sentence.charAt(0).toLowerCase()}${sentence.slice(1)}` : sentence;
}

/**
 * The stored time of a crossing: ms since the start signal, from the pointer event's own timestamp
 * (the same clock as performance.now()), plus the start offset (the clock started late by it).
 */
export const crossingAtMs = (eventTs: number, startPerfTs: number, offsetMs: number) =>
  Math.round(eventTs - startPerfTs) + offsetMs;

/** Whether a tap this soon after the lane's last accepted tap (or the start) is a double tap. */
export const isDoubleTap = (lastTs: number | undefined, ts: number, windowMs = DOUBLE_TAP_MS) =>
  lastTs !== undefined && ts - lastTs < windowMs;

/** The start offset for a gun heard from this far away (rounded to whole ms, capped). */
export const gunOffsetMs = (distanceM: number) => Math.min(MAX_OFFSET_MS, gunSoundDelayMs(distanceM, GUN_AIR_C));

/** Speed of sound used for the gun offset (m/s, whole): 331.3·√(1 + T/273.15). */
export const soundSpeedMs = () => Math.round(331.3 * Math.sqrt(1 + GUN_AIR_C / 273.15));

/** Reads a typed offset in seconds ("0.35", "0,35") as whole ms; null when it is not one. */
export function parseOffset(text: string): number | null {
  const m = /^\s*(\d{1,2})(?:[.,](\d{1,3}))?\s*$/.exec(text);
  if (!m) return null;
  const ms = Number(m[1]) * 1000 + Number((m[2] ?? '').padEnd(3, '0'));
  return ms <= MAX_OFFSET_MS ? ms : null;
}

/** Elapsed ms for the live display (never negative). */
export const elapsedMs = (nowPerf: number, startPerfTs: number, offsetMs: number) =>
  Math.max(0, Math.floor(nowPerf - startPerfTs) + offsetMs);
