/**
 * "Offline", said in a word beside a hollow ring: offline is told by text, never by colour alone.
 * Used wherever a screen keeps working from the device (the board, the skater's today page).
 */
import { StyleSheet, View } from 'react-native';

import { Text } from './text';
import { colors, radius, spacing } from './theme';

export function OfflineBadge({ testID, accessibilityLabel, large = false }: { testID: string; accessibilityLabel: string; large?: boolean }) {
  return (
    <View style={styles.badge} testID={testID} accessibilityLabel={accessibilityLabel}>
      <View style={large ? styles.ringLarge : styles.ring} />
      <Text weight="bold" variant={large ? 'body' : 'caption'}>
        Offline
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xxs,
    paddingHorizontal: spacing.sm,
    paddingVertical: 2,
    borderRadius: radius.pill,
    borderWidth: 2,
    borderColor: colors.ink,
    backgroundColor: colors.surface,
  },
  ring: { width: 10, height: 10, borderRadius: 5, borderWidth: 2, borderColor: colors.ink },
  ringLarge: { width: 12, height: 12, borderRadius: 6, borderWidth: 2, borderColor: colors.ink },
});
