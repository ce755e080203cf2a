/** Loading: a calm full-page wait (session bootstrap, first query) with a spoken label. */
import { ActivityIndicator, StyleSheet, View } from 'react-native';

import { Text } from './text';
import { colors, spacing } from './theme';

export function Loading({ label = 'Loading…', testID = 'loading' }: { label?: string; testID?: string }) {
  return (
    <View style={styles.wrap} testID={testID} accessibilityRole="progressbar" accessibilityLabel={label}>
      <ActivityIndicator size="large" color={colors.primary} />
      <Text tone="muted">{label}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { flex: 1, alignItems: 'center', justifyContent: 'center', gap: spacing.md, backgroundColor: colors.background },
});
