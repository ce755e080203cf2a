/**
 * The clock's caution on the ice: time from the boards, never from the track; the usual protective
 * kit; the rink's and the federation's rules come first. One line while timing (it must not push
 * the lane buttons off the screen), a short paragraph on the setup.
 */
import { StyleSheet, View } from 'react-native';

import { Text, colors, radius, spacing } from '../ui';

export function ClockCaution({ short = false }: { short?: boolean }) {
  return (
    <View style={[styles.wrap, short && styles.short]} testID="clock-caution" role="note" aria-label="Safety on the ice">
      <Text variant="caption" weight="bold" aria-hidden style={styles.glyph}>
        {'\u26A0'}
      </Text>
      {short ? (
        <Text variant="caption" style={styles.words}>
          Time from the boards only: never stand on the track.
        </Text>
      ) : (
        <Text variant="caption" style={styles.words}>
          <Text variant="caption" weight="bold">
            Time from the boards only: never stand on the track.{' '}
          </Text>
          Skaters wear the usual kit: helmet, cut-resistant gloves and clothing, shin and ankle protection where required. The
          rink’s and the federation’s rules come first.
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    flexDirection: 'row',
    gap: spacing.xs,
    padding: spacing.sm,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  short: { paddingVertical: spacing.xxs, borderWidth: 0, backgroundColor: 'transparent', paddingHorizontal: 0 },
  glyph: { color: colors.ink },
  words: { flex: 1 },
});
