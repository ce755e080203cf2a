/**
 * One stressed cue of a week and what followed: the verdict (sign and word) with its counts in
 * the same sentence, then a small table, the stressed week and the four after it, each with the
 * cue's good marks out of all its marks and the mean lap of the skater's most-timed distance
 * (with how many runs). A week that has not begun says "to come". Real table semantics for screen
 * readers; on a phone the same four columns, narrower.
 */
import { StyleSheet, View } from 'react-native';

import { phaseLabels } from '../../../shared/cues';
import type { FollowUpItem, FollowUpReply } from '../../../shared/schemas/review-follow-up';
import { Text, colors, radius, spacing } from '../../ui';
import { weekHeading, weekSpanText } from '../format';
import { goodOf, lapCell, lapSentence, verdictSentence, verdictSigns } from './words';

export const itemKey = (item: Pick<FollowUpItem, 'cueId' | 'week'>) => `${item.cueId}-${item.week}`;

export function FollowUpItemCard({
  item,
  basis,
  compact,
  skaterId,
}: {
  item: FollowUpItem;
  basis: FollowUpReply['lapBasis'];
  compact: boolean;
  /** In the whole group's list: the skater, so two skaters' cards of one cue and week keep apart. */
  skaterId?: string;
}) {
  const id = `follow-up-item-${skaterId ? `${skaterId}-` : ''}${itemKey(item)}`;
  const sign = verdictSigns[item.verdict];
  const rows = [
    { week: item.week, label: 'Stressed', needsWork: item.needsWork, good: item.good, counted: true, laps: item.laps },
    ...item.after.map((a, i) => ({ ...a, label: `+${i + 1}` })),
  ];
  return (
    <View style={styles.card} testID={id}>
      <View style={styles.head}>
        <Text variant="title" weight="bold">
          {item.label}
        </Text>
        <Text tone="muted">{`${phaseLabels[item.phase]}${item.archived ? ' · archived cue' : ''}`}</Text>
      </View>
      <Text testID={`${id}-stressed`}>
        {`Stressed in ${item.week} (${weekSpanText(item.week)}): ${item.needsWork} needs work, ${item.good} good.`}
      </Text>
      <View style={[styles.verdict, styles[item.verdict === 'not enough data' ? 'unknown' : item.verdict]]} testID={`${id}-verdict`}>
        <Text variant="bodyLarge" weight="bold">
          <Text aria-hidden>{`${sign.glyph} `}</Text>
          {sign.word}
        </Text>
        <Text testID={`${id}-counts`}>{verdictSentence(item)}</Text>
      </View>
      <View role="table" aria-label={`${item.label}, stressed in ${item.week}: the week and the four after it`} style={styles.table}>
        <View role="row" style={[styles.row, styles.headRow]}>
          <Cell head first compact={compact}>
            Week
          </Cell>
          <Cell head compact={compact}>
            Good / marks
          </Cell>
          <Cell head compact={compact}>
            Mean lap
          </Cell>
        </View>
        {rows.map((row) => {
          const heading = weekHeading(row.week);
          const marks = row.needsWork + row.good;
          return (
            <View role="row" key={row.week} style={[styles.row, row.label === 'Stressed' && styles.stressedRow]} testID={`${id}-week-${row.week}`}>
              <Cell first compact={compact}>{`${row.label === 'Stressed' ? 'Stressed' : row.label} · ${heading.number} ${heading.monday}`}</Cell>
              <Cell compact={compact} testID={`${id}-week-${row.week}-marks`}>
                {row.counted ? goodOf(row.good, marks) : 'to come'}
              </Cell>
              <Cell compact={compact} testID={`${id}-week-${row.week}-laps`}>
                {row.counted ? lapCell(row.laps) : 'to come'}
              </Cell>
            </View>
          );
        })}
      </View>
      <Text variant="caption" testID={`${id}-laps`}>
        {lapSentence(item, basis)}
      </Text>
    </View>
  );
}

function Cell({ children, head = false, first = false, compact, testID }: { children: string; head?: boolean; first?: boolean; compact: boolean; testID?: string }) {
  return (
    <View role={head ? 'columnheader' : first ? 'rowheader' : 'cell'} style={[styles.cell, first && (compact ? styles.firstCompact : styles.first)]} testID={testID}>
      <Text variant="caption" weight={head || first ? 'bold' : 'regular'} tone={head ? 'muted' : 'default'}>
        {children}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    gap: spacing.xs,
    padding: spacing.md,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.divider,
    backgroundColor: colors.surface,
  },
  head: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'baseline', gap: spacing.sm },
  verdict: { gap: spacing.xxs, paddingVertical: spacing.xs, paddingHorizontal: spacing.sm, borderRadius: radius.md, borderLeftWidth: 6 },
  // The verdict's edge differs by word (the word is always there: never colour alone).
  fading: { borderLeftColor: colors.primary, backgroundColor: colors.surfaceSunken },
  persisting: { borderLeftColor: colors.ink, backgroundColor: colors.surfaceSunken },
  unknown: { borderLeftColor: colors.divider, backgroundColor: colors.surfaceSunken },
  table: { borderTopWidth: 2, borderTopColor: colors.primary },
  row: { flexDirection: 'row', alignItems: 'center', minHeight: 36, borderBottomWidth: 1, borderBottomColor: colors.divider },
  headRow: { minHeight: 32 },
  stressedRow: { backgroundColor: colors.surfaceSunken },
  cell: { flex: 1, paddingHorizontal: spacing.xxs, paddingVertical: 4 },
  first: { flex: 1.3 },
  firstCompact: { flex: 1.2 },
});
