/**
 * Cue chips, grouped: today's focus cues first, then every phase in the library's order. Each
 * chip has two single-tap zones: the wide main zone notes "needs work", the zone at its end notes
 * "good". Both show the mark's drawn shape and its word, so neither rests on colour.
 *
 * The pad and its chips are memoised: with a stable `onTap`, a tap re-renders none of them (only
 * the pressed zone's own pressed state).
 */
import { memo, useMemo } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { phaseLabels, phases } from '../../shared/cues';
import type { Cue, Mark } from '../../shared/schemas';
import { MarkShape, Text, colors, marks, radius, spacing } from '../ui';
import { Grid } from './grid';

export const CHIP_MIN_HEIGHT = 60;

type Section = { key: string; title: string; cues: Cue[] };

/** Focus first (in pinned order), then each phase's remaining cues in library order. */
export function cueSections(cues: Cue[], focusIds: readonly string[]): Section[] {
  const live = cues.filter((c) => !c.archived);
  const byId = new Map(live.map((c) => [c.id, c]));
  const focus = focusIds.map((id) => byId.get(id)).filter((c): c is Cue => !!c);
  const pinned = new Set(focus.map((c) => c.id));
  const sections: Section[] = focus.length ? [{ key: 'focus', title: 'Focus today', cues: focus }] : [];
  for (const phase of phases) {
    const inPhase = live
      .filter((c) => c.phase === phase && !pinned.has(c.id))
      .sort((a, b) => a.sortOrder - b.sortOrder || a.label.localeCompare(b.label));
    if (inPhase.length) sections.push({ key: phase, title: phaseLabels[phase], cues: inPhase });
  }
  return sections;
}

export const CueChip = memo(function CueChip({ cue, onTap }: { cue: Cue; onTap: (cueId: string, mark: Mark) => void }) {
  return (
    <View style={styles.chip}>
      <Pressable
        testID={`cue-chip-${cue.id}`}
        accessibilityRole="button"
        onPress={() => onTap(cue.id, 'needs_work')}
        style={({ pressed }) => [styles.main, pressed && styles.mainPressed]}
      >
        <MarkShape kind="needsWork" size={22} />
        <View style={styles.mainWords}>
          <Text weight="bold" numberOfLines={2}>
            {cue.label}
          </Text>
          <Text variant="caption" style={styles.needsWorkWord}>
            {marks.needsWork.word}
          </Text>
        </View>
      </Pressable>
      <Pressable
        testID={`cue-good-${cue.id}`}
        accessibilityRole="button"
        accessibilityLabel={`${cue.label}: good`}
        onPress={() => onTap(cue.id, 'good')}
        style={({ pressed }) => [styles.good, pressed && styles.goodPressed]}
      >
        <MarkShape kind="good" size={22} />
        <Text variant="caption" weight="bold" style={styles.goodWord}>
          {marks.good.word}
        </Text>
      </Pressable>
    </View>
  );
});

export const CuePad = memo(function CuePad({
  cues,
  focusIds,
  onTap,
}: {
  cues: Cue[];
  focusIds: readonly string[];
  onTap: (cueId: string, mark: Mark) => void;
}) {
  const sections = useMemo(() => cueSections(cues, focusIds), [cues, focusIds]);
  return (
    <View style={styles.pad} testID="cue-pad">
      {sections.map((section) => (
        <View key={section.key} style={styles.section} testID={`cue-section-${section.key}`}>
          <Text variant="caption" weight="bold" tone={section.key === 'focus' ? 'primary' : 'muted'} accessibilityRole="header" style={styles.sectionTitle}>
            {section.key === 'focus' ? '\u2605 ' : ''}
            {section.title.toUpperCase()}
          </Text>
          <Grid minItemWidth={300} minColumns={1} maxColumns={3} gap={spacing.xs}>
            {section.cues.map((cue) => (
              <CueChip key={cue.id} cue={cue} onTap={onTap} />
            ))}
          </Grid>
        </View>
      ))}
    </View>
  );
});

const styles = StyleSheet.create({
  pad: { gap: spacing.md },
  section: { gap: spacing.xs },
  sectionTitle: { letterSpacing: 1 },
  chip: {
    flexDirection: 'row',
    minHeight: CHIP_MIN_HEIGHT,
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
    gap: spacing.sm,
    minHeight: CHIP_MIN_HEIGHT - 4,
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xxs,
  },
  mainPressed: { backgroundColor: marks.needsWork.surface },
  mainWords: { flex: 1 },
  needsWorkWord: { color: marks.needsWork.ink },
  goodWord: { color: marks.good.ink },
  // The "good" zone: its own tinted block behind a divider, wide enough for a gloved thumb.
  good: {
    width: 84,
    minHeight: CHIP_MIN_HEIGHT - 4,
    alignItems: 'center',
    justifyContent: 'center',
    gap: 2,
    backgroundColor: marks.good.surface,
    borderLeftWidth: 2,
    borderLeftColor: colors.border,
  },
  goodPressed: { backgroundColor: '#B9D6FF' },
});
