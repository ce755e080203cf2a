/**
 * Skater tiles: the biggest targets on the board. Tap toggles a skater in or out of the current
 * pick; several picked make a group cue. A row of group chips narrows the tiles; the pick line
 * names everyone picked (also those a filter hides) and clears them in one tap.
 */
import { Pressable, StyleSheet, View } from 'react-native';

import type { Group, Skater } from '../../shared/schemas';
import type { GroupFilter } from '../../store/board-ui';
import { Button, Text, colors, radius, spacing } from '../ui';
import { joinNames, plural } from './format';
import { Grid } from './grid';

export const TILE_MIN_HEIGHT = 104;

export type SkaterTilesProps = {
  skaters: Skater[];
  groups: Group[];
  selected: string[];
  counts: Record<string, number>;
  group: GroupFilter;
  onToggle: (id: string) => void;
  onClear: () => void;
  onGroup: (group: GroupFilter) => void;
};

export function SkaterTiles({ skaters, groups, selected, counts, group, onToggle, onClear, onGroup }: SkaterTilesProps) {
  const groupName = new Map(groups.map((g) => [g.id, g.name]));
  const ungrouped = skaters.some((s) => !s.groupId || !groupName.has(s.groupId));
  const shown = skaters.filter((s) =>
    group === 'all' ? true : group === 'none' ? !s.groupId || !groupName.has(s.groupId) : s.groupId === group,
  );
  const filters = [
    { value: 'all', label: 'Everyone' },
    ...[...groups].sort((a, b) => a.sortOrder - b.sortOrder || a.name.localeCompare(b.name)).map((g) => ({ value: g.id, label: g.name })),
    ...(ungrouped && groups.length > 0 ? [{ value: 'none', label: 'No group' }] : []),
  ];
  const pickedNames = skaters.filter((s) => selected.includes(s.id)).map((s) => s.displayName);

  return (
    <View style={styles.wrap}>
      {groups.length > 0 ? (
        <View style={styles.filters} accessibilityRole="radiogroup" accessibilityLabel="Show group">
          {filters.map((f) => {
            const on = f.value === group;
            return (
              <Pressable
                key={f.value}
                testID={`group-filter-${f.value}`}
                accessibilityRole="radio"
                accessibilityLabel={f.label}
                accessibilityState={{ selected: on, checked: on }}
                onPress={() => onGroup(f.value)}
                style={[styles.filter, on && styles.filterOn]}
              >
                <Text variant="caption" weight={on ? 'bold' : 'regular'} tone={on ? 'inverse' : 'default'}>
                  {on ? '\u2713 ' : ''}
                  {f.label}
                </Text>
              </Pressable>
            );
          })}
        </View>
      ) : null}

      <View style={styles.pickLine}>
        <Text style={styles.pickText} testID="selection-summary" weight={pickedNames.length ? 'bold' : 'regular'} tone={pickedNames.length ? 'default' : 'muted'}>
          {pickedNames.length === 0 ? 'Tap a skater, then a cue' : `Picked: ${joinNames(pickedNames)}`}
        </Text>
        {pickedNames.length > 0 ? (
          <Button label={`Clear (${pickedNames.length})`} variant="secondary" onPress={onClear} testID="selection-clear" accessibilityLabel="Clear the picked skaters" />
        ) : null}
      </View>

      <Grid minItemWidth={150} minColumns={2} maxColumns={4} testID="skater-tiles">
        {shown.map((skater) => {
          const on = selected.includes(skater.id);
          const count = counts[skater.id] ?? 0;
          const groupLabel = skater.groupId ? (groupName.get(skater.groupId) ?? 'No group') : 'No group';
          return (
            <Pressable
              key={skater.id}
              testID={`skater-tile-${skater.id}`}
              accessibilityRole="button"
              accessibilityLabel={skater.displayName}
              accessibilityHint={`${groupLabel}, ${plural(count, 'note', 'notes')} today`}
              accessibilityState={{ selected: on }}
              aria-pressed={on}
              onPress={() => onToggle(skater.id)}
              style={({ pressed }) => [styles.tile, on && styles.tileOn, pressed && styles.tilePressed]}
            >
              <Text variant="bodyLarge" weight="bold" tone={on ? 'inverse' : 'default'} numberOfLines={2}>
                {skater.displayName}
              </Text>
              <Text variant="caption" tone={on ? 'inverse' : 'muted'} numberOfLines={1}>
                {groupLabel}
              </Text>
              <View style={styles.tileFoot}>
                <Text variant="caption" weight="bold" tone={on ? 'inverse' : 'default'} testID={`tile-count-${skater.id}`} style={styles.grow}>
                  {plural(count, 'note', 'notes')} today
                </Text>
                {/* A tick mark, so "picked" shows by shape as well as by the dark fill. */}
                <View style={[styles.tick, on && styles.tickOn]}>
                  {on ? (
                    <Text weight="bold" align="center" style={{ color: colors.primary }}>
                      {'\u2713'}
                    </Text>
                  ) : null}
                </View>
              </View>
            </Pressable>
          );
        })}
      </Grid>
      {shown.length === 0 ? (
        <Text tone="muted" testID="tiles-filter-empty">
          No skaters in this group.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  filters: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  filter: {
    minHeight: 48,
    paddingHorizontal: spacing.md,
    justifyContent: 'center',
    borderRadius: radius.pill,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  filterOn: { backgroundColor: colors.primary, borderColor: colors.primary },
  pickLine: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, minHeight: 48 },
  pickText: { flex: 1 },
  tile: {
    minHeight: TILE_MIN_HEIGHT,
    padding: spacing.sm,
    gap: 2,
    borderRadius: radius.lg,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  tileOn: { backgroundColor: colors.primary, borderColor: colors.ink, borderWidth: 4, padding: spacing.sm - 2 },
  tilePressed: { opacity: 0.85 },
  tileFoot: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, marginTop: 'auto' },
  grow: { flex: 1 },
  tick: { width: 26, height: 26, borderRadius: 13, borderWidth: 2, borderColor: colors.border, alignItems: 'center', justifyContent: 'center' },
  tickOn: { backgroundColor: colors.surface, borderColor: colors.surface },
});
