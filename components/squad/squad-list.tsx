/**
 * The squad as a list: each group with its skaters, then skaters in no group. One flat, typed list
 * of rows rendered by a single switch, so headers and skaters stay in order without nesting.
 * Retired skaters are not among them: they wait in their own "Retired" section below, closed
 * until the coach opens it, each with "Bring back" for the head coach.
 */
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import type { Group, Skater, Squad } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useUpdateSkater } from '../../store/team';
import { Banner, Button, Text, colors, radius, spacing, tapTarget } from '../ui';
import { useOnce } from './use-once';

type Row =
  | { kind: 'group'; key: string; name: string; count: number }
  | { kind: 'skater'; key: string; skater: Skater }
  | { kind: 'empty'; key: string; text: string };

/** The squad on the board: everyone not retired. */
export const activeSkaters = (skaters: readonly Skater[]) => skaters.filter((s) => !s.retired);

export function buildSquadRows(squad: Squad): Row[] {
  const active = activeSkaters(squad.skaters);
  const groups = [...squad.groups].sort((a, b) => a.sortOrder - b.sortOrder || a.name.localeCompare(b.name));
  const byName = (a: Skater, b: Skater) => a.displayName.localeCompare(b.displayName);
  const rows: Row[] = [];
  const section = (key: string, name: string, skaters: Skater[]) => {
    rows.push({ kind: 'group', key: `g-${key}`, name, count: skaters.length });
    if (skaters.length === 0) rows.push({ kind: 'empty', key: `e-${key}`, text: 'No skaters in this group yet.' });
    for (const skater of [...skaters].sort(byName)) rows.push({ kind: 'skater', key: skater.id, skater });
  };
  const known = new Set(groups.map((g: Group) => g.id));
  for (const group of groups) section(group.id, group.name, active.filter((s) => s.groupId === group.id));
  const loose = active.filter((s) => !s.groupId || !known.has(s.groupId));
  if (loose.length > 0 || groups.length === 0) section('none', groups.length ? 'No group' : 'Skaters', loose);
  return rows;
}

export type SquadListProps = {
  teamId: string;
  squad: Squad;
  selectedId: string | null;
  onSelect: (skater: Skater) => void;
  /** Head coach: "Bring back" on retired skaters. */
  canManage: boolean;
};

export function SquadList({ teamId, squad, selectedId, onSelect, canManage }: SquadListProps) {
  const rows = buildSquadRows(squad);
  const retired = squad.skaters.filter((s) => s.retired).sort((a, b) => a.displayName.localeCompare(b.displayName));
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
          case 'skater':
            return <SkaterRow key={row.key} skater={row.skater} selected={row.skater.id === selectedId} onSelect={onSelect} />;
        }
      })}
      {retired.length > 0 ? (
        <RetiredSection teamId={teamId} retired={retired} selectedId={selectedId} onSelect={onSelect} canManage={canManage} />
      ) : null}
    </View>
  );
}

function SkaterRow({ skater, selected, onSelect }: { skater: Skater; selected: boolean; onSelect: (skater: Skater) => void }) {
  return (
    <Pressable
      testID={`squad-skater-${skater.id}`}
      accessibilityRole="button"
      accessibilityState={{ selected }}
      aria-pressed={selected}
      onPress={() => onSelect(skater)}
      style={[styles.skater, selected && styles.skaterSelected]}
    >
      <Text weight={selected ? 'bold' : 'regular'} style={styles.skaterName}>
        {skater.displayName}
      </Text>
      <Text tone="muted" variant="caption">
        {skater.retired ? 'Retired' : skater.hasAccount ? 'Can sign in' : 'No account yet'}
      </Text>
    </Pressable>
  );
}

/** Retired skaters, closed by default: the list is about who skates now. */
function RetiredSection({
  teamId,
  retired,
  selectedId,
  onSelect,
  canManage,
}: {
  teamId: string;
  retired: Skater[];
  selectedId: string | null;
  onSelect: (skater: Skater) => void;
  canManage: boolean;
}) {
  const [open, setOpen] = useState(false);
  const update = useUpdateSkater(teamId);
  const once = useOnce();
  const [outcome, setOutcome] = useState<{ kind: 'success' | 'error'; text: string } | null>(null);
  const [acting, setActing] = useState<string | null>(null);

  const bringBack = (skater: Skater) =>
    void once.run(async () => {
      setOutcome(null);
      setActing(skater.id);
      try {
        await update.mutateAsync({ skaterId: skater.id, change: { retired: false } });
        setOutcome({ kind: 'success', text: `${skater.displayName} is back on the squad and the board.` });
      } catch (error) {
        setOutcome({
          kind: 'error',
          text: isApiRequestError(error) ? error.message : `Could not bring ${skater.displayName} back. Try again.`,
        });
      } finally {
        setActing(null);
      }
    });

  return (
    <View style={styles.retired} testID="squad-retired">
      <Pressable
        testID="squad-retired-toggle"
        accessibilityRole="button"
        aria-expanded={open}
        accessibilityState={{ expanded: open }}
        onPress={() => setOpen((v) => !v)}
        style={[styles.groupHeader, styles.toggle]}
      >
        <Text weight="bold" variant="bodyLarge">
          <Text aria-hidden weight="bold" variant="bodyLarge">
            {open ? '\u25BE ' : '\u25B8 '}
          </Text>
          Retired
        </Text>
        <Text tone="muted" variant="caption">
          {retired.length === 1 ? '1 skater' : `${retired.length} skaters`}
        </Text>
      </Pressable>
      {outcome ? (
        <Banner kind={outcome.kind} testID={outcome.kind === 'success' ? 'squad-retired-done' : 'squad-retired-error'}>
          {outcome.text}
        </Banner>
      ) : null}
      {open ? (
        <>
          <Text tone="muted" variant="caption">
            Off the board; their notes and times stay in the history.
          </Text>
          {retired.map((skater) => (
            <View key={skater.id} style={styles.retiredRow}>
              <View style={styles.skaterName}>
                <SkaterRow skater={skater} selected={skater.id === selectedId} onSelect={onSelect} />
              </View>
              {canManage ? (
                <Button
                  label="Bring back"
                  variant="secondary"
                  testID={`squad-bring-back-${skater.id}`}
                  accessibilityLabel={`Bring back ${skater.displayName}`}
                  loading={acting === skater.id}
                  onPress={() => bringBack(skater)}
                />
              ) : null}
            </View>
          ))}
        </>
      ) : null}
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
  retired: { gap: spacing.xs, paddingTop: spacing.sm },
  toggle: { minHeight: tapTarget, alignItems: 'center' },
  retiredRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
});
