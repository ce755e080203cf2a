/**
 * Button: primary (one per screen, the main action), secondary (outlined), quiet (text-like, for
 * "Forgot password?" and "Sign out"). Always at least 48 px tall. While loading it is disabled and
 * says so to screen readers, so a double tap in gloves cannot submit twice. A disabled button looks
 * off at a glance (sunken, dashed edge, muted label), never like a live one a little paler.
 */
import { ActivityIndicator, Pressable, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';

import { Text } from './text';
import { colors, radius, spacing, tapTarget } from './theme';

export type ButtonVariant = 'primary' | 'secondary' | 'quiet';

export type ButtonProps = {
  label: string;
  onPress?: () => void;
  variant?: ButtonVariant;
  loading?: boolean;
  disabled?: boolean;
  testID?: string;
  accessibilityLabel?: string;
  accessibilityHint?: string;
  style?: StyleProp<ViewStyle>;
  /** Stretch to the container's width (forms on phones). */
  block?: boolean;
};

export function Button({
  label,
  onPress,
  variant = 'primary',
  loading = false,
  disabled = false,
  testID,
  accessibilityLabel,
  accessibilityHint,
  style,
  block = false,
}: ButtonProps) {
  const inactive = disabled || loading;
  const off = disabled && !loading;
  const ink = off ? colors.inkMuted : variant === 'primary' ? colors.onPrimary : colors.primary;
  return (
    <Pressable
      testID={testID}
      accessibilityRole="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityHint={accessibilityHint}
      accessibilityState={{ disabled: inactive, busy: loading }}
      aria-disabled={inactive}
      aria-busy={loading}
      disabled={inactive}
      onPress={onPress}
      style={({ pressed, focused }: { pressed: boolean; focused?: boolean }) => [
        styles.base,
        styles[variant],
        block && styles.block,
        pressed && !inactive && styles.pressed,
        focused && styles.focused,
        loading && styles.inactive,
        off && styles.off,
        off && variant === 'quiet' && styles.offQuiet,
        style,
      ]}
    >
      <View style={styles.row}>
        {loading ? <ActivityIndicator color={ink} accessibilityLabel="Working" /> : null}
        <Text weight="bold" style={{ color: ink }} align="center">
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: tapTarget,
    minWidth: tapTarget,
    paddingHorizontal: spacing.lg,
    paddingVertical: spacing.sm,
    borderRadius: radius.md,
    alignItems: 'center',
    justifyContent: 'center',
    borderWidth: 2,
    borderColor: 'transparent',
  },
  primary: { backgroundColor: colors.primary, borderColor: colors.primary },
  secondary: { backgroundColor: colors.surface, borderColor: colors.primary },
  quiet: { backgroundColor: 'transparent', paddingHorizontal: spacing.sm },
  block: { alignSelf: 'stretch' },
  pressed: { opacity: 0.85 },
  focused: { outlineColor: colors.focus, outlineWidth: 3, outlineStyle: 'solid', outlineOffset: 2 } as ViewStyle,
  // Dimmed but still readable: the label keeps well over 4.5:1 at this opacity.
  inactive: { opacity: 0.7 },
  // Disabled: no fill or solid edge of a live button; the muted label stays readable (7.5:1).
  off: { backgroundColor: colors.surfaceSunken, borderColor: colors.border, borderStyle: 'dashed' },
  offQuiet: { backgroundColor: 'transparent', borderColor: 'transparent' },
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
});
