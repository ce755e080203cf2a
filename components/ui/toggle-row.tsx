/**
 * ToggleRow: an on/off setting as one large row (box + words), announced as a switch. The box
 * shows a tick when on, so the state never rests on colour alone; the whole row is the target.
 */
import { Pressable, StyleSheet, View } from 'react-native';

import { Text } from './text';
import { colors, radius, spacing, tapTarget } from './theme';

export type ToggleRowProps = {
  label: string;
  value: boolean;
  onChange: (value: boolean) => void;
  hint?: string;
  disabled?: boolean;
  testID: string;
};

export function ToggleRow({ label, value, onChange, hint, disabled = false, testID }: ToggleRowProps) {
  return (
    <Pressable
      testID={testID}
      accessibilityRole="switch"
      accessibilityLabel={label}
      accessibilityHint={hint}
      accessibilityState={{ checked: value, disabled }}
      aria-checked={value}
      disabled={disabled}
      onPress={() => onChange(!value)}
      style={({ pressed }) => [styles.row, pressed && !disabled && styles.pressed, disabled && styles.disabled]}
    >
      <View style={[styles.box, value && styles.boxOn]}>
        {value ? (
          <Text weight="bold" tone="inverse" align="center">
            {'\u2713'}
          </Text>
        ) : null}
      </View>
      <View style={styles.words}>
        <Text weight={value ? 'bold' : 'regular'}>{label}</Text>
        {hint ? (
          <Text variant="caption" tone="muted">
            {hint}
          </Text>
        ) : null}
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    minHeight: tapTarget,
    paddingVertical: spacing.xxs,
    borderRadius: radius.md,
  },
  pressed: { backgroundColor: colors.surfaceSunken },
  disabled: { opacity: 0.7 },
  box: {
    width: 30,
    height: 30,
    borderRadius: radius.sm,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
    alignItems: 'center',
    justifyContent: 'center',
  },
  boxOn: { backgroundColor: colors.primary, borderColor: colors.primary },
  words: { flex: 1 },
});
