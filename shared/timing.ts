/**
 * Lap and split arithmetic for the clock: where each split is taken on a distance, km/h, official
 * style times, pace schedules from a target, 500 m-equivalent points, and the live figures the
 * clock shows per lane (gap to the schedule, predicted finish, consistency, fade, the spoken
 * sentence). Pure functions only: no React, no I/O, nothing from the client or the server.
 *
 * Units: times are integer milliseconds (elapsed since the gun unless the name says otherwise);
 * distances are metres. Every function refuses bad input with a RangeError whose message names
 * the argument, the value and what is allowed, so a form can show it as it stands.
 *
 * Rules the arithmetic follows (ISU Special Regulations & Technical Rules, speed skating and short
 * track, as we know them; figures marked "from memory" were not checked against the current text):
 * - long track: a 400 m two-lane oval; each race lap has one inner and one outer bend (the skaters
 *   change lanes on the crossing straight), measured 0.5 m from the inner edge of the lane, so both
 *   lanes' race laps are 400 m; the finish line is fixed and the start line moves, so a distance
 *   that is not a whole number of laps starts with a part lap, the opener (1500 m = 300 m + 3 laps).
 * - short track: a 111.12 m oval (measured 0.5 m off the blocks, from memory) with one finish
 *   line; the start lines are placed so official distances are whole numbers of half laps.
 * - times: hundredths of a second, the rest cut off, never rounded (from memory).
 */

export type Track = 'long' | 'short';
export type Lane = 'inner' | 'outer';

export interface DistanceLayout {
  /** The part lap before the first crossing of the finish line; 0 when the race is whole laps. */
  openerM: number;
  /** Long track: full laps after the opener. Short track: laps in the race, opener included. */
  laps: number;
  /** Metres covered at every crossing of the finish line, increasing, ending at the distance. */
  splitsAtM: number[];
}

export interface PaceEntry {
  /** Metres covered at this crossing (the layout's splitsAtM entry). */
  atM: number;
  /** Planned time for the section ending here. */
  sectionMs: number;
  /** Planned elapsed time at this crossing. */
  cumulativeMs: number;
}

export interface PaceOptions {
  track?: Track;
  /** A fixed time for the first section (the opener, or the first lap when there is no part lap). */
  openerMs?: number;
  /** One share per section, in percent of the target, summing to 100 ± 0.01. */
  sharesPct?: readonly number[];
}

export const LONG_TRACK_LAP_M = 400;
export const SHORT_TRACK_LAP_M = 111.12;
export const MAX_DISTANCE_M = 100_000;
/** Standard lane width on a 400 m oval (from memory: 4 m for the competition lanes). */
export const STANDARD_LANE_WIDTH_M = 4;

/**
 * A published 1500 m pacing profile, offered as one example of section shares: elite Dutch U19
 * men's 1500 m sections as a percentage of final time (0–300 m 22.1 %, 300–700 m 24.6 %,
 * 700–1100 m 26.2 %, the last lap the remainder, 27.1 %). Wiersma R, Stoter IK, Visscher C,
 * Hettinga FJ, Elferink-Gemser MT (2017), "Development of 1500-m pacing behavior in junior speed
 * skaters: a longitudinal study", Int J Sports Physiol Perform 12(9):1224–1231. The 700–1100 m
 * figure is the one the abstract gives for the elite and sub-elite together.
 */
export const PUBLISHED_1500_PROFILE = {
  distanceM: 1500,
  track: 'long' as Track,
  sharesPct: [22.1, 24.6, 26.2, 27.1] as readonly number[],
  source:
    'Wiersma et al. 2017, Int J Sports Physiol Perform 12(9):1224–1231 (elite U19 men; last lap = remainder)',
};

// ---------------------------------------------------------------------------------------------
// Input checks

const show = (value: unknown): string => (typeof value === 'number' ? String(value) : JSON.stringify(value) ?? String(value));

function checkMs(name: string, value: unknown, { positive = false } = {}): number {
  if (typeof value !== 'number' || !Number.isSafeInteger(value) || value < 0 || (positive && value === 0)) {
    const what = positive ? 'a positive' : 'a non-negative';
    throw new RangeError(`${name} must be ${what} whole number of milliseconds (got ${show(value)})`);
  }
  return value;
}

