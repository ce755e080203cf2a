import { useLocalSearchParams } from 'expo-router';

import { AcceptInviteScreen } from '../../components/auth/accept-invite-screen';

export default function AcceptInviteRoute() {
  const { token } = useLocalSearchParams<{ token?: string }>();
  return <AcceptInviteScreen token={typeof token === 'string' ? token : ''} />;
}
