/**
 * Cue follow-up (issue #10 §3; the rule in shared/follow-up.ts) and the skater's runs by week
 * (§6, "my weeks"): the query strings the server parses (a bad one is a 400 naming the field) and
 * the replies the client parses.
 */
import { z } from 'zod';
import { phaseSchema } from '../cues';
import { DEFAULT_STRESS_THRESHOLD, MAX_STRESS_THRESHOLD, MIN_STRESS_THRESHOLD } from '../follow-up';
import { isIsoWeek, isoWeekSchema, MAX_REVIEW_WEEKS, weekSpan } from '../weeks';
import { strictQuery } from './review';

const thresholdMessage = `threshold must be a whole number from ${MIN_STRESS_THRESHOLD} to ${MAX_STRESS_THRESHOLD}`;

/** ?threshold=N: a whole number 1..20 as a query string (default 3). */
export const stressThresholdSchema = z
  .string({ error: thresholdMessage })
  .regex(/^\d{1,3}$/, thresholdMessage)
  .transform(Number)
  .refine((n) => n >= MIN_STRESS_THRESHOLD && n <= MAX_STRESS_THRESHOLD, { error: thresholdMessage });

/** The same range rule as the review's other views: from <= to, at most 104 weeks. */
const rangeRule = (value: { from?: string; to?: string }, ctx: z.RefinementCtx) => {
  if (value.from && value.to && isIsoWeek(value.from) && isIsoWeek(value.to)) {
    const span = weekSpan(value.from, value.to);
    if (span < 1) ctx.addIssue({ code: 'custom', path: ['from'], message: `from (${value.from}) must not be after to (${value.to})` });
    else if (span > MAX_REVIEW_WEEKS) {
      ctx.addIssue({ code: 'custom', path: ['to'], message: `A range holds at most ${MAX_REVIEW_WEEKS} weeks (this one holds ${span})` });
    }
  }
};

/** ?threshold=3&from=YYYY-Www&to=YYYY-Www: the weeks in which to look for stressed cues. */
export const followUpQuerySchema = strictQuery({
  threshold: stressThresholdSchema.default(DEFAULT_STRESS_THRESHOLD),
  from: isoWeekSchema('from').optional(),
  to: isoWeekSchema('to').optional(),
}).superRefine(rangeRule);
export type FollowUpQuery = z.infer<typeof followUpQuerySchema>;

/** ?from&to for the skater's runs by week. */
export const runsByWeekQuerySchema = strictQuery({ from: isoWeekSchema('from').optional(), to: isoWeekSchema('to').optional() }).superRefine(rangeRule);

export const followUpVerdictSchema = z.enum(['fading', 'persisting', 'not enough data']);

const weekLapsSchema = z.object({ runs: z.number().int(), laps: z.number().int(), meanLapMs: z.number().int().nullable() });
export type WeekLapsReply = z.infer<typeof weekLapsSchema>;

export const followUpItemSchema = z.object({
  cueId: z.uuid(),
  phase: phaseSchema,
  label: z.string(),
  archived: z.boolean(),
  /** The stressed week and its counts. */
  week: z.string(),
  needsWork: z.number().int(),
  good: z.number().int(),
  laps: weekLapsSchema,
  /** The four weeks after it, in order; `counted` false for a week still to come. */
  after: z.array(
    z.object({ week: z.string(), needsWork: z.number().int(), good: z.number().int(), counted: z.boolean(), laps: weekLapsSchema }),
  ),
  /** The follow-up weeks that have begun, their laps pooled. */
  afterLaps: weekLapsSchema,
  lapChangeMs: z.number().int().nullable(),
  verdict: followUpVerdictSchema,
  stressedGood: z.number().int(),
  stressedMarks: z.number().int(),
  afterGood: z.number().int(),
  afterMarks: z.number().int(),
  weeksCounted: z.number().int(),
  changePoints: z.number().nullable(),
});
export type FollowUpItem = z.infer<typeof followUpItemSchema>;

export const followUpReplySchema = z.object({
  timeZone: z.string(),
  from: z.string(),
  to: z.string(),
  threshold: z.number().int(),
  /** The current week in the team's zone: later follow-up weeks are "to come". */
  currentWeek: z.string(),
  /** The distance the lap times are of, or null when the skater has no fully timed run in these weeks. */
  lapBasis: z.object({ distanceM: z.number().int(), track: z.enum(['long', 'short']), runs: z.number().int() }).nullable(),
  /** Newest stressed week first; within a week, in the cue library's order. */
  items: z.array(followUpItemSchema),
});
export type FollowUpReply = z.infer<typeof followUpReplySchema>;

const lapBasisSchema = z.object({ distanceM: z.number().int(), track: z.enum(['long', 'short']), runs: z.number().int() }).nullable();

/** The same over a group's live skaters (coaches only): only skaters with a stressed cue, by name. */
export const groupFollowUpReplySchema = z.object({
  timeZone: z.string(),
  from: z.string(),
  to: z.string(),
  threshold: z.number().int(),
  currentWeek: z.string(),
  group: z.string(),
  skaters: z.array(
    z.object({ skaterId: z.uuid(), displayName: z.string(), lapBasis: lapBasisSchema, items: z.array(followUpItemSchema) }),
  ),
});
export type GroupFollowUpReply = z.infer<typeof groupFollowUpReplySchema>;

/** One finished run of the skater, for "my weeks". */
export const weekRunSchema = z.object({
  id: z.uuid(),
  heatId: z.uuid(),
  skaterId: z.uuid(),
  day: z.string(),
  week: z.string(),
  distanceM: z.number().int(),
  track: z.enum(['long', 'short']),
  lane: z.enum(['inner', 'outer', 'group']),
  startedAt: z.string(),
  startOffsetMs: z.number().int(),
  targetMs: z.number().int().nullable(),
  status: z.enum(['running', 'finished', 'stopped']),
  stopReason: z.string(),
  note: z.string(),
  crossings: z.array(z.object({ id: z.uuid(), atMs: z.number().int(), handTimed: z.boolean() })),
});
export type WeekRun = z.infer<typeof weekRunSchema>;

export const runsByWeekReplySchema = z.object({
  timeZone: z.string(),
  from: z.string(),
  to: z.string(),
  weeks: z.array(z.string()),
  /** Finished runs, newest day first. */
  runs: z.array(weekRunSchema),
});
export type RunsByWeekReply = z.infer<typeof runsByWeekReplySchema>;