function checkTrack(track: unknown): Track {
  if (track !== 'long' && track !== 'short') {
    throw new RangeError(`track must be 'long' or 'short' (got ${show(track)})`);
  }
  return track;
}

function checkWholeDistance(distanceM: unknown): number {
  if (typeof distanceM !== 'number' || !Number.isFinite(distanceM)) {
    throw new RangeError(`distanceM must be a finite number of metres (got ${show(distanceM)})`);
  }
  if (distanceM <= 0) throw new RangeError(`distanceM must be positive (got ${distanceM})`);
  if (distanceM > MAX_DISTANCE_M) {
    throw new RangeError(`distanceM must be at most ${MAX_DISTANCE_M} m (100 km) (got ${distanceM})`);
  }
  if (!Number.isInteger(distanceM)) throw new RangeError(`distanceM must be whole metres (got ${distanceM})`);
  return distanceM;
}

function checkMsList(name: string, values: unknown): number[] {
  if (!Array.isArray(values)) throw new RangeError(`${name} must be an array of milliseconds (got ${show(values)})`);
  return values.map((v, i) => checkMs(`${name}[${i}]`, v));
}

const round2 = (m: number): number => Math.round(m * 100) / 100;

// ---------------------------------------------------------------------------------------------
// Layouts

/** Section lengths of a distance, unrounded, plus how they are presented. */
interface Geometry {
  openerM: number;
  laps: number;
  /** Exact section lengths in metres (first = opener when there is one). */
  sections: number[];
}

/**
 * Short track: the nearest whole number of half laps, when the distance is one. Official
 * short-track distances (222, 333, 444, 500, 777, 1000, 1500, 3000, relay 5000: from memory) sit
 * within 0.11 % of a whole number of half laps of 111.12 m (500 m = 4.5 laps = 500.04 m measured;
 * 777 m = 7 laps = 777.84 m): the start lines are drawn so the race ends on the one finish line
 * after whole half laps. Anything within 0.2 % of a lap per lap counts as such a race.
 */
function shortTrackHalfLaps(distanceM: number): number | null {
  const halfLaps = Math.round(distanceM / (SHORT_TRACK_LAP_M / 2));
  if (halfLaps < 1) return null;
  const nominalLapM = distanceM / (halfLaps / 2);
  return Math.abs(nominalLapM - SHORT_TRACK_LAP_M) <= SHORT_TRACK_LAP_M * 0.002 ? halfLaps : null;
}

function geometry(distanceM: number, track: Track): Geometry {
  checkTrack(track);
  const d = checkWholeDistance(distanceM);
  if (track === 'long') {
    if (d % 100 !== 0) {
      throw new RangeError(`distanceM must be a positive multiple of 100 m on long track (got ${d})`);
    }
    const openerM = d % LONG_TRACK_LAP_M;
    const laps = Math.floor(d / LONG_TRACK_LAP_M);
    return { openerM, laps, sections: [...(openerM > 0 ? [openerM] : []), ...Array<number>(laps).fill(LONG_TRACK_LAP_M)] };
  }

  const halfLaps = shortTrackHalfLaps(d);
  if (halfLaps !== null) {
    // The official distance is nominal (4.5 laps measure 500.04 m): each lap counts as
    // distance ÷ laps so the splits end exactly on the distance and every full lap weighs the same.
    const lapM = (2 * d) / halfLaps;
    const hasOpener = halfLaps % 2 === 1;
    const fullLaps = Math.floor(halfLaps / 2);
    return {
      openerM: hasOpener ? round2(lapM / 2) : 0,
      laps: halfLaps / 2,
      sections: [...(hasOpener ? [lapM / 2] : []), ...Array<number>(fullLaps).fill(lapM)],
    };
  }
  if (d % 100 !== 0) {
    throw new RangeError(
      `distanceM must be a multiple of 100 m or a whole number of half laps of ${SHORT_TRACK_LAP_M} m on short track (e.g. 222, 333, 500, 777) (got ${d})`,
    );
  }
  // Any other multiple of 100 m (a training distance): real 111.12 m laps, the part lap first,
  // counted in whole centimetres so the laps add up to the distance exactly.
  const lapCm = Math.round(SHORT_TRACK_LAP_M * 100);
  const fullLaps = Math.floor((d * 100) / lapCm);
  const openerCm = d * 100 - fullLaps * lapCm;
  return {
    openerM: openerCm / 100,
    laps: round2((d * 100) / lapCm),
    sections: [...(openerCm > 0 ? [openerCm / 100] : []), ...Array<number>(fullLaps).fill(lapCm / 100)],
  };
}

