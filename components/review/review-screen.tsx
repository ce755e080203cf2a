/**
 * The Evening section: not built yet. It says so plainly and points to what works today, without
 * describing summaries that are not there.
 */
import { Heading, PlaceholderPanel, Screen, Text } from '../ui';

export function ReviewScreen() {
  return (
    <Screen testID="review-home" edges={[]}>
      <Heading>Evening</Heading>
      <PlaceholderPanel title="Not in this version of Boardside" testID="review-placeholder">
        <Text tone="muted">
          There is no evening review yet. Today’s notes are on the Board, where you can open a note to change or delete
          it; Sync sends them to your team.
        </Text>
      </PlaceholderPanel>
    </Screen>
  );
}
