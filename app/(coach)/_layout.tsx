/** Coach group guard: only signed-in head coaches and coaches of the active team get in. */
import { Redirect } from 'expo-router';

import { CoachShell } from '../../components/coach/coach-shell';
import { Loading } from '../../components/ui';
import { homeKindFor, useActiveMembership, useSession } from '../../store/session';

export default function CoachLayout() {
  const status = useSession((s) => s.status);
  const membership = useActiveMembership();

  if (status === 'loading') return <Loading label="Signing you in…" />;
  if (status === 'signedOut') return <Redirect href="/sign-in" />;
  if (homeKindFor(membership) !== 'coach') return <Redirect href="/" />;
  return <CoachShell />;
}
