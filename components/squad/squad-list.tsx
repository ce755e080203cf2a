/**
 * The squad as a list: each group with its skaters, then skaters in no group. One flat, typed list
 * of rows rendered by a single switch, so headers and skaters stay in order without nesting.
 */
import { Pressable, StyleSheet, View } from 'react-native';

import type { Group, Skater, Squad } from '../../shared/schemas';
import { Text, colors, radius, spacing, tapTarget } from '../ui';

type Row =
  | { kind: 'group'; key: string; name: string; count: number }
  | { kind: 'skater'; key: string; skater: Skater }
  | { kind: 'empty'; key: string; text: string };

export function buildSquadRows(squad: Squad): Row[] {
  const groups = [...squad.groups].sort((a, b) => a.sortOrder - b.sortOrder || a.name.localeCompare(b.name));
  const byName = (a: Skater, b: Skater) => a.displayName.localeCompare(b.displayName);
  const rows: Row[] = [];
  const section = (key: string, name: string, skaters: Skater[]) => {
    rows.push({ kind: 'group', key: `g-${key}`, name, count: skaters.length });
    if (skaters.length === 0) rows.push({ kind: 'empty', key: `e-${key}`, text: 'No skaters in this group yet.' });
    for (const skater of [...skaters].sort(byName)) rows.push({ kind: 'skater', key: skater.id, skater });
  };
  const known = new Set(groups.map((g: Group) => g.id));
  for (const group of groups) section(group.id, group.name, squad.skaters.filter((s) => s.groupId === group.id));
  const loose = squad.skaters.filter((s) => !s.groupId || !known.has(s.groupId));
  if (loose.length > 0 || groups.length === 0) section('none', groups.length ? 'No group' : 'Skaters', loose);
  return rows;
}

export type SquadListProps = {
  squad: Squad;
  selectedId: string | null;
  onSelect: (skater: Skater) => void;
};

export function SquadList({ squad, selectedId, onSelect }: SquadListProps) {
  const rows = buildSquadRows(squad);
  return (
    <View style={styles.list} testID="squad-list">
      {rows.map((row) => {
        switch (row.kind) {
          case 'group':
            return (
              <View key={row.key} style={styles.groupHeader} accessibilityRole="header">
                <Text weight="bold" variant="bodyLarge">
                  {row.name}
                </Text>
                <Text tone="muted" variant="caption">
                  {row.count === 1 ? '1 skater' : `${row.count} skaters`}
                </Text>
              </View>
            );
          case 'empty':
            return (
              <Text key={row.key} tone="muted" style={styles.empty}>
                {row.text}
              </Text>
            );
          case 'skater': {
            const selected = row.skater.id === selectedId;
            return (
              <Pressable
                key={row.key}
                testID={`squad-skater-${row.skater.id}`}
                accessibilityRole="button"
                accessibilityState={{ selected }}
                aria-pressed={selected}
                onPress={() => onSelect(row.skater)}
                style={[styles.skater, selected && styles.skaterSelected]}
              >
                <Text weight={selected ? 'bold' : 'regular'} style={styles.skaterName}>
                  {row.skater.displayName}
                </Text>
                <Text tone="muted" variant="caption">
                  {row.skater.hasAccount ? 'Can sign in' : 'No account yet'}
                </Text>
              </Pressable>
            );
          }
        }
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.xxs },
  groupHeader: {
    flexDirection: 'row',
    alignItems: 'baseline',
    justifyContent: 'space-between',
    paddingTop: spacing.md,
    paddingBottom: spacing.xxs,
    borderBottomWidth: 1,
    borderBottomColor: colors.divider,
  },
  empty: { paddingVertical: spacing.xs },
  skater: {
    minHeight: tapTarget,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    paddingHorizontal: spacing.sm,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: 'transparent',
  },
  // Selection shows as a border and bold name, not only a tint.
  skaterSelected: { backgroundColor: colors.surfaceSunken, borderColor: colors.primary },
  skaterName: { flex: 1 },
});
