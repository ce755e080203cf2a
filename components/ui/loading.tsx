/** Loading: a calm full-page wait (session bootstrap, first query) with a spoken label. */
import { ActivityIndicator, StyleSheet, View } from 'react-native';

import { Text } from './text';
import { colors, spacing } from './theme';

export function Loading({ label = 'Loading…', testID = 'loading' }: { label?: string; testID?: string }) {
  return (
    <View style={styles.wrap} testID={testID} role="status">
      {/* The spinner is decoration: the words beside it say what is happening. */}
      <ActivityIndicator size="large" color={colors.primary} aria-hidden />
      <Text tone="muted">{label}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { flex: 1, alignItems: 'center', justifyContent: 'center', gap: spacing.md, backgroundColor: colors.background },
});
