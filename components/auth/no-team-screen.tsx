/**
 * Shown to a signed-in person who belongs to no team (their last membership was removed), so they
 * see what happened and how to get back in instead of an empty app.
 */
import { Banner, Button, Heading, Screen, Text } from '../ui';
import { useSignOut } from '../../store/auth';

export function NoTeamScreen() {
  const signOut = useSignOut();
  return (
    <Screen width="form" centered testID="no-team">
      <Heading>No team yet</Heading>
      <Banner kind="info">
        Your account is not part of any team right now. Ask your coach for a new invitation, or start your own team.
      </Banner>
      <Text tone="muted">Signed in with an account that has no team.</Text>
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
