/**
 * The clock's records (issue #9): a timed run of one skater (a pair is two runs sharing a heat
 * id), the crossings of the line tapped during it, and a skater's target for a distance with its
 * pace plan. The field rules here are the ones shared/sync-tables.ts gives push, the device store
 * checks a coach's input with, and the server migration's CHECK constraints mirror.
 *
 * Times are whole milliseconds, distances whole metres. A crossing's `atMs` counts from the start
 * signal (already corrected by the run's start offset), so it lies within one day.
 */
import { v5 as uuidv5 } from 'uuid';
import { z } from 'zod';
import { distanceLayout, paceSchedule } from '../timing';
import { daySchema, noteSchema } from './board';
import { instantSchema, safeText } from './values';

/** The longest elapsed time the clock records: one day. */
export const DAY_MS = 86_400_000;
/** The start offset for starting on the gun's sound from the far side: at most 5 s (about 1.7 km of sound). */
export const MAX_START_OFFSET_MS = 5000;
export const MAX_CLOCK_DISTANCE_M = 100_000;
/** "Free laps": a training run without a set distance. */
export const FREE_LAPS = 0;
/** Section shares are percentages summing to 100 within this tolerance (shared/timing.ts agrees). */
export const SHARES_TOLERANCE = 0.01;
/** More sections than any distance has (100 km on short track is 900 laps). */
export const MAX_SECTIONS = 1000;
export const STOP_REASON_MAX = 80;

export const trackSchema = z.enum(['long', 'short'], { error: 'track must be long or short' });
export type Track = z.infer<typeof trackSchema>;
/** Inner or outer lane of a pair (the white and red armbands), or a training group. */
export const runLaneSchema = z.enum(['inner', 'outer', 'group'], { error: 'lane must be inner, outer or group' });
export type RunLane = z.infer<typeof runLaneSchema>;
export const runStatusSchema = z.enum(['running', 'finished', 'stopped'], { error: 'status must be running, finished or stopped' });
export type RunStatus = z.infer<typeof runStatusSchema>;
export const targetPlanSchema = z.enum(['even', 'shares'], { error: 'plan must be even or shares' });
export type TargetPlan = z.infer<typeof targetPlanSchema>;

const wholeMs = (name: string, min: number, max: number) =>
  z
    .number({ error: `${name} must be a number of milliseconds` })
    .int(`${name} must be whole milliseconds`)
    .min(min, `${name} must be at least ${min} ms`)
    .max(max, `${name} must be at most ${max} ms`);

/** Milliseconds since the start signal: 0 up to one day. */
export const atMsSchema = wholeMs('atMs', 0, DAY_MS);
export const startOffsetMsSchema = wholeMs('startOffsetMs', 0, MAX_START_OFFSET_MS);
/** A target or opener time: a positive time within one day. */
export const targetMsSchema = wholeMs('targetMs', 1, DAY_MS);
export const openerMsSchema = wholeMs('openerMs', 1, DAY_MS);

/**
 * A run's distance in metres: 0 for free laps, else 1..100 km. Whether the distance can be laid
 * out on the run's track (a multiple of 100 m on long track; short track also takes whole half
 * laps such as 222, 333 and 777) depends on the track too: `distanceProblem` checks the pair.
 */
export const runDistanceSchema = z
  .number({ error: 'distanceM must be a number of metres' })
  .int('distanceM must be whole metres')
  .min(0, 'distanceM must be 0 (free laps) or a distance')
  .max(MAX_CLOCK_DISTANCE_M, `distanceM must be at most ${MAX_CLOCK_DISTANCE_M} m`);
export const targetDistanceSchema = runDistanceSchema.min(1, 'distanceM must be a distance (a target needs one)');

