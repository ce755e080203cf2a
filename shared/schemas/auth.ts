/**
 * Schemas for accounts, teams, sign-in and invitations. The server parses every request body with
 * these, and the client's forms use the same ones for inline validation, so both sides always
 * agree on what is valid and on the wording of the message.
 */
import { z } from 'zod';
import { timeZoneSchema } from '../weeks';

export const roles = ['head_coach', 'coach', 'skater', 'guardian'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

/** Roles that see the whole team's data (as opposed to one skater's). */
export const coachRoles: readonly Role[] = ['head_coach', 'coach'];
export const isCoachRole = (role: Role) => coachRoles.includes(role);

export const roleLabels: Record<Role, string> = {
  head_coach: 'Head coach',
  coach: 'Coach',
  skater: 'Skater',
  guardian: 'Guardian',
};

/** bcrypt reads at most 72 bytes of a password; anything longer is refused rather than cut. */
export const PASSWORD_MAX_BYTES = 72;
export const PASSWORD_MIN_LENGTH = 8;

const utf8Length = (value: string) => new TextEncoder().encode(value).length;

export const emailSchema = z
  .string({ error: 'E-mail is required' })
  .trim()
  .toLowerCase()
  .min(1, 'E-mail is required')
  .max(254, 'E-mail must be at most 254 characters')
  .pipe(z.email({ error: 'Enter a valid e-mail address' }));

export const passwordSchema = z
  .string({ error: 'Password is required' })
  .min(PASSWORD_MIN_LENGTH, `Password must be at least ${PASSWORD_MIN_LENGTH} characters`)
  .refine((value) => utf8Length(value) <= PASSWORD_MAX_BYTES, {
    error: `Password must be at most ${PASSWORD_MAX_BYTES} bytes (shorter, or fewer accented letters and emoji)`,
  });

/** Control characters (NUL, line breaks, ...) have no place in a name; PostgreSQL refuses NUL outright. */
const hasNoControlCharacters = (value: string) => !/[\u0000-\u001f\u007f]/.test(value);

export const displayNameSchema = z
  .string({ error: 'Name is required' })
  .trim()
  // One form of each accented letter: names are compared and kept unique in NFC (shared/names.ts).
  .normalize('NFC')
  .min(1, 'Name is required')
  .max(80, 'Name must be at most 80 characters')
  .refine(hasNoControlCharacters, { error: 'Name must not contain line breaks or control characters' });

export const teamNameSchema = z
  .string({ error: 'Team name is required' })
  .trim()
  .min(2, 'Team name must be at least 2 characters')
  .max(80, 'Team name must be at most 80 characters')
  .refine(hasNoControlCharacters, { error: 'Team name must not contain line breaks or control characters' });

export const signUpSchema = z
  .object({
    email: emailSchema,
    password: passwordSchema,
    displayName: displayNameSchema,
    teamName: teamNameSchema,
    /** The new team's time zone (the browser's); UTC when absent. */
    timeZone: timeZoneSchema.optional(),
  })
  .strict();
export type SignUpInput = z.infer<typeof signUpSchema>;

export const signInSchema = z
  .object({
    email: emailSchema,
    password: z.string({ error: 'Password is required' }).min(1, 'Password is required').max(1024, 'Password is too long'),
  })
  .strict();
export type SignInInput = z.infer<typeof signInSchema>;

/** Opaque tokens from e-mailed links: base64url, fixed length range. */
export const linkTokenSchema = z
  .string({ error: 'The link is missing its token' })
  .trim()
  .regex(/^[A-Za-z0-9_-]{32,128}$/, 'The link is incomplete or damaged: open it again from the e-mail');

export const passwordResetRequestSchema = z.object({ email: emailSchema }).strict();

export const passwordResetConfirmSchema = z
  .object({ token: linkTokenSchema, password: passwordSchema })
  .strict();

export const invitableRoleSchema = z.enum(['coach', 'skater', 'guardian'], {
  error: 'Role must be coach, skater or guardian',
});

export const invitationCreateSchema = z
  .object({
    email: emailSchema,
    role: invitableRoleSchema,
    skaterId: z.uuid({ error: 'Pick the skater profile this invitation is for' }).optional(),
  })
  .strict()
  .refine((value) => value.role === 'coach' || value.skaterId !== undefined, {
    error: 'A skater or guardian invitation must name a skater profile',
    path: ['skaterId'],
  })
  // The database refuses a coach invitation linked to a skater (ck_invitations_skater_link).
  .refine((value) => value.role !== 'coach' || value.skaterId === undefined, {
    error: 'A coach invitation does not name a skater profile',
    path: ['skaterId'],
  });
export type InvitationCreateInput = z.infer<typeof invitationCreateSchema>;

export const invitationAcceptSchema = z
  .object({
    token: linkTokenSchema,
    /** Required for a new account; ignored when the e-mail already has one (it keeps its name). */
    displayName: displayNameSchema.optional(),
    password: passwordSchema,
  })
  .strict();
export type InvitationAcceptInput = z.infer<typeof invitationAcceptSchema>;

export const userSchema = z.object({
  id: z.uuid(),
  email: z.string(),
  displayName: z.string(),
});
export type User = z.infer<typeof userSchema>;

export const membershipSchema = z.object({
  teamId: z.uuid(),
  teamName: z.string(),
  role: roleSchema,
  /** The skater's own profile (skater) or the linked skater (guardian); null for coaches. */
  skaterId: z.uuid().nullable(),
});
export type Membership = z.infer<typeof membershipSchema>;

export const sessionSchema = z.object({
  accessToken: z.string(),
  expiresIn: z.number(),
  user: userSchema,
  memberships: z.array(membershipSchema),
});
export type Session = z.infer<typeof sessionSchema>;

export const invitationPreviewSchema = z.object({
  teamName: z.string(),
  role: invitableRoleSchema,
  email: z.string(),
  skaterName: z.string().nullable(),
  invitedBy: z.string(),
  /** True when an account with this e-mail exists: accepting then asks for its current password. */
  existingAccount: z.boolean(),
});
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>;

export const invitationSchema = z.object({
  id: z.uuid(),
  email: z.string(),
  role: invitableRoleSchema,
  skaterId: z.uuid().nullable(),
  createdAt: z.string(),
  expiresAt: z.string(),
  acceptedAt: z.string().nullable(),
  /** Set when the head coach withdrew the invitation: its link no longer works. */
  revokedAt: z.string().nullable(),
});
export type Invitation = z.infer<typeof invitationSchema>;
