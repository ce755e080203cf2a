/**
 * Cues x ISO weeks as a table (one skater, or summed over a group): rows grouped under their
 * phase's heading, a column per week of the range (empty weeks too), and a trend sign with its
 * word per row. Screen readers get real table semantics (table, rows, column and row headers,
 * cells); a cell that can be opened is a button named with its cue, week and both counts.
 */
import { Fragment, useRef } from 'react';
import { Platform, ScrollView, StyleSheet, View, type ViewStyle } from 'react-native';

import { phaseLabels, phases } from '../../shared/cues';
import type { ReviewMatrix, ReviewRow } from '../../shared/schemas/review';
import { Text, colors, spacing } from '../ui';
import { CELL_WIDTH, CountCell } from './count-cell';
import { trendSigns, weekHeading } from './format';

const CUE_WIDTH = 150;
const CUE_WIDTH_COMPACT = 124;
const TREND_WIDTH = 112;

export type CellPick = { cueId: string; cueLabel: string; week: string };

export type WeekMatrixProps = {
  matrix: ReviewMatrix;
  /** What the table shows ("Anna Reede", "All skaters"), for its accessible name. */
  subject: string;
  /** When given, cells with marks open their notes. */
  onOpenCell?: (pick: CellPick) => void;
  selected?: { cueId: string; week: string } | null;
  /** A phone: the trend sits under the cue's name (its own column would leave room for one week). */
  compact?: boolean;
};

/** `position: sticky` is web CSS that react-native's types do not list; native ignores it. */
const sticky = (Platform.OS === 'web' ? { position: 'sticky', left: 0 } : {}) as ViewStyle;

const countOf = (row: ReviewRow, week: string) => row.counts.find((c) => c.week === week) ?? { needsWork: 0, good: 0 };

export function WeekMatrix({ matrix, subject, onOpenCell, selected, compact = false }: WeekMatrixProps) {
  const byPhase = phases.map((phase) => ({ phase, rows: matrix.rows.filter((r) => r.phase === phase) })).filter((p) => p.rows.length);
  const colspan = matrix.weeks.length + (compact ? 1 : 2);
  const cueWidth = { width: compact ? CUE_WIDTH_COMPACT : CUE_WIDTH };
  // A table wider than the screen (a phone) opens at its right end: the newest weeks and the trend.
  const scroller = useRef<ScrollView>(null);
  const scrolledFor = useRef('');
  const range = `${matrix.from}/${matrix.to}`;
  return (
    // Focusable and named, so a keyboard can scroll it sideways even when no cell is a button
    // (the whole group's counts open nothing).
    <ScrollView
      horizontal
      focusable
      role="region"
      aria-label={`Weeks ${matrix.from} to ${matrix.to}, scrolls sideways`}
      ref={scroller}
      style={styles.scroll}
      contentContainerStyle={styles.scrollContent}
      onContentSizeChange={() => {
        if (scrolledFor.current === range) return;
        scrolledFor.current = range;
        scroller.current?.scrollToEnd({ animated: false });
      }}
    >
      <View role="table" aria-label={`Cues by week, ${subject}, ${matrix.from} to ${matrix.to}`} testID="review-matrix">
        <View role="row" style={[styles.row, styles.headRow]}>
          <View role="columnheader" style={[styles.cueCell, cueWidth]}>
            <Text weight="bold">{compact ? 'Cue, trend' : 'Cue'}</Text>
          </View>
          {matrix.weeks.map((week) => {
            const head = weekHeading(week);
            return (
              <View role="columnheader" key={week} style={styles.weekHead} testID={`review-week-head-${week}`}>
                <Text weight="bold" align="center">
                  {head.number}
                </Text>
                <Text variant="caption" tone="muted" align="center">
                  {head.monday}
                </Text>
              </View>
            );
          })}
          {compact ? null : (
            <View role="columnheader" style={styles.trendCell}>
              <Text weight="bold">Trend</Text>
            </View>
          )}
        </View>
        {byPhase.map(({ phase, rows }) => (
          <Fragment key={phase}>
            <View role="row" style={styles.phaseRow}>
              <View role="rowheader" aria-colspan={colspan} style={styles.phaseCell} testID={`review-phase-${phase}`}>
                <View style={styles.stickyPhase}>
                  <Text weight="bold" variant="bodyLarge">
                    {phaseLabels[phase]}
                  </Text>
                </View>
              </View>
            </View>
            {rows.map((row) => {
              const trend = trendSigns[row.trend];
              return (
                <View role="row" key={row.cueId} style={styles.row} testID={`review-row-${row.cueId}`}>
                  <View role="rowheader" style={[styles.cueCell, cueWidth]}>
                    <Text>{row.label}</Text>
                    {row.archived ? (
                      <Text variant="caption" tone="muted">
                        (archived cue)
                      </Text>
                    ) : null}
                    {compact ? (
                      <Text variant="caption" weight="bold" testID={`review-trend-${row.cueId}`}>
                        <Text aria-hidden>{trend.glyph} </Text>
                        {trend.word}
                      </Text>
                    ) : null}
                  </View>
                  {matrix.weeks.map((week) => {
                    const count = countOf(row, week);
                    return (
                      <CountCell
                        key={week}
                        what={row.label}
                        week={week}
                        needsWork={count.needsWork}
                        good={count.good}
                        selected={selected?.cueId === row.cueId && selected.week === week}
                        onPress={onOpenCell ? () => onOpenCell({ cueId: row.cueId, cueLabel: row.label, week }) : undefined}
                        testID={`review-cell-${row.cueId}-${week}`}
                      />
                    );
                  })}
                  {compact ? null : (
                    <View role="cell" style={styles.trendCell} testID={`review-trend-${row.cueId}`}>
                      <Text weight="bold">
                        <Text aria-hidden>{trend.glyph} </Text>
                        {trend.word}
                      </Text>
                    </View>
                  )}
                </View>
              );
            })}
          </Fragment>
        ))}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flexGrow: 0 },
  scrollContent: { paddingBottom: spacing.xs },
  row: { flexDirection: 'row', alignItems: 'center', borderBottomWidth: 1, borderBottomColor: colors.divider },
  headRow: { borderBottomWidth: 2, borderBottomColor: colors.border },
  phaseRow: { flexDirection: 'row', backgroundColor: colors.surfaceSunken },
  phaseCell: { paddingVertical: spacing.xs, paddingHorizontal: spacing.xs, flex: 1 },
  // The cue names stay put while a narrow screen scrolls the weeks under them (CSS sticky on the web).
  cueCell: {
    paddingHorizontal: spacing.xs,
    paddingVertical: spacing.xxs,
    alignSelf: 'stretch',
    justifyContent: 'center',
    backgroundColor: colors.surface,
    zIndex: 1,
    ...sticky,
  },
  stickyPhase: { alignSelf: 'flex-start', ...sticky },
  weekHead: { width: CELL_WIDTH, paddingVertical: spacing.xxs },
  trendCell: { width: TREND_WIDTH, paddingHorizontal: spacing.xs },
});