/**
 * Where the splits fall on a distance. Long track: a positive multiple of 100 m up to 100 km;
 * opener = distance mod 400, laps = full laps after it (1500 → 300 + 3 laps, [300, 700, 1100,
 * 1500]). Short track: official distances are whole half laps (500 → 4.5 laps, opener 55.56,
 * [55.56, 166.67, 277.78, 388.89, 500]); other multiples of 100 m are real 111.12 m laps after
 * a part lap (400 → opener 66.64, 3.6 laps). Metres are rounded to the centimetre; the last split
 * is the distance itself.
 */
export function distanceLayout(distanceM: number, track: Track): DistanceLayout {
  const { openerM, laps, sections } = geometry(distanceM, track);
  let run = 0;
  const splitsAtM = sections.map((len, i) => {
    run += len;
    return i === sections.length - 1 ? distanceM : round2(run);
  });
  return { openerM, laps, splitsAtM };
}

/** The number of crossings still to come (what the lap board shows): sections not yet finished. */
export function lapsToGo(splitsAtM: readonly number[], crossingsDone: number): number {
  if (!Number.isSafeInteger(crossingsDone) || crossingsDone < 0) {
    throw new RangeError(`crossingsDone must be a non-negative whole number (got ${show(crossingsDone)})`);
  }
  return Math.max(0, splitsAtM.length - crossingsDone);
}

/**
 * The length of a training lap that stays in one lane (no crossing) on a standard 400 m oval.
 * A race lap is two straights, one inner bend and one outer bend, measured 0.5 m inside each
 * lane, and is 400 m. Each bend is a semicircle, and the measured line of the outer lane runs
 * exactly one lane width further out than the inner lane's, so an outer bend is π·w longer than
 * an inner bend (π·(r + w) − π·r), whatever the radius and the straights. Staying inner swaps the
 * outer bend for an inner one: 400 − π·w; staying outer: 400 + π·w (w = 4 m: 387.43 m, 412.57 m).
 * The crossing's diagonal (about 7 cm a lap) is left out: at 50 km/h it is 5 ms.
 */
export function oneLaneLapM(lane: Lane, laneWidthM: number = STANDARD_LANE_WIDTH_M): number {
  if (lane !== 'inner' && lane !== 'outer') throw new RangeError(`lane must be 'inner' or 'outer' (got ${show(lane)})`);
  if (typeof laneWidthM !== 'number' || !Number.isFinite(laneWidthM) || laneWidthM <= 0 || laneWidthM > 10) {
    throw new RangeError(`laneWidthM must be a number of metres above 0 and at most 10 (got ${show(laneWidthM)})`);
  }
  return LONG_TRACK_LAP_M + (lane === 'inner' ? -1 : 1) * Math.PI * laneWidthM;
}

// ---------------------------------------------------------------------------------------------
// Speeds, times, points

/** Average speed in km/h (unrounded): metres per millisecond × 3600. */
export function speedKmh(distanceM: number, ms: number): number {
  if (typeof distanceM !== 'number' || !Number.isFinite(distanceM) || distanceM <= 0) {
    throw new RangeError(`distanceM must be a positive finite number of metres (got ${show(distanceM)})`);
  }
  checkMs('ms', ms, { positive: true });
  return (distanceM * 3600) / ms;
}

/**
 * Official style: hundredths truncated, never rounded (105009 → "1:45.00"); seconds alone under
 * a minute ("33.61"); hours when needed ("1:02:03.45"). Non-integer or negative input is refused
 * rather than floored: a clock value that is not whole milliseconds is a bug upstream.
 */
export function formatRaceTime(ms: number): string {
  checkMs('ms', ms);
  const hundredths = Math.floor(ms / 10);
  const cs = String(hundredths % 100).padStart(2, '0');
  const totalS = Math.floor(hundredths / 100);
  const h = Math.floor(totalS / 3600);
  const m = Math.floor((totalS % 3600) / 60);
  const s = totalS % 60;
  if (h > 0) return `${h}:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')}.${cs}`;
  if (m > 0) return `${m}:${String(s).padStart(2, '0')}.${cs}`;
  return `${s}.${cs}`;
}

