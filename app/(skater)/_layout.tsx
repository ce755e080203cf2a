/** Skater group guard: signed-in skaters and guardians of the active team. */
import { Redirect, Stack } from 'expo-router';

import { Loading, colors } from '../../components/ui';
import { homeKindFor, useActiveMembership, useSession } from '../../store/session';

export default function SkaterLayout() {
  const status = useSession((s) => s.status);
  const membership = useActiveMembership();

  if (status === 'loading') return <Loading label="Signing you in…" />;
  if (status === 'signedOut') return <Redirect href="/sign-in" />;
  if (homeKindFor(membership) !== 'skater') return <Redirect href="/" />;
  return <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: colors.background } }} />;
}
