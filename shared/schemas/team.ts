/** Schemas for the squad: skater groups, skater profiles and team members. */
import { z } from 'zod';
import { timeZoneSchema } from '../weeks';
import { displayNameSchema, roleSchema } from './auth';

export const groupSchema = z.object({
  id: z.uuid(),
  name: z.string(),
  sortOrder: z.number().int(),
});
export type Group = z.infer<typeof groupSchema>;

export const skaterSchema = z.object({
  id: z.uuid(),
  displayName: z.string(),
  groupId: z.uuid().nullable(),
  /** Whether a user account is linked (the skater can sign in). */
  hasAccount: z.boolean(),
  /** Retired: kept in history (notes, runs, review) but off the board and out of the pickers. */
  retired: z.boolean(),
});
export type Skater = z.infer<typeof skaterSchema>;

export const skaterCreateSchema = z
  .object({
    /** Client-made UUID (v7) so a profile created offline keeps its id. */
    id: z.uuid({ error: 'id must be a UUID' }).optional(),
    displayName: displayNameSchema,
    groupId: z.uuid({ error: 'groupId must be a UUID' }).nullable().optional(),
  })
  .strict();
export type SkaterCreateInput = z.infer<typeof skaterCreateSchema>;

/** What the head coach changes on a skater profile: rename, move to a group (or none), retire or bring back. */
export const skaterUpdateSchema = z
  .object({
    displayName: displayNameSchema,
    groupId: z.uuid({ error: 'groupId must be a UUID' }).nullable(),
    retired: z.boolean({ error: 'retired must be true or false' }),
  })
  .partial()
  .strict()
  .refine((value) => Object.keys(value).length > 0, { error: 'Say what to change: displayName, groupId or retired' });
export type SkaterUpdateInput = z.infer<typeof skaterUpdateSchema>;

export const groupCreateSchema = z
  .object({
    id: z.uuid({ error: 'id must be a UUID' }).optional(),
    name: displayNameSchema,
  })
  .strict();
export type GroupCreateInput = z.infer<typeof groupCreateSchema>;

/** Renaming a group (the head coach). */
export const groupUpdateSchema = z.object({ name: displayNameSchema }).strict();
export type GroupUpdateInput = z.infer<typeof groupUpdateSchema>;

export const memberSchema = z.object({
  userId: z.uuid(),
  displayName: z.string(),
  email: z.string(),
  role: roleSchema,
  skaterId: z.uuid().nullable(),
});
export type Member = z.infer<typeof memberSchema>;

export const squadSchema = z.object({
  groups: z.array(groupSchema),
  skaters: z.array(skaterSchema),
});
export type Squad = z.infer<typeof squadSchema>;

/** What the head coach decides for the whole team. */
export const teamSettingsSchema = z.object({
  /** Whether a note written at the boards is shared with its skater unless the coach says otherwise. */
  shareBoardNotes: z.boolean(),
  /**
   * The team's IANA time zone: the review's ISO weeks and days are counted in it. A copy a device
   * kept from before the setting existed reads as UTC (the server's default) instead of failing.
   */
  timeZone: z.string().default('UTC'),
});
export type TeamSettings = z.infer<typeof teamSettingsSchema>;

export const teamSettingsPatchSchema = z
  .object({ shareBoardNotes: z.boolean({ error: 'shareBoardNotes must be true or false' }), timeZone: timeZoneSchema })
  .partial()
  .strict();
export type TeamSettingsPatch = z.infer<typeof teamSettingsPatchSchema>;