/**
 * Reads a typed time back: "33.61", "1:45.00", "1:02:03.45", "1:45", "33.6", "33.615" (1–3
 * decimals; a comma works as the decimal mark). Returns whole milliseconds.
 */
export function parseRaceTime(text: string): number {
  const bad = () =>
    new RangeError(`not a race time: ${show(text)} (write it like 33.61, 1:45.00 or 1:02:03.45)`);
  if (typeof text !== 'string') throw bad();
  const parts = text.trim().split(':');
  if (parts.length > 3) throw bad();
  const last = /^(\d+)(?:[.,](\d{1,3}))?$/.exec(parts[parts.length - 1]);
  if (!last) throw bad();
  const [, secText, fracText = ''] = last;
  const seconds = Number(secText);
  const fracMs = Number(fracText.padEnd(3, '0'));
  let ms = seconds * 1000 + fracMs;
  if (parts.length > 1) {
    if (secText.length !== 2 || seconds >= 60) throw bad();
    const minText = parts[parts.length - 2];
    if (!/^\d+$/.test(minText)) throw bad();
    const minutes = Number(minText);
    ms += minutes * 60_000;
    if (parts.length === 3) {
      if (minText.length !== 2 || minutes >= 60 || !/^\d+$/.test(parts[0])) throw bad();
      ms += Number(parts[0]) * 3_600_000;
    }
  }
  if (!Number.isSafeInteger(ms)) throw bad();
  return ms;
}

/**
 * The gap to a schedule: "+0.30" behind, "−0.12" ahead, truncated toward zero in hundredths;
 * "0.00" (no sign) when under a hundredth either way; minutes when needed ("+1:02.30"). The
 * minus is the true minus sign U+2212: it is as wide as the plus, so the digits do not jump when
 * the gap changes sides, screen readers say "minus", and the shipped fonts have the glyph.
 */
export function formatGap(ms: number): string {
  if (typeof ms !== 'number' || !Number.isSafeInteger(ms)) {
    throw new RangeError(`ms must be a whole number of milliseconds (got ${show(ms)})`);
  }
  const hundredths = Math.trunc(ms / 10);
  if (hundredths === 0) return '0.00';
  return `${hundredths > 0 ? '+' : '\u2212'}${formatRaceTime(Math.abs(hundredths) * 10)}`;
}

/**
 * 500 m-equivalent points (samalog): the time in seconds × 500 / distance, truncated to three
 * decimals, not rounded (1500 m in 1:50.00 → 36.666). Worked in integers so float error cannot
 * push a value over a thousandth: floor(ms × 500 / distance) thousandths.
 */
export function points500(distanceM: number, ms: number): number {
  const d = checkWholeDistance(distanceM);
  checkMs('ms', ms, { positive: true });
  const thousandths = (BigInt(ms) * 500n) / BigInt(d);
  return Number(thousandths) / 1000;
}

/**
 * How long the gun's sound takes to reach a coach this far from the starter, for starting the
 * clock on the sound from the far side: the speed of sound in dry air is 331.3·√(1 + T/273.15)
 * m/s (textbook physics), about 0.3 s per 100 m in a cold rink. 5 °C by default.
 */
export function gunSoundDelayMs(distanceM: number, airTempC = 5): number {
  if (typeof distanceM !== 'number' || !Number.isFinite(distanceM) || distanceM < 0 || distanceM > 1000) {
    throw new RangeError(`distanceM must be between 0 and 1000 m (got ${show(distanceM)})`);
  }
  if (typeof airTempC !== 'number' || !Number.isFinite(airTempC) || airTempC < -40 || airTempC > 50) {
    throw new RangeError(`airTempC must be between -40 and 50 °C (got ${show(airTempC)})`);
  }
  const metresPerSecond = 331.3 * Math.sqrt(1 + airTempC / 273.15);
  return Math.round((distanceM / metresPerSecond) * 1000);
}

// ---------------------------------------------------------------------------------------------
// Pace schedules

