/**
 * The skater's finished runs, week by week (newest first): each run's day, distance and track,
 * the finish time when every crossing was taken, and its laps (the opener named). Laps and splits
 * come from components/clock/clock-math.ts (shared/timing.ts underneath). Read-only.
 */
import { StyleSheet, View } from 'react-native';

import type { WeekRun } from '../../shared/schemas/review-follow-up';
import { Heading, Text, colors, radius, spacing } from '../ui';
import { distanceLabel, layoutFor, rowLabel, runTable, trackLabel } from '../clock/clock-math';
import { longDay, weekHeading, weekSpanText } from '../review/format';

export function RunsByWeek({ weeks, runs }: { weeks: readonly string[]; runs: readonly WeekRun[] }) {
  const withRuns = [...weeks].reverse().filter((w) => runs.some((r) => r.week === w));
  if (withRuns.length === 0)
    return (
      <Text tone="muted" testID="my-weeks-runs-empty">
        No finished timed runs in these weeks.
      </Text>
    );
  return (
    <View style={styles.stack} testID="my-weeks-runs">
      {withRuns.map((week) => {
        const inWeek = runs.filter((r) => r.week === week);
        const head = weekHeading(week);
        return (
          <View key={week} style={styles.stack} testID={`my-weeks-runs-${week}`}>
            <Heading level={3}>{`Week ${head.number.slice(1)}: ${weekSpanText(week)} (${inWeek.length === 1 ? '1 run' : `${inWeek.length} runs`})`}</Heading>
            <View role="list" aria-label={`Runs in week ${week}`} style={styles.stack}>
              {inWeek.map((run) => (
                <View role="listitem" key={run.id}>
                  <RunLine run={run} />
                </View>
              ))}
            </View>
          </View>
        );
      })}
    </View>
  );
}

function RunLine({ run }: { run: WeekRun }) {
  const rows = runTable(run);
  const layout = layoutFor(run.distanceM, run.track, run.crossings.length);
  const complete = !layout.free && rows.length === layout.splitsAtM.length;
  const id = `my-weeks-run-${run.id}`;
  return (
    <View style={styles.card} testID={id}>
      <Text weight="bold">{`${longDay(run.day)} · ${distanceLabel(run.distanceM)} · ${trackLabel(run.track).toLowerCase()}`}</Text>
      <Text variant="bodyLarge" weight="bold" testID={`${id}-finish`}>
        {complete ? `Finished in ${rows[rows.length - 1].split}` : rows.length ? `${rows.length} of ${layout.splitsAtM.length} crossings timed` : 'No times recorded'}
      </Text>
      {rows.length ? (
        <Text testID={`${id}-laps`}>{`Laps: ${rows.map((r) => `${rowLabel(r)} ${r.lap}`).join(' · ')}`}</Text>
      ) : null}
      {run.note ? <Text tone="muted">{`Note: ${run.note}`}</Text> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: spacing.sm },
  card: {
    gap: spacing.xxs,
    padding: spacing.sm,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.divider,
    backgroundColor: colors.surface,
  },
});
