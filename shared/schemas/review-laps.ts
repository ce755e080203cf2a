/**
 * The evening review's lap-time trends (issue #10 §2, server/routes/review-laps.ts): one skater's
 * runs of one distance on one track over ISO weeks in the team's time zone, with their laps, the
 * target and its pace schedule, and the personal bests. The query string is parsed here (a bad
 * one is a 400 naming the field); the reply is typed here for the client.
 *
 * Only a finished run with exactly one crossing per split of its distance has a finish time; a
 * stopped, running or partial run keeps its laps, flagged, and never counts as a finish or a best.
 */
import { z } from 'zod';
import { distanceProblem, trackSchema } from './clock';
import { reviewRangeQuerySchema, strictQuery } from './review';
import { isIsoWeek, isoWeekSchema } from '../weeks';

/** Weeks shown when no range is asked for: half a season, so monthly test days show a trend. */
export const LAP_TREND_DEFAULT_WEEKS = 26;

const distanceMessage = 'distanceM must be a distance in whole metres, like 1500';

/**
 * ?distanceM=1500&track=long&from=YYYY-Www&to=YYYY-Www, all optional: without a distance the
 * server shows the distance the skater ran last; without a track, long track; the range as in
 * the rest of the review (at most 104 weeks), by default the last 26.
 */
export const lapTrendQuerySchema = strictQuery({
  distanceM: z
    .string({ error: distanceMessage })
    .regex(/^\d{1,6}$/, distanceMessage)
    .transform(Number)
    .refine((n) => n >= 1, { error: 'distanceM must be a distance (free laps have no splits to compare)' })
    .optional(),
  track: trackSchema.optional(),
  from: isoWeekSchema('from').optional(),
  to: isoWeekSchema('to').optional(),
}).superRefine((value, ctx) => {
  // The same range rules as the cue counts (from before to, at most 104 weeks).
  const weeksOk = (!value.from || isIsoWeek(value.from)) && (!value.to || isIsoWeek(value.to));
  const range = weeksOk ? reviewRangeQuerySchema.safeParse({ from: value.from, to: value.to }) : null;
  if (range && !range.success) {
    for (const issue of range.error.issues) {
      if (issue.code === 'custom') ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message });
    }
  }
  if (value.distanceM !== undefined && value.distanceM >= 1) {
    const problem = distanceProblem(value.distanceM, value.track ?? 'long', { freeLaps: false });
    if (problem) ctx.addIssue({ code: 'custom', path: ['distanceM'], message: `${problem} (track ${value.track ?? 'long'})` });
  }
  if (value.track !== undefined && value.distanceM === undefined) {
    ctx.addIssue({ code: 'custom', path: ['distanceM'], message: 'distanceM is needed with track (which distance on that track?)' });
  }
});
export type LapTrendQuery = z.infer<typeof lapTrendQuerySchema>;

/** A distance and track the skater has live runs of (all time), for the client's choice. */
export const lapDistanceSchema = z.object({
  distanceM: z.number().int(),
  track: trackSchema,
  runs: z.number().int(),
  /** The local day (team zone) of the latest run. */
  lastDay: z.string(),
});
export type LapDistance = z.infer<typeof lapDistanceSchema>;

export const lapRunStateSchema = z.enum(['complete', 'partial', 'stopped', 'running', 'unordered']);
/**
 * complete: finished, one crossing per split (counts as a finish time and for bests);
 * partial: finished but with fewer or more crossings than splits (a missed or extra tap);
 * stopped / running: ended early or never ended; unordered: two crossings at the same instant.
 */
export type LapRunState = z.infer<typeof lapRunStateSchema>;

export const lapRunSchema = z.object({
  id: z.uuid(),
  /** When the start was tapped, and its local day and ISO week in the team's zone. */
  startedAt: z.string(),
  day: z.string(),
  week: z.string(),
  status: z.enum(['running', 'finished', 'stopped']),
  stopReason: z.string(),
  state: lapRunStateSchema,
  lane: z.enum(['inner', 'outer', 'group']),
  note: z.string(),
  /** Who timed it (the name the server stored with the run). */
  authorName: z.string(),
  /** The target when it started (a snapshot), or null. */
  targetMs: z.number().int().nullable(),
  /** Live crossings, ms since the gun, in order. */
  crossingsMs: z.array(z.number().int()),
  /** Sections from the crossings (shared/timing lapsFromCrossings): opener first when the distance has one. */
  lapsMs: z.array(z.number().int()),
  /** The last crossing of a complete run; null otherwise. */
  finishMs: z.number().int().nullable(),
  /** Any crossing timed by hand. */
  handTimed: z.boolean(),
});
export type LapRun = z.infer<typeof lapRunSchema>;

export const lapBestSchema = z.object({ runId: z.uuid(), day: z.string(), ms: z.number().int() });
export type LapBest = z.infer<typeof lapBestSchema>;

export const lapTrendSchema = z.object({
  timeZone: z.string(),
  from: z.string(),
  to: z.string(),
  weeks: z.array(z.string()),
  skaterId: z.uuid(),
  /** The distance shown; null when the skater has no runs of any distance yet. */
  distanceM: z.number().int().nullable(),
  track: trackSchema.nullable(),
  /** Metres at each crossing of the distance (shared/timing distanceLayout), empty without a distance. */
  splitsAtM: z.array(z.number()),
  openerM: z.number(),
  distances: z.array(lapDistanceSchema),
  /** The skater's current target for this distance and track, with its pace schedule. */
  target: z
    .object({
      targetMs: z.number().int(),
      plan: z.enum(['even', 'shares']),
      openerMs: z.number().int().nullable(),
      /** Planned section times (paceSchedule), one per split. */
      sectionsMs: z.array(z.number().int()),
      note: z.string(),
    })
    .nullable(),
  /** Runs in the range, oldest first. */
  runs: z.array(lapRunSchema),
  /** Personal bests over ALL the skater's complete runs of this distance (not only the range). */
  bests: z.object({
    finish: lapBestSchema.nullable(),
    /** One per split index; null where no complete run has it. */
    laps: z.array(lapBestSchema.nullable()),
  }),
});
export type LapTrend = z.infer<typeof lapTrendSchema>;
