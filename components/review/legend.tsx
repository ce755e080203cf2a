/** The review's legend: each mark's shape and word, so a count never rests on colour. */
import { StyleSheet, View } from 'react-native';

import { MarkShape, Text, spacing } from '../ui';

export function ReviewLegend() {
  return (
    <View style={styles.row} testID="review-legend">
      <View style={styles.item}>
        <MarkShape kind="needsWork" size={16} />
        <Text variant="caption">Needs work (count)</Text>
      </View>
      <View style={styles.item}>
        <MarkShape kind="good" size={16} />
        <Text variant="caption">Good (count)</Text>
      </View>
      <View style={styles.item}>
        <Text variant="caption" tone="muted">
          {'\u2013'} no marks that week
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md, alignItems: 'center' },
  item: { flexDirection: 'row', alignItems: 'center', gap: spacing.xxs },
});
