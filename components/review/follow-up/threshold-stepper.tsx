/**
 * The follow-up's threshold: how many "needs work" marks in a week make a cue stressed (1 to 20).
 * Two 48 px buttons around the figure; at either end the button is off and says why.
 */
import { StyleSheet, View } from 'react-native';

import { MAX_STRESS_THRESHOLD, MIN_STRESS_THRESHOLD } from '../../../shared/follow-up';
import { Button, Text, colors, radius, spacing, tapTarget } from '../../ui';

export function ThresholdStepper({ value, onChange }: { value: number; onChange: (next: number) => void }) {
  const lower = value > MIN_STRESS_THRESHOLD;
  const higher = value < MAX_STRESS_THRESHOLD;
  return (
    <View style={styles.wrap} testID="follow-up-threshold">
      <Text weight="bold" nativeID="follow-up-threshold-label">
        Stressed at
      </Text>
      <View style={styles.row}>
        <Button
          label={'\u2212'}
          variant="secondary"
          accessibilityLabel={`One mark fewer (now ${value})`}
          accessibilityHint={lower ? undefined : `Not available: ${MIN_STRESS_THRESHOLD} is the lowest`}
          disabled={!lower}
          onPress={() => lower && onChange(value - 1)}
          style={styles.step}
          testID="follow-up-threshold-down"
        />
        <View style={styles.value}>
          <Text variant="title" weight="bold" numeric aria-live="polite" testID="follow-up-threshold-value">
            {String(value)}
          </Text>
        </View>
        <Button
          label="+"
          variant="secondary"
          accessibilityLabel={`One mark more (now ${value})`}
          accessibilityHint={higher ? undefined : `Not available: ${MAX_STRESS_THRESHOLD} is the highest`}
          disabled={!higher}
          onPress={() => higher && onChange(value + 1)}
          style={styles.step}
          testID="follow-up-threshold-up"
        />
        <Text style={styles.words}>{`\u201Cneeds work\u201D ${value === 1 ? 'mark' : 'marks'} or more in a week`}</Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.xxs },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.xs },
  step: { width: tapTarget, paddingHorizontal: 0 },
  value: {
    minWidth: tapTarget,
    minHeight: tapTarget,
    alignItems: 'center',
    justifyContent: 'center',
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.divider,
    backgroundColor: colors.surface,
  },
  words: { flexShrink: 1 },
});