/**
 * The planned split at every crossing of a distance for a target time. Three plans:
 * - even pace: every section gets time in proportion to its metres;
 * - even pace after a fixed opener (`openerMs`): the first section gets openerMs and the rest of
 *   the target is shared out per metre over the later sections. Common practice: a standing start
 *   makes the first section slower per metre than the laps after it, which plain even pace
 *   ignores. When a distance has no part lap (e.g. 10000 m) the first lap is the standing-start
 *   section and openerMs fixes it;
 * - section shares (`sharesPct`): one per section, in percent of the target, summing to 100 ± 0.01.
 * Sections are rounded to whole milliseconds and the rounding remainder goes into the last one, so
 * the last cumulativeMs is the target exactly (and no section is ever negative).
 */
export function paceSchedule(distanceM: number, targetMs: number, opts: PaceOptions = {}): PaceEntry[] {
  if (opts === null || typeof opts !== 'object') throw new RangeError(`opts must be an object (got ${show(opts)})`);
  const track = opts.track ?? 'long';
  const { sections } = geometry(distanceM, track);
  const { splitsAtM } = distanceLayout(distanceM, track);
  checkMs('targetMs', targetMs, { positive: true });
  const { openerMs, sharesPct } = opts;
  if (openerMs !== undefined && sharesPct !== undefined) {
    throw new RangeError('give either openerMs or sharesPct, not both');
  }

  let raw: number[];
  if (sharesPct !== undefined) {
    if (!Array.isArray(sharesPct) || sharesPct.length !== sections.length) {
      throw new RangeError(
        `sharesPct must have one share per section: ${sections.length} for ${distanceM} m ${track} track (got ${Array.isArray(sharesPct) ? sharesPct.length : show(sharesPct)})`,
      );
    }
    sharesPct.forEach((share, i) => {
      if (typeof share !== 'number' || !Number.isFinite(share) || share <= 0) {
        throw new RangeError(`sharesPct[${i}] must be a positive finite percentage (got ${show(share)})`);
      }
    });
    const sum = sharesPct.reduce((a, b) => a + b, 0);
    if (Math.abs(sum - 100) > 0.01 + 1e-9) {
      throw new RangeError(`sharesPct must sum to 100 ± 0.01 (got ${round2(sum * 1000) / 1000})`);
    }
    raw = sharesPct.map((share) => (targetMs * share) / 100);
  } else if (openerMs !== undefined) {
    checkMs('openerMs', openerMs, { positive: true });
    if (sections.length === 1) {
      if (openerMs !== targetMs) {
        throw new RangeError(`${distanceM} m has a single section: openerMs must equal targetMs or be left out (got ${openerMs})`);
      }
      raw = [targetMs];
    } else {
      if (openerMs >= targetMs) {
        throw new RangeError(`openerMs (${openerMs}) must be less than targetMs (${targetMs})`);
      }
      const restM = sections.slice(1).reduce((a, b) => a + b, 0);
      raw = [openerMs, ...sections.slice(1).map((len) => ((targetMs - openerMs) * len) / restM)];
    }
  } else {
    const totalM = sections.reduce((a, b) => a + b, 0);
    raw = sections.map((len) => (targetMs * len) / totalM);
  }

  let sectionMs = raw.map((r) => Math.round(r));
  sectionMs[sectionMs.length - 1] = targetMs - sectionMs.slice(0, -1).reduce((a, b) => a + b, 0);
  if (sectionMs[sectionMs.length - 1] < 0) {
    // Only when a few ms are shared over many sections (an opener taking nearly the whole
    // target): rounding every section up would leave the last one negative. Round the running
    // totals instead, which never go backwards, so every section stays ≥ 0.
    let run = 0;
    const totals = raw.map((r, i) => {
      run += r;
      return i === raw.length - 1 ? targetMs : Math.min(targetMs, Math.round(run));
    });
    sectionMs = totals.map((c, i) => c - (i === 0 ? 0 : totals[i - 1]));
  }
  let cumulative = 0;
  return sectionMs.map((ms, i) => {
    cumulative += ms;
    return { atM: splitsAtM[i], sectionMs: ms, cumulativeMs: cumulative };
  });
}

// ---------------------------------------------------------------------------------------------
// Crossings and the live figures

/**
 * Section times from crossing times (ms since the gun, strictly increasing, the first after the
 * gun): the first section is the opener. An empty list gives no sections.
 */
export function lapsFromCrossings(crossingsMs: readonly number[]): number[] {
  const crossings = checkMsList('crossingsMs', crossingsMs);
  return crossings.map((c, i) => {
    const before = i === 0 ? 0 : crossings[i - 1];
    if (c <= before) {
      throw new RangeError(
        i === 0
          ? `crossingsMs[0] must be after the gun (got ${c})`
          : `crossingsMs[${i}] (${c}) must be after crossingsMs[${i - 1}] (${before}): crossings must increase`,
      );
    }
    return c - before;
  });
}

