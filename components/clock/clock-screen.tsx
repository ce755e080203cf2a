/** The stopwatch for a pair: placeholder until the timing engine lands. */
import { StyleSheet } from 'react-native';

import { Heading, PlaceholderPanel, Screen, Text } from '../ui';

export function ClockScreen() {
  return (
    <Screen testID="clock-home" edges={[]}>
      <Heading>Clock</Heading>
      <Text numeric variant="clock" align="center" style={styles.figures} accessibilityLabel="Zero seconds">
        0:00.00
      </Text>
      <PlaceholderPanel title="Pair timing is on its way" testID="clock-placeholder">
        Pick a distance, put skaters in the inner and outer lane, start on the gun and tap each lane as they cross the
        line: lap, split, km/h and the gap to target, live.
      </PlaceholderPanel>
    </Screen>
  );
}

const styles = StyleSheet.create({ figures: { paddingVertical: 8 } });
