/**
 * The skater's (or guardian's) "today": a greeting for now; today's cues from every coach, read
 * aloud and acknowledged, arrive with sync.
 */
import { useSignOut } from '../../store/auth';
import { useActiveMembership, useSession } from '../../store/session';
import { Button, Heading, PlaceholderPanel, Screen, Text } from '../ui';
import { SafetyNote } from './safety-note';

export function TodayScreen() {
  const user = useSession((s) => s.user);
  const membership = useActiveMembership();
  const signOut = useSignOut();
  const firstName = user?.displayName.split(' ')[0] ?? '';
  const guardian = membership?.role === 'guardian';
  return (
    <Screen testID="skater-home">
      <Heading>{firstName ? `Hi ${firstName}` : 'Hi'}</Heading>
      <Text variant="bodyLarge" testID="skater-team">
        {guardian ? 'Following a skater in ' : 'Skating with '}
        <Text variant="bodyLarge" weight="bold">
          {membership?.teamName ?? ''}
        </Text>
      </Text>
      <PlaceholderPanel title="Today’s cues will show here" testID="today-placeholder">
        After each session your coaches’ cues for you appear here, newest first. You will be able to have them read
        aloud and tick them off, and see your lap times and targets.
      </PlaceholderPanel>
      <SafetyNote />
      <Button
        label="Sign out"
        variant="secondary"
        testID="sign-out"
        loading={signOut.isPending}
        onPress={() => signOut.mutate()}
      />
    </Screen>
  );
}