export interface RunResult {
  /** Section times (the first is the opener), or [] when the crossings do not increase. */
  laps: number[];
  /** The time over the line at the distance: only for a complete run, otherwise null. */
  finishMs: number | null;
  /** A finished run of a set distance with exactly one crossing per split, strictly increasing. */
  complete: boolean;
  /** The crossings increase strictly, the first after the gun (so laps can be read off them). */
  ordered: boolean;
}

/**
 * One run's result from its stored crossings (ms since the gun, in stored order), the one rule
 * every review view uses (runs CSV, weekly sheet, lap chart, follow-up laps): a run has a finish
 * only when it is finished, has a set distance (free laps have none), and has exactly one crossing
 * per split of that distance, strictly increasing. Anything else (a stray tap after the gun, a
 * double tap at the line, a missing crossing) is not complete and has no finish: nothing is
 * dropped or guessed. Laps are read off any strictly increasing crossings, complete or not.
 */
export function runResult(distanceM: number, track: Track, status: string, crossingsMs: readonly number[]): RunResult {
  let laps: number[] = [];
  let ordered = true;
  try {
    laps = lapsFromCrossings(crossingsMs);
  } catch {
    ordered = false;
  }
  let splits = -1;
  if (distanceM > 0) {
    try {
      splits = distanceLayout(distanceM, track).splitsAtM.length;
    } catch {
      splits = -1;
    }
  }
  const complete = ordered && status === 'finished' && splits > 0 && crossingsMs.length === splits;
  return { laps, finishMs: complete ? crossingsMs[crossingsMs.length - 1] : null, complete, ordered };
}

function checkSchedule(schedule: readonly PaceEntry[]): readonly PaceEntry[] {
  if (!Array.isArray(schedule) || schedule.length === 0) {
    throw new RangeError('schedule must be a non-empty list from paceSchedule()');
  }
  return schedule;
}

/**
 * The gap to the schedule at a crossing: elapsed minus planned, positive when behind (slower),
 * negative when ahead. crossingIndex is 0-based (0 = the first crossing, after the opener).
 */
export function splitGapMs(schedule: readonly PaceEntry[], crossingIndex: number, elapsedMs: number): number {
  checkSchedule(schedule);
  if (!Number.isSafeInteger(crossingIndex) || crossingIndex < 0 || crossingIndex >= schedule.length) {
    throw new RangeError(`crossingIndex must be 0 to ${schedule.length - 1} (got ${show(crossingIndex)})`);
  }
  checkMs('elapsedMs', elapsedMs);
  return elapsedMs - schedule[crossingIndex].cumulativeMs;
}

/**
 * The predicted finish after the crossings so far, or null when there is nothing to go on.
 * - With a schedule: the target plus the current gap. The schedule already holds the plan's
 *   shape (a slow opener, a fading last lap), so carrying the gap is steadier than extrapolating
 *   one lap, and it works from the very first crossing.
 * - Without one: the remaining metres at the last section's speed, from the second crossing on
 *   (the first section is a standing start, far slower per metre than what follows).
 * Once the last split is in, the finish itself.
 */
export function predictFinishMs(
  splitsAtM: readonly number[],
  crossingsMs: readonly number[],
  schedule?: readonly PaceEntry[],
): number | null {
  if (!Array.isArray(splitsAtM) || splitsAtM.length === 0) {
    throw new RangeError('splitsAtM must be a non-empty list from distanceLayout()');
  }
  const sections = lapsFromCrossings(crossingsMs);
  const n = sections.length;
  if (n > splitsAtM.length) {
    throw new RangeError(`${n} crossings for a distance with ${splitsAtM.length} splits`);
  }
  if (schedule !== undefined && checkSchedule(schedule).length !== splitsAtM.length) {
    throw new RangeError(`schedule has ${schedule.length} entries for ${splitsAtM.length} splits`);
  }
  if (n === 0) return null;
  const last = crossingsMs[n - 1];
  if (n === splitsAtM.length) return last;
  if (schedule !== undefined) {
    return schedule[schedule.length - 1].cumulativeMs + (last - schedule[n - 1].cumulativeMs);
  }
  if (n < 2) return null;
  const lastSectionM = splitsAtM[n - 1] - splitsAtM[n - 2];
  const remainingM = splitsAtM[splitsAtM.length - 1] - splitsAtM[n - 1];
  return last + Math.round((sections[n - 1] * remainingM) / lastSectionM);
}

