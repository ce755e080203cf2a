/** Schemas for the squad: skater groups, skater profiles and team members. */
import { z } from 'zod';
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
});
export type TeamSettings = z.infer<typeof teamSettingsSchema>;

export const teamSettingsPatchSchema = z
  .object({ shareBoardNotes: z.boolean({ error: 'shareBoardNotes must be true or false' }) })
  .partial()
  .strict();
export type TeamSettingsPatch = z.infer<typeof teamSettingsPatchSchema>;
