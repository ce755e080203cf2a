/**
 * The phone's cue pad: a switcher (the session's focus cues, then each phase) over the chips of
 * one set at a time, so any cue is at most two taps from the tiles and never below the fold.
 * Chips are compact: the wide zone notes "needs work" (triangle), the end zone "good" (circle and
 * its word); a legend line names both, so no mark rests on colour. A phase with more cues than
 * fit scrolls inside the pad; the page itself never moves.
 *
 * Memoised with stable props: a chip tap re-renders nothing here; a switch re-renders the pad.
 */
import { memo, useMemo } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';

import { phases, type Phase } from '../../shared/cues';
import type { Cue, Mark } from '../../shared/schemas';
import { useBoardUi } from '../../store/board-ui';
import { MarkShape, Text, colors, marks, radius, spacing, tapTarget } from '../ui';

/** Short names that fit a quarter of a phone's width. */
export const phaseTabLabels: Record<Phase, string> = {
  start: 'Start',
  opening: 'Opening',
  straight: 'Straight',
  curve: 'Curve',
  exit: 'Exit',
  pacing: 'Pacing',
};

export const PHONE_CHIP_HEIGHT = 60;

type ChipSetItem = { key: string; label: string; cues: Cue[] };

/** The sets the switcher offers: focus (when any is pinned), then each phase that has live cues. */
export function chipSets(cues: Cue[], focusIds: readonly string[]): ChipSetItem[] {
  const live = cues.filter((c) => !c.archived);
  const byId = new Map(live.map((c) => [c.id, c]));
  const focus = focusIds.map((id) => byId.get(id)).filter((c): c is Cue => !!c);
  const sets: ChipSetItem[] = focus.length ? [{ key: 'focus', label: '\u2605 Focus', cues: focus }] : [];
  for (const phase of phases) {
    const inPhase = live.filter((c) => c.phase === phase).sort((a, b) => a.sortOrder - b.sortOrder || a.label.localeCompare(b.label));
    if (inPhase.length) sets.push({ key: phase, label: phaseTabLabels[phase], cues: inPhase });
  }
  return sets;
}

const PhoneChip = memo(function PhoneChip({ cue, onTap }: { cue: Cue; onTap: (cueId: string, mark: Mark) => void }) {
  return (
    <View style={styles.chip}>
      <Pressable
        testID={`cue-chip-${cue.id}`}
        accessibilityRole="button"
        accessibilityLabel={`${cue.label}: needs work`}
        onPress={() => onTap(cue.id, 'needs_work')}
        style={({ pressed }) => [styles.main, pressed && styles.mainPressed]}
      >
        <MarkShape kind="needsWork" size={16} />
        <Text weight="bold" numberOfLines={3} style={styles.label}>
          {cue.label}
        </Text>
      </Pressable>
      <Pressable
        testID={`cue-good-${cue.id}`}
        accessibilityRole="button"
        accessibilityLabel={`${cue.label}: good`}
        onPress={() => onTap(cue.id, 'good')}
        style={({ pressed }) => [styles.good, pressed && styles.goodPressed]}
      >
        <MarkShape kind="good" size={18} />
        <Text weight="bold" style={styles.goodWord}>
          {marks.good.word}
        </Text>
      </Pressable>
    </View>
  );
});

export const PhasePad = memo(function PhasePad({
  cues,
  focusIds,
  onTap,
}: {
  cues: Cue[];
  focusIds: readonly string[];
  onTap: (cueId: string, mark: Mark) => void;
}) {
  const sets = useMemo(() => chipSets(cues, focusIds), [cues, focusIds]);
  const chosen = useBoardUi((s) => s.chipSet);
  const choose = useBoardUi((s) => s.setChipSet);
  const shown = sets.find((s) => s.key === chosen) ?? sets[0];
  const columns = sets.length <= 4 ? sets.length : Math.ceil(sets.length / 2);
  const tabWidth = useMemo(() => ({ width: `${100 / Math.max(columns, 1)}%` }) as const, [columns]);

  return (
    <View style={styles.pad} testID="phase-pad">
      <View style={styles.tabs} accessibilityRole="tablist" accessibilityLabel="Cues to show">
        {sets.map((set) => {
          const on = set.key === shown?.key;
          return (
            <View key={set.key} style={[styles.tabCell, tabWidth]}>
              <Pressable
                testID={`phase-tab-${set.key}`}
                accessibilityRole="tab"
                accessibilityLabel={`${set.key === 'focus' ? 'Focus cues' : set.label}, ${set.cues.length} cues`}
                accessibilityState={{ selected: on }}
                aria-selected={on}
                onPress={() => choose(set.key)}
                style={[styles.tab, on && styles.tabOn]}
              >
                <Text variant="caption" weight="bold" tone={on ? 'inverse' : 'default'} numberOfLines={1} align="center">
                  {set.label}
                </Text>
              </Pressable>
            </View>
          );
        })}
      </View>
      <View style={styles.legend} accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
        <MarkShape kind="needsWork" size={14} />
        <Text variant="caption" tone="muted">
          {`tap the cue: ${marks.needsWork.word.toLowerCase()}`}
        </Text>
        <MarkShape kind="good" size={14} />
        <Text variant="caption" tone="muted">
          {`its end: ${marks.good.word.toLowerCase()}`}
        </Text>
      </View>
      {shown ? (
        <ScrollView style={styles.chipsScroll} contentContainerStyle={styles.chips} testID={`cue-section-${shown.key}`}>
          {shown.cues.map((cue) => (
            <View key={cue.id} style={styles.chipCell}>
              <PhoneChip cue={cue} onTap={onTap} />
            </View>
          ))}
        </ScrollView>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  pad: { flex: 1, gap: spacing.xxs, minHeight: 0 },
  tabs: { flexDirection: 'row', flexWrap: 'wrap', marginHorizontal: -2 },
  tabCell: { padding: 2 },
  tab: {
    minHeight: tapTarget,
    justifyContent: 'center',
    paddingHorizontal: spacing.xxs,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  tabOn: { backgroundColor: colors.primary, borderColor: colors.ink },
  legend: { flexDirection: 'row', alignItems: 'center', gap: spacing.xxs, flexWrap: 'wrap' },
  chipsScroll: { flex: 1 },
  chips: { flexDirection: 'row', flexWrap: 'wrap', marginHorizontal: -3 },
  chipCell: { width: '50%', padding: 3 },
  chip: {
    flexDirection: 'row',
    minHeight: PHONE_CHIP_HEIGHT,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
    overflow: 'hidden',
  },
  main: {
    flex: 1,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xxs,
    minHeight: PHONE_CHIP_HEIGHT - 4,
    paddingHorizontal: spacing.xs,
  },
  mainPressed: { backgroundColor: marks.needsWork.surface },
  label: { flex: 1, fontSize: 16, lineHeight: 18 },
  good: {
    width: 52,
    minHeight: PHONE_CHIP_HEIGHT - 4,
    alignItems: 'center',
    justifyContent: 'center',
    gap: 2,
    backgroundColor: marks.good.surface,
    borderLeftWidth: 2,
    borderLeftColor: colors.border,
  },
  goodPressed: { backgroundColor: '#B9D6FF' },
  goodWord: { color: marks.good.ink, fontSize: 14, lineHeight: 16 },
});
