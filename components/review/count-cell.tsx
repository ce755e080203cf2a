/**
 * One count cell of a review table: the "needs work" and "good" counts of a cue in a week, each
 * with its mark's shape and a large figure (never colour alone; the legend gives the words). A
 * cell with notes behind it that can be opened is a button named like
 * "Sit lower, week 2026-W14: 3 needs work, 1 good"; an empty week shows a quiet dash.
 */
import { memo } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { MarkShape, Text, colors, marks, radius, spacing } from '../ui';
import { cellName } from './format';

export const CELL_WIDTH = 60;

export type CountCellProps = {
  what: string;
  week: string;
  needsWork: number;
  good: number;
  selected?: boolean;
  onPress?: () => void;
  /** Column width (the one-week table's cue columns are wider than week columns). */
  width?: number;
  testID: string;
};

export const CountCell = memo(function CountCell({ what, week, needsWork, good, selected = false, onPress, width = CELL_WIDTH, testID }: CountCellProps) {
  const name = cellName(what, week, needsWork, good);
  const empty = needsWork + good === 0;
  const body = empty ? (
    <Text tone="muted" align="center" aria-hidden>
      {'\u2013'}
    </Text>
  ) : (
    <View style={styles.counts} aria-hidden>
      {needsWork > 0 ? (
        <View style={styles.count}>
          <MarkShape kind="needsWork" size={14} />
          <Text numeric variant="title" style={{ color: marks.needsWork.ink }} testID={`${testID}-nw`}>
            {needsWork}
          </Text>
        </View>
      ) : null}
      {good > 0 ? (
        <View style={styles.count}>
          <MarkShape kind="good" size={14} />
          <Text numeric variant="title" style={{ color: marks.good.ink }} testID={`${testID}-good`}>
            {good}
          </Text>
        </View>
      ) : null}
    </View>
  );
  if (onPress && !empty) {
    // The figures sit under a button that covers them: the button's name says the cue, the week
    // and both counts in words, and the bare figures ("2", "1") are not read out a second time.
    return (
      <View role="cell" style={[styles.cell, { width }]}>
        <View style={[styles.box, styles.live, selected && styles.selected]}>{body}</View>
        <Pressable
          testID={testID}
          accessibilityRole="button"
          accessibilityLabel={name}
          accessibilityState={{ selected }}
          aria-pressed={selected}
          onPress={onPress}
          style={({ pressed }) => [styles.cover, pressed && styles.pressed]}
        />
      </View>
    );
  }
  return (
    <View role="cell" style={[styles.cell, { width }]}>
      <View testID={testID} aria-label={name} role="img" style={[styles.box, !empty && styles.still]}>
        {body}
      </View>
    </View>
  );
});

const styles = StyleSheet.create({
  cell: { padding: 2 },
  box: { minHeight: 52, borderRadius: radius.sm, alignItems: 'center', justifyContent: 'center', paddingVertical: 2 },
  live: { backgroundColor: colors.surface, borderWidth: 2, borderColor: colors.divider },
  still: { backgroundColor: colors.surface },
  selected: { borderColor: colors.primary, borderWidth: 3, backgroundColor: colors.surfaceSunken },
  pressed: { backgroundColor: 'rgba(14, 59, 82, 0.12)' },
  cover: { position: 'absolute', top: 2, left: 2, right: 2, bottom: 2, borderRadius: radius.sm },
  counts: { alignItems: 'flex-start', gap: 0 },
  count: { flexDirection: 'row', alignItems: 'center', gap: spacing.xxs },
});
