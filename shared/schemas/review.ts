/**
 * The evening review's first view (server/routes/review.ts): cues per skater by ISO week in the
 * team's time zone, the same summed over a group, skaters x cues for one week, and the notes
 * behind one cell. Query strings are parsed with these schemas (a bad one is a 400 naming the
 * field); the replies are typed here for the client.
 */
import { z } from 'zod';
import { phaseSchema } from '../cues';
import { isIsoWeek, isoWeekSchema, MAX_REVIEW_WEEKS, weekSpan } from '../weeks';

/**
 * A review route's query string: only the fields named in `shape`. Any other key (?from[]=x,
 * ?constructor=1, a typo) is a 400 that names it and the fields the route reads.
 */
export function strictQuery<T extends z.ZodRawShape>(shape: T) {
  const names = Object.keys(shape);
  const reads = names.length === 1 ? names[0] : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
  return z.strictObject(shape, {
    error: (issue) => {
      if (issue.code !== 'unrecognized_keys') return undefined;
      const keys = issue.keys.slice(0, 3).map((key) => `"${key.length > 40 ? `${key.slice(0, 40)}…` : key}"`);
      const more = issue.keys.length > 3 ? ` and ${issue.keys.length - 3} more` : '';
      return `${keys.join(', ')}${more} ${issue.keys.length === 1 ? 'is' : 'are'} not read here: this view reads ${reads}`;
    },
  });
}

/** ?from=YYYY-Www&to=YYYY-Www, both optional (the default is the last 8 weeks of the team's zone). */
export const reviewRangeQuerySchema = strictQuery({ from: isoWeekSchema('from').optional(), to: isoWeekSchema('to').optional() })
  .superRefine((value, ctx) => {
    // The week checks above report a week that does not exist; the span needs two real ones.
    if (value.from && value.to && isIsoWeek(value.from) && isIsoWeek(value.to)) {
      const span = weekSpan(value.from, value.to);
      if (span < 1) ctx.addIssue({ code: 'custom', path: ['from'], message: `from (${value.from}) must not be after to (${value.to})` });
      else if (span > MAX_REVIEW_WEEKS) {
        ctx.addIssue({ code: 'custom', path: ['to'], message: `A range holds at most ${MAX_REVIEW_WEEKS} weeks (this one holds ${span})` });
      }
    }
  });
export type ReviewRangeQuery = z.infer<typeof reviewRangeQuerySchema>;

/** A group of the team by id, 'all' (the whole team) or 'none' (skaters in no group). */
const groupMessage = "groupId must be a group's id, 'all' or 'none'";
export const reviewGroupSchema = z
  .string({ error: groupMessage })
  .refine((value) => value === 'all' || value === 'none' || z.uuid().safeParse(value).success, { error: groupMessage })
  // A group's id in lower case, as the database writes it (the reply names the group as stored).
  .transform((value) => value.toLowerCase());
export type ReviewGroup = z.infer<typeof reviewGroupSchema>;

/** ?groupId=… for the one-week view (default: the whole team). */
export const reviewWeekQuerySchema = strictQuery({ groupId: reviewGroupSchema.optional() });

/** ?cueId=…&week=… for the notes behind one cell. */
export const reviewCellQuerySchema = strictQuery({ cueId: z.uuid({ error: 'cueId must be a UUID' }), week: isoWeekSchema('week') });

export const reviewTrendSchema = z.enum(['fewer', 'more', 'steady', 'not enough data']);
export type ReviewTrend = z.infer<typeof reviewTrendSchema>;

export const reviewCueSchema = z.object({
  cueId: z.uuid(),
  phase: phaseSchema,
  label: z.string(),
  archived: z.boolean(),
});
export type ReviewCue = z.infer<typeof reviewCueSchema>;

export const reviewCountSchema = z.object({ week: z.string(), needsWork: z.number().int(), good: z.number().int() });

export const reviewRowSchema = reviewCueSchema.extend({
  /** Only the weeks with a mark, in week order. */
  counts: z.array(reviewCountSchema),
  totalNeedsWork: z.number().int(),
  totalGood: z.number().int(),
  trend: reviewTrendSchema,
});
export type ReviewRow = z.infer<typeof reviewRowSchema>;

/** A cue x week matrix (one skater, or summed over a group). */
export const reviewMatrixSchema = z.object({
  timeZone: z.string(),
  from: z.string(),
  to: z.string(),
  /** Every week of the range, in order, those without marks too. */
  weeks: z.array(z.string()),
  /** Cues with at least one mark in the range, by phase order, then the cue's sort order. */
  rows: z.array(reviewRowSchema),
});
export type ReviewMatrix = z.infer<typeof reviewMatrixSchema>;

/** Skaters x cues for one week. */
export const reviewWeekSchema = z.object({
  timeZone: z.string(),
  week: z.string(),
  skaters: z.array(z.object({ id: z.uuid(), displayName: z.string() })),
  cues: z.array(reviewCueSchema),
  /** Only the non-empty cells. */
  cells: z.array(z.object({ skaterId: z.uuid(), cueId: z.uuid(), needsWork: z.number().int(), good: z.number().int() })),
});
export type ReviewWeek = z.infer<typeof reviewWeekSchema>;

/** One note behind a cell, newest first. `note` is blank for a skater or guardian unless shared. */
export const reviewCellNoteSchema = z.object({
  id: z.uuid(),
  createdAt: z.string(),
  /** The local day in the team's zone. */
  day: z.string(),
  authorName: z.string(),
  /** The author's user id (who may change the note: its author and the head coach); '' for a skater or guardian. */
  createdBy: z.string(),
  mark: z.enum(['needs_work', 'good']),
  note: z.string(),
  noteShared: z.boolean(),
  sessionId: z.uuid(),
});
export const reviewCellSchema = z.object({
  timeZone: z.string(),
  week: z.string(),
  notes: z.array(reviewCellNoteSchema),
});
export type ReviewCell = z.infer<typeof reviewCellSchema>;
