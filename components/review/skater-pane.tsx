/**
 * The review's "who" pane: group chips from the squad ('All skaters', each group, 'No group'),
 * a search box and the skaters to pick, retired ones hidden unless asked for. The chosen group
 * also picks the group for the whole-group and one-week views.
 */
import { Pressable, StyleSheet, View } from 'react-native';

import type { Group, Skater } from '../../shared/schemas';
import type { ReviewGroup } from '../../shared/schemas/review';
import { ChoiceChips, Text, TextField, ToggleRow, colors, radius, spacing, tapTarget } from '../ui';

export const groupName = (groups: Group[], id: ReviewGroup) =>
  id === 'all' ? 'All skaters' : id === 'none' ? 'No group' : (groups.find((g) => g.id === id)?.name ?? 'A group');

export function visibleSkaters(skaters: Skater[], group: ReviewGroup, search: string, showRetired: boolean) {
  const wanted = search.trim().toLocaleLowerCase();
  return skaters
    .filter((s) => showRetired || !s.retired)
    .filter((s) => group === 'all' || (group === 'none' ? s.groupId === null : s.groupId === group))
    .filter((s) => !wanted || s.displayName.toLocaleLowerCase().includes(wanted))
    .sort((a, b) => a.displayName.localeCompare(b.displayName));
}

export type SkaterPaneProps = {
  groups: Group[];
  skaters: Skater[];
  group: ReviewGroup;
  onGroup: (group: ReviewGroup) => void;
  search: string;
  onSearch: (text: string) => void;
  showRetired: boolean;
  onShowRetired: (value: boolean) => void;
  selectedId: string | null;
  onSelect: (skater: Skater) => void;
  /** Hide the list (a phone showing a group's table): the chips still pick the group. */
  listShown?: boolean;
};

export function SkaterPane(props: SkaterPaneProps) {
  const { groups, skaters, group, onGroup, search, onSearch, showRetired, onShowRetired, selectedId, onSelect, listShown = true } = props;
  const choices = [
    { value: 'all', label: 'All skaters', testID: 'review-group-all' },
    ...[...groups].sort((a, b) => a.sortOrder - b.sortOrder).map((g) => ({ value: g.id, label: g.name, testID: `review-group-${g.id}` })),
    { value: 'none', label: 'No group', testID: 'review-group-none' },
  ];
  const shown = visibleSkaters(skaters, group, search, showRetired);
  const retiredHidden = skaters.filter((s) => s.retired).length;
  return (
    <View style={styles.pane} testID="review-skater-pane">
      <ChoiceChips label="Group" choices={choices} value={group} onChange={onGroup} testID="review-groups" />
      {listShown ? (
        <>
          <TextField
            label="Find a skater"
            value={search}
            onChangeText={onSearch}
            autoCorrect={false}
            autoCapitalize="none"
            testID="review-search"
          />
          <ToggleRow
            label="Show retired skaters"
            hint={retiredHidden ? `${retiredHidden} retired` : undefined}
            value={showRetired}
            onChange={onShowRetired}
            testID="review-show-retired"
          />
          {shown.length === 0 ? (
            <Text tone="muted" testID="review-skaters-empty">
              {skaters.length === 0 ? 'No skaters in the squad yet.' : 'No skater matches.'}
            </Text>
          ) : (
            <View role="list" aria-label="Skaters" style={styles.list}>
              {shown.map((skater) => {
                const selected = skater.id === selectedId;
                return (
                  <View role="listitem" key={skater.id}>
                    <Pressable
                      testID={`review-skater-${skater.id}`}
                      accessibilityRole="button"
                      accessibilityLabel={`${skater.displayName}${skater.retired ? ' (retired)' : ''}`}
                      accessibilityState={{ selected }}
                      aria-pressed={selected}
                      onPress={() => onSelect(skater)}
                      style={({ pressed }) => [styles.skater, selected && styles.selected, pressed && styles.pressed]}
                    >
                      <Text weight={selected ? 'bold' : 'regular'} tone={selected ? 'inverse' : 'default'}>
                        {selected ? '\u2713 ' : ''}
                        {skater.displayName}
                      </Text>
                      {skater.retired ? (
                        <Text variant="caption" tone={selected ? 'inverse' : 'muted'}>
                          retired
                        </Text>
                      ) : null}
                    </Pressable>
                  </View>
                );
              })}
            </View>
          )}
        </>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  pane: { gap: spacing.md },
  list: { gap: spacing.xxs },
  skater: {
    minHeight: tapTarget,
    paddingHorizontal: spacing.sm,
    borderRadius: radius.md,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: spacing.xs,
    borderWidth: 2,
    borderColor: 'transparent',
  },
  selected: { backgroundColor: colors.primary, borderColor: colors.primary },
  pressed: { backgroundColor: colors.surfaceSunken },
});