export interface Consistency {
  /** Laps counted (the first section left out). */
  laps: number;
  meanMs: number;
  /** Slowest minus fastest. */
  spreadMs: number;
  /** Population standard deviation: the laps are the whole race, not a sample of it. */
  sdMs: number;
  /** Coefficient of variation, sd / mean × 100. */
  cvPct: number;
}

function lapsAfterFirst(lapsMs: readonly number[]): number[] {
  const laps = checkMsList('lapsMs', lapsMs);
  laps.forEach((lap, i) => {
    if (lap === 0) throw new RangeError(`lapsMs[${i}] must be positive (got 0)`);
  });
  return laps.slice(1);
}

/**
 * How even the laps were, leaving out the first section (the opener, or the standing-start first
 * lap when there is none); null with fewer than two laps after it. Mean and sd are whole ms.
 */
export function consistency(lapsMs: readonly number[]): Consistency | null {
  const laps = lapsAfterFirst(lapsMs);
  if (laps.length < 2) return null;
  const mean = laps.reduce((a, b) => a + b, 0) / laps.length;
  const sd = Math.sqrt(laps.reduce((a, b) => a + (b - mean) ** 2, 0) / laps.length);
  return {
    laps: laps.length,
    meanMs: Math.round(mean),
    spreadMs: Math.max(...laps) - Math.min(...laps),
    sdMs: Math.round(sd),
    cvPct: (sd / mean) * 100,
  };
}

/** The fade: last lap minus best lap, the first section left out; null with fewer than two laps after it. */
export function fadeMs(lapsMs: readonly number[]): number | null {
  const laps = lapsAfterFirst(lapsMs);
  if (laps.length < 2) return null;
  return laps[laps.length - 1] - Math.min(...laps);
}

export interface SplitRow {
  /** 0-based crossing index. */
  index: number;
  atM: number;
  sectionM: number;
  sectionMs: number;
  /** Elapsed at the crossing. */
  splitMs: number;
  kmh: number;
  /** Gap to the schedule at this crossing, null without one. */
  gapMs: number | null;
}

/** One row per crossing, for the live lane and the finished run's table. */
export function splitTable(
  splitsAtM: readonly number[],
  crossingsMs: readonly number[],
  schedule?: readonly PaceEntry[],
): SplitRow[] {
  const sections = lapsFromCrossings(crossingsMs);
  if (sections.length > splitsAtM.length) {
    throw new RangeError(`${sections.length} crossings for a distance with ${splitsAtM.length} splits`);
  }
  if (schedule !== undefined && checkSchedule(schedule).length !== splitsAtM.length) {
    throw new RangeError(`schedule has ${schedule.length} entries for ${splitsAtM.length} splits`);
  }
  return sections.map((sectionMs, i) => {
    const sectionM = round2(splitsAtM[i] - (i === 0 ? 0 : splitsAtM[i - 1]));
    return {
      index: i,
      atM: splitsAtM[i],
      sectionM,
      sectionMs,
      splitMs: crossingsMs[i],
      kmh: speedKmh(sectionM, sectionMs),
      gapMs: schedule ? crossingsMs[i] - schedule[i].cumulativeMs : null,
    };
  });
}

// ---------------------------------------------------------------------------------------------
// The spoken split

const ONES = [
  'zero', 'one', 'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten',
  'eleven', 'twelve', 'thirteen', 'fourteen', 'fifteen', 'sixteen', 'seventeen', 'eighteen', 'nineteen',
];
const TENS = ['', '', 'twenty', 'thirty', 'forty', 'fifty', 'sixty', 'seventy', 'eighty', 'ninety'];

