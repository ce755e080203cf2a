/**
 * The review's export and print (issue #10 §5): the CSV export's query string and the weekly
 * sheet's query and reply. Both are coach routes (server/routes/review-export.ts):
 *
 *   GET /api/teams/:teamId/review/export.csv?kind=observations|runs&from=YYYY-MM-DD&to=YYYY-MM-DD&skaterIds=a,b
 *   GET /api/teams/:teamId/review/skaters/:skaterId/sheet?week=YYYY-Www
 *
 * `from` and `to` are local days in the team's time zone, both included; at most
 * MAX_EXPORT_DAYS days. `skaterIds` is optional (every skater of the team, retired ones too).
 * Every failure names its field, so the client shows it under the right control.
 */
import { z } from 'zod';
import { phaseSchema } from '../cues';
import { isoWeekSchema } from '../weeks';
import { strictQuery } from './review';
import { calendarDaySchema } from './values';

/** The longest range one export covers (a leap year and a day more is refused). */
export const MAX_EXPORT_DAYS = 366;
/** The most skater ids one export names (far more than a team has). */
export const MAX_EXPORT_SKATERS = 500;

export const exportKinds = ['observations', 'runs'] as const;
export type ExportKind = (typeof exportKinds)[number];

const dayOf = (name: string) =>
  z
    .string({ error: `${name} must be a day like 2026-03-01 (YYYY-MM-DD)` })
    .regex(/^\d{4}-\d{2}-\d{2}$/, `${name} must be a day like 2026-03-01 (YYYY-MM-DD)`)
    .refine((v) => calendarDaySchema.safeParse(v).success, { error: `${name} must be a real day from 2000-01-01 to 2099-12-31` });

/** Days between two checked YYYY-MM-DD days, both included (UTC midnights: no daylight saving). */
export const daysInRange = (from: string, to: string): number =>
  Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000) + 1;

const skaterIdsMessage = 'skaterIds must be skater ids (UUIDs) separated by commas';

export const exportQuerySchema = strictQuery({
  kind: z.enum(exportKinds, { error: "kind must be 'observations' or 'runs'" }),
  from: dayOf('from'),
  to: dayOf('to'),
  skaterIds: z
    .string({ error: skaterIdsMessage })
    .transform((value, ctx) => {
      const ids = value
        .split(',')
        .map((id) => id.trim())
        .filter((id) => id !== '');
      if (ids.length === 0) {
        ctx.addIssue({ code: 'custom', message: 'skaterIds must name at least one skater (leave it out for every skater)' });
        return z.NEVER;
      }
      if (ids.length > MAX_EXPORT_SKATERS) {
        ctx.addIssue({ code: 'custom', message: `skaterIds names at most ${MAX_EXPORT_SKATERS} skaters` });
        return z.NEVER;
      }
      const bad = ids.find((id) => !z.uuid().safeParse(id).success);
      if (bad !== undefined) {
        ctx.addIssue({ code: 'custom', message: `${skaterIdsMessage} ("${bad.slice(0, 40)}" is not one)` });
        return z.NEVER;
      }
      return [...new Set(ids.map((id) => id.toLowerCase()))];
    })
    .optional(),
}).superRefine((value, ctx) => {
  const span = daysInRange(value.from, value.to);
  if (span < 1) ctx.addIssue({ code: 'custom', path: ['from'], message: `from (${value.from}) must not be after to (${value.to})` });
  else if (span > MAX_EXPORT_DAYS) {
    ctx.addIssue({ code: 'custom', path: ['to'], message: `to (${value.to}) must be within ${MAX_EXPORT_DAYS} days of from, both included: an export covers at most ${MAX_EXPORT_DAYS} days (this range holds ${span})` });
  }
});
export type ExportQuery = z.infer<typeof exportQuerySchema>;

/** ?week=YYYY-Www for the weekly sheet. */
export const sheetQuerySchema = strictQuery({ week: isoWeekSchema('week') });

export const sheetCueSchema = z.object({
  cueId: z.uuid(),
  phase: phaseSchema,
  label: z.string(),
  needsWork: z.number().int(),
  good: z.number().int(),
});

export const sheetNoteSchema = z.object({
  id: z.uuid(),
  /** Local day and time (HH:MM) in the team's zone. */
  day: z.string(),
  time: z.string(),
  phase: phaseSchema.nullable(),
  cueLabel: z.string(),
  mark: z.enum(['needs_work', 'good']),
  note: z.string(),
  authorName: z.string(),
});

export const sheetRunSchema = z.object({
  id: z.uuid(),
  day: z.string(),
  time: z.string(),
  distanceM: z.number().int(),
  track: z.enum(['long', 'short']),
  status: z.enum(['running', 'finished', 'stopped']),
  /** "1:45.00" (hundredths truncated), null when the run has no finish. */
  finish: z.string().nullable(),
  /** Each section's time ("26.80"), the opener first. */
  laps: z.array(z.string()),
  target: z.string().nullable(),
});

/** One skater's week, to print and hand over: only shared notes, every mark counted. */
export const weeklySheetSchema = z.object({
  timeZone: z.string(),
  week: z.string(),
  /** The week's Monday and Sunday (local days). */
  firstDay: z.string(),
  lastDay: z.string(),
  skater: z.object({ id: z.uuid(), displayName: z.string(), groupName: z.string().nullable() }),
  cues: z.array(sheetCueSchema),
  notes: z.array(sheetNoteSchema),
  runs: z.array(sheetRunSchema),
});
export type WeeklySheet = z.infer<typeof weeklySheetSchema>;
export type SheetRun = z.infer<typeof sheetRunSchema>;
