/**
 * Session state (zustand): who is signed in, their team memberships and which team is active.
 *
 * The access token is kept in memory only; a reload starts in 'loading' and `bootstrap()` trades
 * the HttpOnly refresh cookie for a fresh session (POST /api/auth/refresh). A refusal lands in
 * 'signedOut'. No answer at all (offline at the rink, server down) keeps the coach signed in
 * from the identity remembered on this device, with `offline` set and no token, until a later
 * `reconnect()` gets a real session (or a refusal).
 * A sign-out the server has not heard of yet (store/pending-sign-out.ts) outranks all of that: the
 * app starts signed out, neither the cookie nor the remembered identity brings anyone back, and
 * the sign-out is sent as soon as the server can be reached (store/connectivity.ts).
 * Team data itself lives in react-query, not here.
 */
import { create } from 'zustand';

import { isCoachRole, type Membership, type Session, type User } from '../shared/schemas';
import { configureApiAuth, refreshSession, sendPendingSignOut, type RefreshOutcome } from './api';
import { watchPendingSignOut } from './connectivity';
import { clearIdentity, loadIdentity, saveIdentity } from './identity-cache';
import { pendingSignOut } from './pending-sign-out';

export type SessionStatus = 'loading' | 'signedOut' | 'signedIn';

export type SessionState = {
  status: SessionStatus;
  accessToken: string | null;
  user: User | null;
  memberships: Membership[];
  activeTeamId: string | null;
  /** Signed in from this device's memory, without a server answer yet (no access token). */
  offline: boolean;
  setSession: (session: Session) => void;
  signOutLocally: () => void;
  setActiveTeam: (teamId: string) => void;
  bootstrap: () => Promise<void>;
  /** Tries the server again after an offline start; no-op when already online. */
  reconnect: () => Promise<void>;
};

/** Keeps the chosen team when it is still among the memberships, else the first one. */
function pickActiveTeam(memberships: Membership[], current: string | null): string | null {
  if (current && memberships.some((m) => m.teamId === current)) return current;
  return memberships[0]?.teamId ?? null;
}

let bootstrapStarted: Promise<void> | null = null;

/**
 * A refresh's outcome, read again after the wait: a sign-out made meanwhile (another tab, or a
 * tap while the answer was on its way) turns a new session into a refusal.
 */
const unlessSignedOutMeanwhile = (outcome: RefreshOutcome): RefreshOutcome =>
  outcome.status === 'ok' && pendingSignOut() ? { status: 'refused' } : outcome;

export const useSession = create<SessionState>()((set, get) => ({
  status: 'loading',
  accessToken: null,
  user: null,
  memberships: [],
  activeTeamId: null,
  offline: false,

  setSession: (session) => {
    const activeTeamId = pickActiveTeam(session.memberships, get().activeTeamId);
    set({
      status: 'signedIn',
      offline: false,
      accessToken: session.accessToken,
      user: session.user,
      memberships: session.memberships,
      activeTeamId,
    });
    saveIdentity({ user: session.user, memberships: session.memberships, activeTeamId });
  },

  signOutLocally: () => {
    clearIdentity();
    set({ status: 'signedOut', offline: false, accessToken: null, user: null, memberships: [], activeTeamId: null });
  },

  setActiveTeam: (teamId) => {
    const { user, memberships } = get();
    if (!memberships.some((m) => m.teamId === teamId)) return;
    set({ activeTeamId: teamId });
    if (user) saveIdentity({ user, memberships, activeTeamId: teamId });
  },

  reconnect: async () => {
    if (!get().offline) return;
    const outcome = unlessSignedOutMeanwhile(await refreshSession());
    if (outcome.status === 'ok') get().setSession(outcome.session);
    else if (outcome.status === 'refused') get().signOutLocally();
  },

  bootstrap: () => {
    // Once per app start: React strict mode and fast refresh may call the effect twice.
    if (!bootstrapStarted) {
      bootstrapStarted = (async () => {
        watchPendingSignOut();
        if (pendingSignOut()) {
          // Signed out here, the server not told yet: the sign-in form at once, and the sign-out
          // sent in the background (no spinner waiting on a rink's Wi-Fi).
          get().signOutLocally();
          void sendPendingSignOut();
          return;
        }
        const outcome = unlessSignedOutMeanwhile(await refreshSession());
        if (outcome.status === 'ok') return get().setSession(outcome.session);
        const remembered = outcome.status === 'unreachable' && !pendingSignOut() ? loadIdentity() : null;
        if (!remembered) return get().signOutLocally();
        set({
          status: 'signedIn',
          offline: true,
          accessToken: null,
          user: remembered.user,
          memberships: remembered.memberships,
          activeTeamId: pickActiveTeam(remembered.memberships, remembered.activeTeamId),
        });
      })();
    }
    return bootstrapStarted;
  },
}));

// The API client reads the token and reports refreshes through this bridge (no import cycle).
configureApiAuth({
  getAccessToken: () => useSession.getState().accessToken,
  // A refresh that was already on its way when the person signed out must not sign them back in.
  onRefreshed: (session) => {
    if (pendingSignOut()) useSession.getState().signOutLocally();
    else useSession.getState().setSession(session);
  },
  onSignedOut: () => useSession.getState().signOutLocally(),
  isSignedIn: () => useSession.getState().status === 'signedIn',
  getUserId: () => useSession.getState().user?.id ?? null,
});

/** Test helper: forget that bootstrap ran. */
export function resetSessionForTests() {
  bootstrapStarted = null;
  useSession.setState({ status: 'loading', offline: false, accessToken: null, user: null, memberships: [], activeTeamId: null });
}

/** The membership for the active team, or null. */
export function useActiveMembership(): Membership | null {
  const memberships = useSession((s) => s.memberships);
  const activeTeamId = useSession((s) => s.activeTeamId);
  return memberships.find((m) => m.teamId === activeTeamId) ?? null;
}

export type HomeKind = 'coach' | 'skater';

/** Which home a membership belongs to: coaches get the board, skaters and guardians "today". */
export function homeKindFor(membership: Membership | null): HomeKind | null {
  if (!membership) return null;
  return isCoachRole(membership.role) ? 'coach' : 'skater';
}
