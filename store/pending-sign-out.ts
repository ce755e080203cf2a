/**
 * A sign-out this device owes the server. Signing out at the rink, with no server in reach, ends
 * the sign-in on the device at once, but the server only hears of it later: until then the
 * HttpOnly refresh cookie still names a live sign-in, and a reload would quietly bring the last
 * person back. So the sign-out is written down here first and kept until the server has answered
 * it; while it is here the app restores no session (store/session.ts), and every request waits
 * for it to be sent (store/api.ts), so a new sign-in never replaces the cookie before the old
 * sign-in was ended. Plain storage only: sending it is the API client's job.
 */

const KEY = 'boardside.pending-sign-out.v1';

export type PendingSignOut = {
  /** Whose sign-in it ends (null when not known); shown nowhere, kept for diagnosis. */
  userId: string | null;
  /** When the sign-out was asked for (ISO instant); also tells two marks apart. */
  at: string;
};

const storage = (): Storage | undefined => (typeof localStorage !== 'undefined' ? localStorage : undefined);

/**
 * Also held in memory: in a browser that refuses storage (private mode, full quota) the flag still
 * holds until the app is closed, which is all that browser allows.
 */
let inMemory: PendingSignOut | null = null;
/** Whether the last mark could not be stored: then memory, not storage, has the last word. */
let memoryOnly = false;

function parse(raw: string | null | undefined): PendingSignOut | null {
  if (!raw) return null;
  try {
    const value = JSON.parse(raw) as Partial<PendingSignOut> | null;
    if (!value || typeof value.at !== 'string') return null;
    return { userId: typeof value.userId === 'string' ? value.userId : null, at: value.at };
  } catch {
    // Unreadable: still a sign-out that was asked for. Sending one too many is harmless.
    return { userId: null, at: '' };
  }
}

/** Writes down that the sign-in of `userId` must be ended on the server. */
export function rememberSignOut(userId: string | null): PendingSignOut {
  const mark: PendingSignOut = { userId, at: new Date().toISOString() };
  inMemory = mark;
  try {
    const stored = storage();
    stored?.setItem(KEY, JSON.stringify(mark));
    memoryOnly = !stored;
  } catch {
    // The in-memory mark still holds for this run of the app.
    memoryOnly = true;
  }
  return mark;
}

/** The sign-out still owed to the server, or null. */
export function pendingSignOut(): PendingSignOut | null {
  if (memoryOnly) return inMemory;
  try {
    // Storage is shared by the tabs of this device: a sign-out in one holds in all of them.
    return parse(storage()?.getItem(KEY));
  } catch {
    return inMemory;
  }
}

/**
 * The server answered: forget the mark. With `sent`, only when it is still the mark that was sent
 * (a newer sign-out written meanwhile stays owed).
 */
export function forgetSignOut(sent?: PendingSignOut) {
  const current = pendingSignOut();
  if (sent && current && current.at !== sent.at) return;
  inMemory = null;
  memoryOnly = false;
  try {
    storage()?.removeItem(KEY);
  } catch {
    // Nothing stored.
  }
}
