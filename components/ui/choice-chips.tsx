/**
 * ChoiceChips: a single-choice group of large chips (role, group, skater profile). Rendered as a
 * radio group so screen readers announce "selected"; the selected chip also gets a tick and a
 * heavier border, not just a colour change.
 */
import { Pressable, StyleSheet, View } from 'react-native';

import { Text } from './text';
import { colors, radius, spacing, tapTarget } from './theme';

export type Choice<T extends string> = { value: T; label: string; testID: string };

export type ChoiceChipsProps<T extends string> = {
  label: string;
  choices: readonly Choice<T>[];
  value: T | null;
  onChange: (value: T) => void;
  error?: string | null;
  testID?: string;
};

export function ChoiceChips<T extends string>({ label, choices, value, onChange, error, testID }: ChoiceChipsProps<T>) {
  return (
    <View style={styles.wrap} testID={testID}>
      <Text weight="bold">{label}</Text>
      <View style={styles.row} accessibilityRole="radiogroup" accessibilityLabel={label}>
        {choices.map((choice) => {
          const selected = choice.value === value;
          return (
            <Pressable
              key={choice.value}
              testID={choice.testID}
              accessibilityRole="radio"
              accessibilityLabel={choice.label}
              accessibilityState={{ selected, checked: selected }}
              aria-checked={selected}
              onPress={() => onChange(choice.value)}
              style={[styles.chip, selected && styles.chipSelected]}
            >
              <Text weight={selected ? 'bold' : 'regular'} tone={selected ? 'inverse' : 'default'}>
                {selected ? '\u2713 ' : ''}
                {choice.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <Text tone="error" variant="caption" weight="bold" testID={testID ? `${testID}-error` : undefined}>
          {'\u26A0 '}
          {error}
        </Text>
      ) : null}
    </View>
  );
}

/** A chip's look, off and on: also used by chips that toggle (several picked) rather than choose one. */
export const chipStyles = StyleSheet.create({
  chip: {
    minHeight: tapTarget,
    paddingHorizontal: spacing.md,
    justifyContent: 'center',
    borderRadius: radius.pill,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  chipOn: { backgroundColor: colors.primary, borderColor: colors.primary },
});

const styles = StyleSheet.create({
  wrap: { gap: spacing.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  chip: chipStyles.chip,
  chipSelected: chipStyles.chipOn,
});
