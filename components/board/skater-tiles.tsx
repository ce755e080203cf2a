/**
 * Skater tiles: the biggest targets on the board. Tap toggles a skater in or out of the current
 * pick; several picked make a group cue. A row of group chips narrows the tiles; the pick line
 * names everyone picked (also those a filter hides) and clears them in one tap.
 *
 * Each tile is memoised and reads its own count of today's notes from the session's cached list,
 * so a tap on a cue chip re-renders only the tiles whose count changed, not the whole grid.
 */
import { useQuery } from '@tanstack/react-query';
import { memo, useCallback, useMemo } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import type { Group, Observation, Skater } from '../../shared/schemas';
import { observationsOnDevice } from '../../store/board';
import type { GroupFilter } from '../../store/board-ui';
import { Button, Text, colors, radius, spacing } from '../ui';
import { joinNames, plural } from './format';
import { Grid } from './grid';

export const TILE_MIN_HEIGHT = 104;

export type SkaterTilesProps = {
  skaters: Skater[];
  groups: Group[];
  selected: string[];
  /** Today's session: each tile counts its skater's notes in it. */
  sessionId: string;
  group: GroupFilter;
  onToggle: (id: string) => void;
  onClear: () => void;
  onGroup: (group: GroupFilter) => void;
  /**
   * The phone board: small tiles, four across (three for up to nine skaters), so a squad of 16
   * takes four rows; no filter pills or pick line (the phone shows those in its own rows).
   */
  compact?: boolean;
};

type Counts = ReadonlyMap<string, number>;
const countsCache = new WeakMap<readonly Observation[], Counts>();
let lastCounted: { list: readonly Observation[]; counts: Counts } | null = null;

/**
 * Notes per skater in a session's list, computed once per version of the list (every tile asks).
 * A tap puts new notes in front of the previous list (the same objects after them): then only
 * those are added to its counts instead of counting the whole session again.
 */
export function countsFor(list: readonly Observation[]): Counts {
  const cached = countsCache.get(list);
  if (cached) return cached;
  let counts: Map<string, number>;
  const prev = lastCounted;
  const added = prev ? list.length - prev.list.length : -1;
  if (prev && added >= 0 && prev.list.every((o, i) => list[added + i] === o)) {
    counts = new Map(prev.counts);
    for (let i = 0; i < added; i += 1) counts.set(list[i].skaterId, (counts.get(list[i].skaterId) ?? 0) + 1);
  } else {
    counts = new Map();
    for (const o of list) counts.set(o.skaterId, (counts.get(o.skaterId) ?? 0) + 1);
  }
  countsCache.set(list, counts);
  lastCounted = { list, counts };
  return counts;
}

function useNoteCount(sessionId: string, skaterId: string): number {
  const select = useCallback((list: Observation[]) => countsFor(list).get(skaterId) ?? 0, [skaterId]);
  return useQuery({ ...observationsOnDevice(sessionId), enabled: !!sessionId, select }).data ?? 0;
}

/** The group filter's choices: everyone, each group in order, and "No group" when it has skaters. */
export function groupFilters(skaters: Skater[], groups: Group[]): { value: GroupFilter; label: string }[] {
  const known = new Set(groups.map((g) => g.id));
  const ungrouped = skaters.some((s) => !s.groupId || !known.has(s.groupId));
  return [
    { value: 'all', label: 'Everyone' },
    ...[...groups].sort((a, b) => a.sortOrder - b.sortOrder || a.name.localeCompare(b.name)).map((g) => ({ value: g.id, label: g.name })),
    ...(ungrouped && groups.length > 0 ? [{ value: 'none', label: 'No group' }] : []),
  ];
}

