/**
 * Skater group guard: signed-in skaters and guardians of the active team. Like the coach area, the
 * device database opens here (one tab owns it), so the skater's cues stay readable offline; the
 * device gets everything through pull, run by the sync triggers inside the gate.
 */
import { useQueryClient } from '@tanstack/react-query';
import { Redirect, Stack } from 'expo-router';
import { useCallback } from 'react';

import { DeviceGate } from '../../components/coach/device-gate';
import { Loading, colors } from '../../components/ui';
import { useConnectivityWatch } from '../../store/connectivity';
import { homeKindFor, useActiveMembership, useSession } from '../../store/session';
import { useSyncTriggers } from '../../store/sync-status';
import { refreshToday } from '../../store/today';

const reconnect = () => void useSession.getState().reconnect();

/** Runs sync for the active team while the skater area is open (inside the gate: the store is open). */
function SkaterArea() {
  const membership = useActiveMembership();
  const client = useQueryClient();
  const onChanged = useCallback(() => void refreshToday(client), [client]);
  useSyncTriggers(membership?.teamId, onChanged);
  return <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: colors.background } }} />;
}

export default function SkaterLayout() {
  const status = useSession((s) => s.status);
  const membership = useActiveMembership();
  useConnectivityWatch(reconnect);

  if (status === 'loading') return <Loading label="Signing you in…" />;
  if (status === 'signedOut') return <Redirect href="/sign-in" />;
  if (homeKindFor(membership) !== 'skater') return <Redirect href="/" />;
  return (
    <DeviceGate>
      <SkaterArea />
    </DeviceGate>
  );
}
