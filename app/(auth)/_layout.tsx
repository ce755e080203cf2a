/**
 * Auth group: pages for people who are not signed in. A signed-in visitor is sent home, except
 * on invitation and reset links: those must work even when someone else is signed in on this
 * device (the screens navigate home themselves once done).
 */
import { Redirect, Stack, usePathname } from 'expo-router';
import { Platform } from 'react-native';

import { Loading, colors } from '../../components/ui';
import { useSession } from '../../store/session';

/** Pages that make no sense once signed in. Invitation and reset links are deliberately absent. */
const closedWhileSignedIn = new Set(['sign-in', 'sign-up', 'forgot-password']);

export default function AuthLayout() {
  const status = useSession((s) => s.status);
  // Name the pages to leave rather than the ones to keep: on a cold load the pathname can read '/'
  // for a render before it settles, and treating that as "not exempt" bounced invitation links home.
  // On the web the address bar is the truth while the router catches up (single-page output, no
  // server rendering, so reading window here cannot cause a hydration mismatch).
  const routerPath = usePathname();
  const pathname = routerPath === '/' && Platform.OS === 'web' ? window.location.pathname : routerPath;
  const page = pathname.split('/').filter(Boolean).pop() ?? '';

  if (status === 'loading') return <Loading label="Checking your session…" />;
  if (status === 'signedIn' && closedWhileSignedIn.has(page)) return <Redirect href="/" />;

  return <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: colors.background } }} />;
}
