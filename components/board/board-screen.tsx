/**
 * The board: the coach's home at the rink. For now a welcome and a preview of the two marks; the
 * skater tiles and cue chips arrive with the local database.
 */
import { StyleSheet, View } from 'react-native';

import { useActiveMembership, useSession } from '../../store/session';
import { Heading, MarkBadge, PlaceholderPanel, Screen, Text, spacing } from '../ui';

export function BoardScreen() {
  const user = useSession((s) => s.user);
  const membership = useActiveMembership();
  const firstName = user?.displayName.split(' ')[0] ?? '';
  return (
    <Screen testID="coach-home" edges={[]}>
      <Heading>Board</Heading>
      <Text variant="bodyLarge">
        {firstName ? `Hello ${firstName}. ` : ''}This is where you will note cues for {membership?.teamName ?? 'your team'} at
        the boards.
      </Text>
      <PlaceholderPanel title="Skater tiles and cue chips are on their way" testID="board-placeholder">
        <Text tone="muted">
          Soon: tap a skater, tap one or more cues, and each tap is saved on this device at once, even with no network.
          Every note carries one of two marks:
        </Text>
        <View style={styles.marks}>
          <MarkBadge kind="needsWork" testID="mark-needs-work" />
          <MarkBadge kind="good" testID="mark-good" />
        </View>
      </PlaceholderPanel>
      <Text tone="muted" variant="caption">
        Meanwhile, set up your squad: add skaters and invite your assistant coaches under Squad.
      </Text>
    </Screen>
  );
}

const styles = StyleSheet.create({ marks: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap' } });
