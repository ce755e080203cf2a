/**
 * Coach group guard: only signed-in head coaches and coaches of the active team get in. The
 * device database opens here (one tab owns it), and connectivity is watched so an offline start
 * turns into a real session as soon as the server answers.
 */
import { Redirect } from 'expo-router';

import { CoachShell } from '../../components/coach/coach-shell';
import { DeviceGate } from '../../components/coach/device-gate';
import { Loading } from '../../components/ui';
import { useConnectivityWatch } from '../../store/connectivity';
import { homeKindFor, useActiveMembership, useSession } from '../../store/session';

const reconnect = () => void useSession.getState().reconnect();

export default function CoachLayout() {
  const status = useSession((s) => s.status);
  const membership = useActiveMembership();
  useConnectivityWatch(reconnect);

  if (status === 'loading') return <Loading label="Signing you in…" />;
  if (status === 'signedOut') return <Redirect href="/sign-in" />;
  if (homeKindFor(membership) !== 'coach') return <Redirect href="/" />;
  return (
    <DeviceGate>
      <CoachShell />
    </DeviceGate>
  );
}
