/**
 * A lane's armband: the trade's own colours (white for the inner lane, red for the outer) drawn as
 * a band, always beside the word, so the lane is never told by colour alone. A training group's
 * skaters get a numbered band instead (no lane).
 */
import { StyleSheet, View } from 'react-native';

import { Text, colors, radius, spacing } from '../ui';
import { laneWord, type ClockLane } from './clock-math';

/** Armband red: 6.1:1 on white, so the band's edge reads as a shape (non-text needs 3:1). */
export const ARMBAND_RED = '#B3152B';

export function Armband({
  lane,
  number,
  size = 'md',
  bandOnly = false,
  testID,
}: {
  lane: ClockLane;
  number?: number;
  size?: 'sm' | 'md';
  /** A group's numbered band without the words (the name follows it); never for a lane colour. */
  bandOnly?: boolean;
  testID?: string;
}) {
  const small = size === 'sm';
  const word = lane === 'group' ? `Skater ${number ?? ''}`.trim() : laneWord(lane);
  return (
    <View style={styles.row} testID={testID}>
      <View
        style={[
          styles.band,
          small && styles.bandSmall,
          lane === 'inner' && styles.inner,
          lane === 'outer' && styles.outer,
          lane === 'group' && styles.group,
        ]}
        // The word beside it says the lane; the band is its picture.
        aria-hidden
      >
        {lane === 'group' && number ? (
          <Text variant="caption" weight="bold" tone="inverse" align="center">
            {String(number)}
          </Text>
        ) : null}
      </View>
      {bandOnly && lane === 'group' ? null : (
        <Text weight="bold" variant={small ? 'caption' : 'body'}>
          {word}
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  band: { width: 40, height: 22, borderRadius: radius.sm, borderWidth: 2, justifyContent: 'center' },
  bandSmall: { width: 30, height: 18 },
  inner: { backgroundColor: '#FFFFFF', borderColor: colors.ink },
  outer: { backgroundColor: ARMBAND_RED, borderColor: ARMBAND_RED },
  group: { backgroundColor: colors.primary, borderColor: colors.primary },
});
