/**
 * Earlier days one tap away: "Earlier" / "Later" around the day shown, and the recent days with
 * cues, as a scrolling row on a phone or a list in the side pane on a wide screen.
 */
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';

import type { SkaterDay } from '../../store/today';
import { Button, Heading, Text, colors, radius, spacing, tapTarget } from '../ui';
import { longDay, neighbours, plural, shortDay } from './format';

export interface DayChooserProps {
  offered: readonly SkaterDay[];
  selected: string;
  today: string;
  onSelect: (day: string) => void;
}

/** The day shown, as a heading between "Earlier" and "Later". */
export function DayHeader({ offered, selected, today, onSelect, wide = false }: DayChooserProps & { wide?: boolean }) {
  const { earlier, later } = neighbours(offered, selected);
  const title = selected === today ? `Today, ${longDay(selected, today)}` : longDay(selected, today);
  return (
    <View style={[styles.header, wide && styles.headerWide]}>
      <Heading level={2} testID="today-day" style={[styles.headerTitle, wide && styles.grow]}>
        {title}
      </Heading>
      <View style={[styles.steps, wide && styles.stepsWide]}>
        <Button
          label={'\u2039 Earlier'}
          variant="secondary"
          testID="day-prev"
          disabled={!earlier}
          accessibilityLabel={earlier ? `Earlier: ${longDay(earlier, today)}` : 'Earlier: no earlier days with cues'}
          onPress={() => earlier && onSelect(earlier)}
          style={styles.step}
        />
        <Button
          label={'Later \u203A'}
          variant="secondary"
          testID="day-next"
          disabled={!later}
          accessibilityLabel={later ? `Later: ${longDay(later, today)}` : 'Later: no later days'}
          onPress={() => later && onSelect(later)}
          style={styles.step}
        />
      </View>
    </View>
  );
}

function dayDetail(d: SkaterDay): string {
  if (d.count === 0) return 'No cues';
  if (d.unacknowledged === 0) return `${plural(d.count, 'cue', 'cues')} \u2713`;
  return `${plural(d.count, 'cue', 'cues')}, ${d.unacknowledged} new`;
}

function DayButton({ d, selected, today, onSelect, wide }: { d: SkaterDay; selected: boolean; today: string; onSelect: (day: string) => void; wide: boolean }) {
  const label = shortDay(d.day, today);
  return (
    <Pressable
      testID={`day-${d.day}`}
      accessibilityRole="button"
      accessibilityState={{ selected }}
      // Named by what it shows ("Mon 1 Dec, 3 cues"); the day shown is the current date.
      aria-current={selected ? 'date' : undefined}
      onPress={() => onSelect(d.day)}
      style={({ pressed, focused }: { pressed: boolean; focused?: boolean }) => [
        styles.day,
        wide ? styles.dayWide : styles.dayPhone,
        selected && styles.daySelected,
        pressed && styles.pressed,
        focused && styles.focused,
      ]}
    >
      <Text weight="bold" tone={selected ? 'inverse' : 'default'}>
        {label}
      </Text>
      {/* The day shown has its count in the summary under the heading: said once, not twice. */}
      <Text variant="caption" tone={selected ? 'inverse' : 'muted'}>
        {selected ? 'Shown below' : dayDetail(d)}
      </Text>
    </Pressable>
  );
}

/** The recent days: a row on a phone, a list on a wide screen. */
export function RecentDays({ offered, selected, today, onSelect, wide }: DayChooserProps & { wide: boolean }) {
  const buttons = offered.map((d) => (
    <DayButton key={d.day} d={d} selected={d.day === selected} today={today} onSelect={onSelect} wide={wide} />
  ));
  if (wide) {
    return (
      <View style={styles.list}>
        <Text weight="bold" tone="muted">
          Recent days
        </Text>
        <View style={styles.list} testID="today-days" role="list" aria-label="Recent days">
          {buttons.map((button) => (
            <View key={button.key} role="listitem">
              {button}
            </View>
          ))}
        </View>
      </View>
    );
  }
  return (
    <ScrollView
      horizontal
      testID="today-days"
      accessibilityLabel="Recent days"
      contentContainerStyle={styles.row}
      showsHorizontalScrollIndicator={false}
    >
      {buttons}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.sm },
  headerWide: { flexDirection: 'row', alignItems: 'center', gap: spacing.lg },
  headerTitle: { flexShrink: 1 },
  grow: { flexGrow: 1 },
  stepsWide: { width: 340 },
  steps: { flexDirection: 'row', gap: spacing.sm },
  step: { flexGrow: 1, flexBasis: 0, paddingHorizontal: spacing.sm },
  row: { gap: spacing.xs, paddingVertical: spacing.xxs },
  list: { gap: spacing.xs },
  day: {
    minHeight: tapTarget + 8,
    minWidth: tapTarget,
    justifyContent: 'center',
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.primary,
    backgroundColor: colors.surface,
  },
  dayPhone: { paddingHorizontal: spacing.md, paddingVertical: spacing.xxs },
  dayWide: { paddingHorizontal: spacing.md, paddingVertical: spacing.xs },
  daySelected: { backgroundColor: colors.primary },
  pressed: { opacity: 0.85 },
  focused: { outlineColor: colors.focus, outlineWidth: 3, outlineStyle: 'solid', outlineOffset: 2 } as object,
});
