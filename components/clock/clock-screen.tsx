/**
 * The Clock section: not built yet. It says so plainly and points to what works today, without
 * showing figures or describing features that are not there.
 */
import { Heading, PlaceholderPanel, Screen, Text } from '../ui';

export function ClockScreen() {
  return (
    <Screen testID="clock-home" edges={[]}>
      <Heading>Clock</Heading>
      <PlaceholderPanel title="Not in this version of Boardside" testID="clock-placeholder">
        <Text tone="muted">
          Boardside does not time laps yet. Keep using your stopwatch for times; notes and cues go on the Board.
        </Text>
      </PlaceholderPanel>
    </Screen>
  );
}
