/**
 * Who was signed in on this device, remembered so that a reload at the rink without a network
 * still opens the board. Holds only the user's name, e-mail and team memberships: never a token.
 * The server still decides everything once it is reachable again.
 */
import { z } from 'zod';
import { membershipSchema, userSchema, type Membership, type User } from '../shared/schemas';

const KEY = 'boardside.identity.v1';

const identitySchema = z.object({
  user: userSchema,
  memberships: z.array(membershipSchema),
  activeTeamId: z.string().nullable(),
});
export type CachedIdentity = z.infer<typeof identitySchema>;

const storage = (): Storage | undefined => (typeof localStorage !== 'undefined' ? localStorage : undefined);

export function saveIdentity(identity: { user: User; memberships: Membership[]; activeTeamId: string | null }) {
  try {
    storage()?.setItem(KEY, JSON.stringify(identity));
  } catch {
    // Private mode or full storage: offline reloads then ask to sign in again, nothing worse.
  }
}

export function loadIdentity(): CachedIdentity | null {
  try {
    const raw = storage()?.getItem(KEY);
    if (!raw) return null;
    const parsed = identitySchema.safeParse(JSON.parse(raw));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}

export function clearIdentity() {
  try {
    storage()?.removeItem(KEY);
  } catch {
    // Nothing to clear.
  }
}
