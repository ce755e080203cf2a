/**
 * The weeks a table shows: "Earlier" / "Later" move the range by 8 weeks (off, and saying why, at
 * the limits: nothing after this week, nothing before 2000), and a from/to entry for any range of
 * up to 104 weeks. Week labels are checked with shared/weeks.ts; a wrong one is said under its field.
 */
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { reviewRangeQuerySchema } from '../../shared/schemas/review';
import { addIsoWeeks, isIsoWeek } from '../../shared/weeks';
import { Button, Text, TextField, spacing } from '../ui';

export const RANGE_STEP = 8;

/** The range moved by `weeks`, or null when it would leave the years the server counts. */
export function shiftRange(range: { from: string; to: string }, weeks: number) {
  const from = addIsoWeeks(range.from, weeks);
  const to = addIsoWeeks(range.to, weeks);
  return isIsoWeek(from) && isIsoWeek(to) ? { from, to } : null;
}

export type RangeProps = {
  /** The range on screen (the server's answer). */
  shown: { from: string; to: string };
  /** This week in the team's zone: nothing later is shown. */
  currentWeek: string;
  onRange: (range: { from: string; to: string } | null) => void;
  /** True when the default (last 8 weeks) is on screen. */
  isDefault: boolean;
  /** Short button words (a phone): "← Earlier", "Later →"; the spoken names stay whole. */
  compact?: boolean;
};

/** Earlier / the range shown / Later, above the table. */
export function RangeNav({ shown, currentWeek, onRange, isDefault, compact = false }: RangeProps) {
  const earlier = shiftRange(shown, -RANGE_STEP);
  const laterRaw = shiftRange(shown, RANGE_STEP);
  const atNewest = shown.to >= currentWeek;
  // Later stops at this week: the last step lands on it rather than in the future.
  const later =
    atNewest || !laterRaw
      ? null
      : laterRaw.to > currentWeek
        ? { from: addIsoWeeks(currentWeek, -(RANGE_STEP - 1)), to: currentWeek }
        : laterRaw;
  return (
    <View style={styles.wrap} testID="review-range">
      {compact ? (
        <Text weight="bold" testID="review-range-shown" aria-live="polite">
          {`${shown.from} to ${shown.to}`}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button
          label={compact ? '\u2190 Earlier' : `\u2190 Earlier ${RANGE_STEP} weeks`}
          accessibilityLabel={`Earlier ${RANGE_STEP} weeks`}
          variant="secondary"
          disabled={!earlier}
          accessibilityHint={earlier ? undefined : 'Not available: no earlier weeks are counted'}
          onPress={() => earlier && onRange(earlier)}
          testID="review-earlier"
        />
        {!compact ? (
          <Text weight="bold" testID="review-range-shown" aria-live="polite">
            {`${shown.from} to ${shown.to}`}
          </Text>
        ) : null}
        <Button
          label={compact ? 'Later \u2192' : `Later ${RANGE_STEP} weeks \u2192`}
          accessibilityLabel={`Later ${RANGE_STEP} weeks`}
          variant="secondary"
          disabled={!later}
          accessibilityHint={later ? undefined : 'Not available: the range already ends with this week'}
          onPress={() => later && onRange(later)}
          testID="review-later"
        />
        {!isDefault ? <Button label="Last 8 weeks" variant="quiet" onPress={() => onRange(null)} testID="review-range-reset" /> : null}
      </View>
      {!later ? (
        <Text variant="caption" tone="muted" testID="review-later-off">
          Later is off: the range already ends with this week ({currentWeek}).
        </Text>
      ) : null}
      {!earlier ? (
        <Text variant="caption" tone="muted" testID="review-earlier-off">
          Earlier is off: no weeks before 2000 are counted.
        </Text>
      ) : null}
    </View>
  );
}

/** A typed range (up to 104 weeks), checked with the server's own schema before it is asked for. */
export function RangeEntry({ shown, onRange }: Pick<RangeProps, 'shown' | 'onRange'>) {
  const [from, setFrom] = useState(shown.from);
  const [to, setTo] = useState(shown.to);
  const [errors, setErrors] = useState<{ from?: string; to?: string }>({});
  useEffect(() => {
    setFrom(shown.from);
    setTo(shown.to);
    setErrors({});
  }, [shown.from, shown.to]);

  const apply = () => {
    const asked = { from: from.trim().toUpperCase(), to: to.trim().toUpperCase() };
    const parsed = reviewRangeQuerySchema.safeParse(asked);
    if (!parsed.success) {
      const found: { from?: string; to?: string } = {};
      for (const issue of parsed.error.issues) {
        const key = issue.path[0] === 'to' ? 'to' : 'from';
        found[key] ??= issue.message;
      }
      setErrors(found);
      return;
    }
    setErrors({});
    onRange(asked);
  };

  return (
    <View style={styles.entry} testID="review-range-entry">
      <View style={styles.field}>
        <TextField
          label="From week"
          value={from}
          onChangeText={setFrom}
          error={errors.from}
          hint="like 2026-W05"
          autoCapitalize="characters"
          testID="review-from"
        />
      </View>
      <View style={styles.field}>
        <TextField
          label="To week"
          value={to}
          onChangeText={setTo}
          error={errors.to}
          autoCapitalize="characters"
          testID="review-to"
          onSubmitEditing={apply}
        />
      </View>
      <Button label="Show these weeks" variant="secondary" onPress={apply} testID="review-range-apply" style={styles.apply} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  entry: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-start', gap: spacing.sm },
  field: { width: 170 },
  apply: { marginTop: 30 },
});