export function SkaterTiles({ skaters, groups, selected, sessionId, group, onToggle, onClear, onGroup, compact = false }: SkaterTilesProps) {
  const groupName = useMemo(() => new Map(groups.map((g) => [g.id, g.name])), [groups]);
  const shown = skaters.filter((s) =>
    group === 'all' ? true : group === 'none' ? !s.groupId || !groupName.has(s.groupId) : s.groupId === group,
  );
  const filters = groupFilters(skaters, groups);
  const pickedNames = skaters.filter((s) => selected.includes(s.id)).map((s) => s.displayName);

  if (compact) {
    const columns = shown.length <= 9 ? 3 : 4;
    const cell = { width: `${100 / columns}%` } as const;
    return (
      <View style={styles.compactGrid} testID="skater-tiles">
        {shown.map((skater) => (
          <View key={skater.id} style={[styles.compactCell, cell]}>
            <SkaterTile
              skater={skater}
              on={selected.includes(skater.id)}
              groupLabel={skater.groupId ? (groupName.get(skater.groupId) ?? 'No group') : 'No group'}
              sessionId={sessionId}
              onToggle={onToggle}
              compact
            />
          </View>
        ))}
        {shown.length === 0 ? (
          <Text tone="muted" testID="tiles-filter-empty">
            No skaters in this group.
          </Text>
        ) : null}
      </View>
    );
  }

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
                aria-checked={on}
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
        {shown.map((skater) => (
          <SkaterTile
            key={skater.id}
            skater={skater}
            on={selected.includes(skater.id)}
            groupLabel={skater.groupId ? (groupName.get(skater.groupId) ?? 'No group') : 'No group'}
            sessionId={sessionId}
            onToggle={onToggle}
          />
        ))}
      </Grid>
      {shown.length === 0 ? (
        <Text tone="muted" testID="tiles-filter-empty">
          No skaters in this group.
        </Text>
      ) : null}
    </View>
  );
}

type SkaterTileProps = {
  skater: Skater;
  on: boolean;
  groupLabel: string;
  sessionId: string;
  onToggle: (id: string) => void;
  compact?: boolean;
};

const SkaterTile = memo(function SkaterTile({ skater, on, groupLabel, sessionId, onToggle, compact = false }: SkaterTileProps) {
  const count = useNoteCount(sessionId, skater.id);
  const counted = plural(count, 'note', 'notes');
  if (compact) {
    return (
      <Pressable
        testID={`skater-tile-${skater.id}`}
        accessibilityRole="button"
        accessibilityState={{ selected: on }}
        aria-pressed={on}
        onPress={() => onToggle(skater.id)}
        style={({ pressed }) => [styles.compactTile, on && styles.compactTileOn, pressed && styles.tilePressed]}
      >
        <Text weight="bold" tone={on ? 'inverse' : 'default'} numberOfLines={2} style={styles.compactName}>
          {skater.displayName}
        </Text>
        {/* "Picked" shows by a tick and the dark fill; the count stays readable either way. */}
        <Text weight="bold" tone={on ? 'inverse' : 'muted'} numberOfLines={1} testID={`tile-count-${skater.id}`} style={styles.compactCount}>
          {on ? '\u2713 ' : ''}
          {counted}
        </Text>
      </Pressable>
    );
  }
  return (
    <Pressable
      testID={`skater-tile-${skater.id}`}
      accessibilityRole="button"
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
          {counted} today
        </Text>
        {/* A tick mark, so "picked" shows by shape as well as by the dark fill. */}
        <View style={[styles.tick, on && styles.tickOn]}>
          {on ? (
            <Text weight="bold" align="center" style={styles.tickMark}>
              {'\u2713'}
            </Text>
          ) : null}
        </View>
      </View>
    </Pressable>
  );
});

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
  compactGrid: { flexDirection: 'row', flexWrap: 'wrap', marginHorizontal: -3 },
  compactCell: { padding: 3 },
  compactTile: {
    minHeight: 52,
    paddingHorizontal: 6,
    paddingVertical: 3,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
    justifyContent: 'space-between',
  },
  compactTileOn: { backgroundColor: colors.primary, borderColor: colors.ink, borderWidth: 3, paddingHorizontal: 5, paddingVertical: 2 },
  compactName: { fontSize: 15, lineHeight: 16 },
  compactCount: { fontSize: 13, lineHeight: 15 },
  tileFoot: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, marginTop: 'auto' },
  grow: { flex: 1 },
  tick: { width: 26, height: 26, borderRadius: 13, borderWidth: 2, borderColor: colors.border, alignItems: 'center', justifyContent: 'center' },
  tickOn: { backgroundColor: colors.surface, borderColor: colors.surface },
  tickMark: { color: colors.primary },
});
