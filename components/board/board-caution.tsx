/** The board's quiet safety line: gear and blades, and who decides about injuries. */
import { StyleSheet, View } from 'react-native';

import { Text, colors, spacing } from '../ui';

export function BoardCaution() {
  return (
    <View style={styles.wrap} testID="board-caution">
      <Text variant="caption" tone="muted">
        Safety: helmet, cut-resistant gear and gloves on the ice; blade guards on off it. Injury and concussion calls belong to
        qualified professionals: if in doubt, take the skater off the ice and refer. Boardside is not medical advice.
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { borderTopWidth: 1, borderTopColor: colors.divider, paddingTop: spacing.sm },
});
