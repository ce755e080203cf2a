/**
 * TextField: a labelled input with its error written underneath (not only a red border), so the
 * message is readable, announced, and tied to the field. The label is always visible above the
 * field: placeholders vanish as you type and are too faint for the rink.
 */
import { forwardRef, useState } from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';

import { Text } from './text';
import { colors, fonts, radius, spacing, tapTarget, type } from './theme';

export type TextFieldProps = Omit<TextInputProps, 'style'> & {
  label: string;
  /** Error message shown under the field; also marks the field invalid for assistive tech. */
  error?: string | null;
  /** Short help shown under the field when there is no error. */
  hint?: string;
  testID: string;
};

export const TextField = forwardRef<TextInput, TextFieldProps>(function TextField(
  { label, error, hint, testID, accessibilityLabel, onFocus, onBlur, ...inputProps },
  ref,
) {
  const [focused, setFocused] = useState(false);
  const message = error ?? hint;
  return (
    <View style={styles.wrap}>
      <Text weight="bold" nativeID={`${testID}-label`}>
        {label}
      </Text>
      <TextInput
        ref={ref}
        testID={testID}
        accessibilityLabel={accessibilityLabel ?? label}
        aria-invalid={error ? true : undefined}
        aria-describedby={message ? `${testID}-message` : undefined}
        placeholderTextColor={colors.inkMuted}
        onFocus={(event) => {
          setFocused(true);
          onFocus?.(event);
        }}
        onBlur={(event) => {
          setFocused(false);
          onBlur?.(event);
        }}
        style={[styles.input, focused && styles.inputFocused, error ? styles.inputError : null]}
        {...inputProps}
      />
      {message ? (
        <View style={styles.messageRow}>
          {error ? (
            <Text tone="error" weight="bold" variant="caption" accessibilityElementsHidden>
              {'\u26A0'}
            </Text>
          ) : null}
          <Text
            nativeID={`${testID}-message`}
            testID={error ? `${testID}-error` : `${testID}-hint`}
            tone={error ? 'error' : 'muted'}
            variant="caption"
            weight={error ? 'bold' : 'regular'}
            aria-live={error ? 'polite' : undefined}
            style={styles.message}
          >
            {message}
          </Text>
        </View>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: spacing.xs, alignSelf: 'stretch' },
  input: {
    ...type.body,
    fontFamily: fonts.regular,
    color: colors.ink,
    minHeight: tapTarget + 4,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.sm,
    borderWidth: 2,
    borderColor: colors.border,
    borderRadius: radius.md,
    backgroundColor: colors.surface,
  },
  inputFocused: { borderColor: colors.focus },
  inputError: { borderColor: colors.error },
  messageRow: { flexDirection: 'row', gap: spacing.xxs, alignItems: 'flex-start' },
  message: { flex: 1 },
});