/** Percent of the target time per section, one per section of the distance, summing to 100 ± 0.01. */
export const sharesPctSchema = z
  .array(
    z
      .number({ error: 'sharesPct must hold numbers' })
      .refine(Number.isFinite, { error: 'sharesPct must hold finite numbers' })
      .min(0, 'each share must be 0 to 100 percent')
      .max(100, 'each share must be 0 to 100 percent'),
    { error: 'sharesPct must be a list of percentages' },
  )
  .min(1, 'sharesPct needs a share per section')
  .max(MAX_SECTIONS, `sharesPct can hold at most ${MAX_SECTIONS} shares`)
  .refine((shares) => Math.abs(shares.reduce((a, b) => a + b, 0) - 100) <= SHARES_TOLERANCE + 1e-9, {
    error: `sharesPct must sum to 100 (± ${SHARES_TOLERANCE})`,
  });

export const stopReasonSchema = safeText('stopReason', STOP_REASON_MAX);

/** Why a distance cannot be timed on a track, or null when it can (0 = free laps is fine for a run). */
export function distanceProblem(distanceM: number, track: Track, { freeLaps = true } = {}): string | null {
  if (distanceM === FREE_LAPS) return freeLaps ? null : 'distanceM must be a distance (a target needs one)';
  try {
    distanceLayout(distanceM, track);
    return null;
  } catch (error) {
    return error instanceof Error ? error.message : String(error);
  }
}

/**
 * Why a target's pace plan does not fit its distance, or null: the same checks the pace schedule
 * makes (one share per section, summing to 100; an opener shorter than the target), so a plan the
 * server accepts is one the clock can draw. `even` may carry an opener and never shares; `shares`
 * carries shares and never an opener.
 */
export function targetPlanProblem(target: {
  distanceM: number;
  track: Track;
  targetMs: number;
  plan: TargetPlan;
  openerMs?: number | null;
  sharesPct?: readonly number[] | null;
}): string | null {
  const distance = distanceProblem(target.distanceM, target.track, { freeLaps: false });
  if (distance) return distance;
  const opener = target.openerMs ?? null;
  const shares = target.sharesPct ?? null;
  if (target.plan === 'shares' && shares === null) return 'A shares plan needs sharesPct (one share per section)';
  if (target.plan === 'shares' && opener !== null) return 'A shares plan has no openerMs: the first share sets the opener';
  if (target.plan === 'even' && shares !== null) return 'An even plan has no sharesPct (choose the shares plan)';
  try {
    paceSchedule(target.distanceM, target.targetMs, {
      track: target.track,
      ...(opener !== null ? { openerMs: opener } : {}),
      ...(shares !== null ? { sharesPct: [...shares] } : {}),
    });
    return null;
  } catch (error) {
    return error instanceof Error ? error.message : String(error);
  }
}

/** Fixed namespace of target ids: one target per team, skater, track and distance, on every device. */
export const TARGET_NAMESPACE = '2f8c4a61-7d3e-4b59-a0c2-9e6d1f3b7a85';

/**
 * The id of a skater's target for a distance: the same on every device, so two coaches setting
 * it offline write one record and its fields merge by their clocks.
 */
export const targetIdFor = (teamId: string, skaterId: string, track: Track, distanceM: number) =>
  uuidv5(`${teamId}/${skaterId}/${track}/${distanceM}`, TARGET_NAMESPACE);

// ---- records as the device store and the screens see them ------------------------------------

export const runSchema = z.object({
  id: z.uuid(),
  teamId: z.uuid(),
  heatId: z.uuid(),
  skaterId: z.uuid(),
  /** The rink day it was timed (device-local calendar day). */
  day: daySchema,
  distanceM: runDistanceSchema,
  track: trackSchema,
  lane: runLaneSchema,
  /** Wall-clock instant of the start tap (display only: elapsed times come from the crossings). */
  startedAt: instantSchema('startedAt'),
  startOffsetMs: startOffsetMsSchema,
  /** The skater's target when the run started (a snapshot), or null. */
  targetMs: targetMsSchema.nullable(),
  status: runStatusSchema,
  stopReason: stopReasonSchema,
  note: noteSchema,
  createdBy: z.uuid(),
  /** The coach's display name when the run was timed (the server writes its own copy). */
  authorName: z.string(),
  createdAt: z.string(),
});
export type Run = z.infer<typeof runSchema>;

