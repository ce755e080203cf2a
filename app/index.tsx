/** Entry: sends each person to their home by session and role. */
import { Redirect } from 'expo-router';

import { Loading } from '../components/ui';
import { homeKindFor, useActiveMembership, useSession } from '../store/session';
import { NoTeamScreen } from '../components/auth/no-team-screen';

export default function Index() {
  const status = useSession((s) => s.status);
  const membership = useActiveMembership();

  if (status === 'loading') return <Loading label="Signing you in…" />;
  if (status === 'signedOut') return <Redirect href="/sign-in" />;

  const home = homeKindFor(membership);
  if (home === 'coach') return <Redirect href="/board" />;
  if (home === 'skater') return <Redirect href="/today" />;
  return <NoTeamScreen />;
}
