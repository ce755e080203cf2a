/**
 * One week: skaters x cues. Rows are the skaters with marks that week, columns the cues with
 * marks (grouped by phase in the server's order); a cell opens that skater's notes for the cue.
 */
import { ScrollView, StyleSheet, View } from 'react-native';

import { phaseLabels } from '../../shared/cues';
import type { ReviewWeek } from '../../shared/schemas/review';
import { Text, colors, spacing } from '../ui';
import { CELL_WIDTH, CountCell } from './count-cell';

const NAME_WIDTH = 160;
const COLUMN = CELL_WIDTH + 44;

export type WeekGridPick = { skaterId: string; skaterName: string; cueId: string; cueLabel: string };

export function WeekGrid({
  grid,
  subject,
  onOpenCell,
  selected,
}: {
  grid: ReviewWeek;
  subject: string;
  onOpenCell: (pick: WeekGridPick) => void;
  selected?: { skaterId: string; cueId: string } | null;
}) {
  const cell = (skaterId: string, cueId: string) =>
    grid.cells.find((c) => c.skaterId === skaterId && c.cueId === cueId) ?? { needsWork: 0, good: 0 };
  return (
    // Focusable and named, so a keyboard can scroll it sideways even when no cell is a button.
    <ScrollView
      horizontal
      focusable
      role="region"
      aria-label={`Week ${grid.week}, scrolls sideways`}
      style={styles.scroll}
      contentContainerStyle={styles.scrollContent}
    >
      <View role="table" aria-label={`Skaters by cue, ${subject}, week ${grid.week}`} testID="review-week-grid">
        <View role="row" style={[styles.row, styles.headRow]}>
          <View role="columnheader" style={styles.nameCell}>
            <Text weight="bold">Skater</Text>
          </View>
          {grid.cues.map((cue) => (
            <View role="columnheader" key={cue.cueId} style={styles.cueHead} testID={`review-week-cue-${cue.cueId}`}>
              <Text variant="caption" tone="muted">
                {phaseLabels[cue.phase]}
              </Text>
              <Text weight="bold" variant="caption">
                {cue.label}
                {cue.archived ? ' (archived)' : ''}
              </Text>
            </View>
          ))}
        </View>
        {grid.skaters.map((skater) => (
          <View role="row" key={skater.id} style={styles.row}>
            <View role="rowheader" style={styles.nameCell}>
              <Text>{skater.displayName}</Text>
            </View>
            {grid.cues.map((cue) => {
              const count = cell(skater.id, cue.cueId);
              return (
                <CountCell
                    key={cue.cueId}
                    width={COLUMN}
                    what={`${skater.displayName}, ${cue.label}`}
                    week={grid.week}
                    needsWork={count.needsWork}
                    good={count.good}
                    selected={selected?.skaterId === skater.id && selected.cueId === cue.cueId}
                    onPress={() => onOpenCell({ skaterId: skater.id, skaterName: skater.displayName, cueId: cue.cueId, cueLabel: cue.label })}
                    testID={`review-wcell-${skater.id}-${cue.cueId}`}
                  />
              );
            })}
          </View>
        ))}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flexGrow: 0 },
  scrollContent: { paddingBottom: spacing.xs },
  row: { flexDirection: 'row', alignItems: 'center', borderBottomWidth: 1, borderBottomColor: colors.divider },
  headRow: { borderBottomWidth: 2, borderBottomColor: colors.border, alignItems: 'flex-end' },
  nameCell: { width: NAME_WIDTH, paddingHorizontal: spacing.xs, paddingVertical: spacing.xxs },
  cueHead: { width: COLUMN, paddingHorizontal: spacing.xxs, paddingVertical: spacing.xxs },
});