export const crossingSchema = z.object({
  id: z.uuid(),
  teamId: z.uuid(),
  runId: z.uuid(),
  atMs: atMsSchema,
  handTimed: z.boolean(),
  createdAt: z.string(),
});
export type Crossing = z.infer<typeof crossingSchema>;

/** A crossing as a run carries it for the screens. */
export type RunCrossing = Pick<Crossing, 'id' | 'atMs' | 'handTimed'>;
/** A run with its live crossings, sorted by atMs. */
export type RunWithCrossings = Run & { crossings: RunCrossing[] };

export const targetSchema = z.object({
  id: z.uuid(),
  teamId: z.uuid(),
  skaterId: z.uuid(),
  distanceM: targetDistanceSchema,
  track: trackSchema,
  targetMs: targetMsSchema,
  plan: targetPlanSchema,
  openerMs: openerMsSchema.nullable(),
  sharesPct: sharesPctSchema.nullable(),
  note: noteSchema,
  /** The coach who last set it. */
  updatedBy: z.uuid(),
});
export type Target = z.infer<typeof targetSchema>;

// ---- what the screen hands the store ------------------------------------------------------------

/** One lane of a heat as the coach set it up. */
export const runDraftSchema = z
  .object({
    /** Made by the caller to paint before the write commits (a UUID v7 otherwise). */
    id: z.uuid().optional(),
    skaterId: z.uuid({ error: 'Pick a skater for every lane' }),
    distanceM: runDistanceSchema,
    track: trackSchema,
    lane: runLaneSchema,
    startOffsetMs: startOffsetMsSchema.optional(),
    targetMs: targetMsSchema.nullable().optional(),
    note: noteSchema.optional(),
  })
  .strict();
export type RunDraft = z.infer<typeof runDraftSchema>;

/** A heat: up to six skaters started together (a pair is two). */
export const MAX_HEAT_RUNS = 6;
export const heatStartSchema = z
  .object({
    heatId: z.uuid({ error: 'heatId must be a UUID' }),
    startedAt: instantSchema('startedAt'),
    /** The rink day; by default the device-local day of startedAt. */
    day: daySchema.optional(),
    runs: z
      .array(runDraftSchema)
      .min(1, 'Pick at least one skater')
      .max(MAX_HEAT_RUNS, `At most ${MAX_HEAT_RUNS} skaters at once`)
      .refine((runs) => new Set(runs.map((r) => r.skaterId)).size === runs.length, { error: 'A skater can be in one lane only' }),
  })
  .strict();
export type HeatStart = z.infer<typeof heatStartSchema>;

export const crossingPatchSchema = z.object({ atMs: atMsSchema, handTimed: z.boolean() }).partial().strict();
export type CrossingPatch = z.infer<typeof crossingPatchSchema>;

/** What can change on a run after it started (the day, the start and the skater cannot). */
export const runPatchSchema = z
  .object({
    distanceM: runDistanceSchema,
    track: trackSchema,
    lane: runLaneSchema,
    startOffsetMs: startOffsetMsSchema,
    targetMs: targetMsSchema.nullable(),
    status: runStatusSchema,
    stopReason: stopReasonSchema,
    note: noteSchema,
  })
  .partial()
  .strict();
export type RunPatch = z.infer<typeof runPatchSchema>;

export const targetInputSchema = z
  .object({
    skaterId: z.uuid({ error: 'Pick a skater' }),
    track: trackSchema,
    distanceM: targetDistanceSchema,
    targetMs: targetMsSchema,
    plan: targetPlanSchema,
    openerMs: openerMsSchema.nullable().optional(),
    sharesPct: sharesPctSchema.nullable().optional(),
    note: noteSchema.optional(),
  })
  .strict();
export type TargetInput = z.infer<typeof targetInputSchema>;