/** English words for a whole number below a million ("twenty-nine", "two hundred fifty"). */
export function numberWords(n: number): string {
  if (!Number.isSafeInteger(n) || n < 0 || n >= 1_000_000) {
    throw new RangeError(`n must be a whole number from 0 to 999999 (got ${show(n)})`);
  }
  if (n < 20) return ONES[n];
  if (n < 100) return TENS[Math.floor(n / 10)] + (n % 10 ? `-${ONES[n % 10]}` : '');
  if (n < 1000) return `${ONES[Math.floor(n / 100)]} hundred${n % 100 ? ` ${numberWords(n % 100)}` : ''}`;
  return `${numberWords(Math.floor(n / 1000))} thousand${n % 1000 ? ` ${numberWords(n % 1000)}` : ''}`;
}

const ohWords = (n: number): string => (n === 0 ? 'oh oh' : n < 10 ? `oh ${ONES[n]}` : numberWords(n));

/**
 * A time as a coach says it, truncated to tenths like the display: 29.87 → "twenty-nine eight",
 * 30.0 → "thirty flat", 1:52.43 → "one fifty-two four", 1:05.3 → "one oh five three",
 * 1:00.4 → "one minute point four".
 */
export function spokenTime(ms: number): string {
  checkMs('ms', ms);
  const tenths = Math.floor(ms / 100);
  const tenth = tenths % 10;
  const totalS = Math.floor(tenths / 10);
  const h = Math.floor(totalS / 3600);
  const m = Math.floor((totalS % 3600) / 60);
  const s = totalS % 60;
  const tail = tenth === 0 ? 'flat' : ONES[tenth];
  if (h === 0 && m === 0) return `${numberWords(s)} ${tail}`;
  if (h === 0 && s === 0) {
    return `${numberWords(m)} minute${m === 1 ? '' : 's'} ${tenth === 0 ? 'flat' : `point ${ONES[tenth]}`}`;
  }
  if (h === 0) return `${numberWords(m)} ${ohWords(s)} ${tail}`;
  return `${numberWords(h)} ${ohWords(m)} ${ohWords(s)} ${tail}`;
}

/**
 * A gap as a coach says it, truncated toward zero in tenths: "plus three tenths", "minus one
 * tenth", "plus one point four", "minus two seconds"; under a tenth either way "on schedule".
 */
export function spokenGap(ms: number): string {
  if (typeof ms !== 'number' || !Number.isSafeInteger(ms)) {
    throw new RangeError(`ms must be a whole number of milliseconds (got ${show(ms)})`);
  }
  const tenths = Math.trunc(ms / 100);
  if (tenths === 0) return 'on schedule';
  const sign = tenths > 0 ? 'plus' : 'minus';
  const a = Math.abs(tenths);
  if (a < 10) return `${sign} ${ONES[a]} tenth${a === 1 ? '' : 's'}`;
  const s = Math.floor(a / 10);
  const t = a % 10;
  if (t === 0) return `${sign} ${numberWords(s)} second${s === 1 ? '' : 's'}`;
  return `${sign} ${numberWords(s)} point ${ONES[t]}`;
}

/**
 * The one short sentence read aloud at the latest crossing: "Opener, ten four", "Lap three,
 * twenty-nine eight, plus three tenths", "Finish, one fifty-two four, minus one point two".
 * Laps are numbered from the first full lap (after the opener, when there is one); the last split
 * of the layout is read as the finish with the total time. Without a layout (free laps) every
 * crossing is a lap; without a schedule there is no gap.
 */
export function speakSplit(
  crossingsMs: readonly number[],
  plan: { layout?: Pick<DistanceLayout, 'openerM' | 'splitsAtM'>; schedule?: readonly PaceEntry[] } = {},
): string {
  const sections = lapsFromCrossings(crossingsMs);
  const n = sections.length;
  if (n === 0) throw new RangeError('crossingsMs must hold at least one crossing');
  const { layout, schedule } = plan;
  const total = layout?.splitsAtM.length;
  if (total !== undefined && n > total) {
    throw new RangeError(`${n} crossings for a distance with ${total} splits`);
  }
  const index = n - 1;
  const hasOpener = (layout?.openerM ?? 0) > 0;
  let words: string;
  if (total !== undefined && index === total - 1) words = `Finish, ${spokenTime(crossingsMs[index])}`;
  else if (hasOpener && index === 0) words = `Opener, ${spokenTime(sections[0])}`;
  else words = `Lap ${numberWords(hasOpener ? index : index + 1)}, ${spokenTime(sections[index])}`;
  if (schedule !== undefined) words += `, ${spokenGap(splitGapMs(schedule, index, crossingsMs[index]))}`;
  return words;
}
