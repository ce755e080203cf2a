/** Schemas for what the board records: sessions and observations (a cue seen on a skater). */
import { z } from 'zod';
import { calendarDaySchema, isSafeText } from './values';

export const markSchema = z.enum(['needs_work', 'good'], { error: 'Mark must be needs_work or good' });
export type Mark = z.infer<typeof markSchema>;

export const NOTE_MAX = 280;
export const noteSchema = z
  .string({ error: 'A note must be text' })
  .trim()
  .max(NOTE_MAX, `A note can be at most ${NOTE_MAX} characters`)
  .refine(isSafeText, { error: 'A note cannot hold control characters or broken Unicode' });

/** ISO calendar date (YYYY-MM-DD), the local day of the session at the rink. */
export const daySchema = calendarDaySchema;

export const boardSessionSchema = z.object({
  id: z.uuid(),
  teamId: z.uuid(),
  day: daySchema,
  rink: z.string().max(80, 'Rink must be at most 80 characters'),
  title: z.string().max(80, 'Title must be at most 80 characters'),
  focusCueIds: z.array(z.uuid()).max(6, 'Pin at most 6 focus cues'),
  createdAt: z.string(),
  createdBy: z.uuid(),
});
export type BoardSession = z.infer<typeof boardSessionSchema>;

export const observationSchema = z.object({
  id: z.uuid(),
  teamId: z.uuid(),
  sessionId: z.uuid(),
  skaterId: z.uuid(),
  cueId: z.uuid(),
  mark: markSchema,
  note: noteSchema,
  /** Whether the skater (and their guardian) may read the note; marks are always shared. */
  noteShared: z.boolean(),
  createdAt: z.string(),
  createdBy: z.uuid(),
  /** The author's display name when the note was made (set by the server; '' on older notes). */
  authorName: z.string().optional(),
  /** When the skater acknowledged the cue; set on their device, synced back. */
  acknowledgedAt: z.string().nullable().optional(),
});
export type Observation = z.infer<typeof observationSchema>;

export const observationPatchSchema = observationSchema.pick({ mark: true, note: true, noteShared: true }).partial().strict();
export type ObservationPatch = z.infer<typeof observationPatchSchema>;

export const boardSessionPatchSchema = boardSessionSchema.pick({ rink: true, title: true, focusCueIds: true }).partial().strict();
export type BoardSessionPatch = z.infer<typeof boardSessionPatchSchema>;
