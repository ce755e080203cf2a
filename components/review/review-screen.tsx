/** The evening review (best on a laptop): placeholder until sync and the summaries land. */
import { Heading, PlaceholderPanel, Screen, Text } from '../ui';

export function ReviewScreen() {
  return (
    <Screen testID="review-home" edges={[]}>
      <Heading>Evening</Heading>
      <Text variant="bodyLarge">Look back on the day once everything has synced.</Text>
      <PlaceholderPanel title="Weekly summaries are on their way" testID="review-placeholder">
        Cues per skater week by week, needs-work against good, lap-time trends per distance, and tidying up the
        session: fixing mis-taps, adding notes and planning the next focus cues.
      </PlaceholderPanel>
    </Screen>
  );
}
