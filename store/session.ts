/**
 * Session state (zustand): who is signed in, their team memberships and which team is active.
 *
 * The access token is kept in memory only; a reload starts in 'loading' and `bootstrap()` trades
 * the HttpOnly refresh cookie for a fresh session (POST /api/auth/refresh). Any failure there —
 * no cookie, expired, server down — lands in 'signedOut' rather than a stuck spinner.
 * Team data itself lives in react-query, not here.
 */
import { create } from 'zustand';

import { isCoachRole, type Membership, type Session, type User } from '../shared/schemas';
import { configureApiAuth, refreshSession } from './api';

export type SessionStatus = 'loading' | 'signedOut' | 'signedIn';

export type SessionState = {
  status: SessionStatus;
  accessToken: string | null;
  user: User | null;
  memberships: Membership[];
  activeTeamId: string | null;
  setSession: (session: Session) => void;
  signOutLocally: () => void;
  setActiveTeam: (teamId: string) => void;
  bootstrap: () => Promise<void>;
};

/** Keeps the chosen team when it is still among the memberships, else the first one. */
function pickActiveTeam(memberships: Membership[], current: string | null): string | null {
  if (current && memberships.some((m) => m.teamId === current)) return current;
  return memberships[0]?.teamId ?? null;
}

let bootstrapStarted: Promise<void> | null = null;

export const useSession = create<SessionState>()((set, get) => ({
  status: 'loading',
  accessToken: null,
  user: null,
  memberships: [],
  activeTeamId: null,

  setSession: (session) =>
    set({
      status: 'signedIn',
      accessToken: session.accessToken,
      user: session.user,
      memberships: session.memberships,
      activeTeamId: pickActiveTeam(session.memberships, get().activeTeamId),
    }),

  signOutLocally: () =>
    set({ status: 'signedOut', accessToken: null, user: null, memberships: [], activeTeamId: null }),

  setActiveTeam: (teamId) => {
    if (get().memberships.some((m) => m.teamId === teamId)) set({ activeTeamId: teamId });
  },

  bootstrap: () => {
    // Once per app start: React strict mode and fast refresh may call the effect twice.
    if (!bootstrapStarted) {
      bootstrapStarted = (async () => {
        const session = await refreshSession();
        if (session) get().setSession(session);
        else get().signOutLocally();
      })();
    }
    return bootstrapStarted;
  },
}));

// The API client reads the token and reports refreshes through this bridge (no import cycle).
configureApiAuth({
  getAccessToken: () => useSession.getState().accessToken,
  onRefreshed: (session) => useSession.getState().setSession(session),
  onSignedOut: () => useSession.getState().signOutLocally(),
});

/** Test helper: forget that bootstrap ran. */
export function resetSessionForTests() {
  bootstrapStarted = null;
  useSession.setState({ status: 'loading', accessToken: null, user: null, memberships: [], activeTeamId: null });
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
