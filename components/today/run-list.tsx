/**
 * The skater's timed runs of a day, beside their cues: each run's distance, when, how it ended
 * (finished in …, or stopped and why), the target it was measured against, and a compact table of
 * every section with the lap time, the split, km/h and the gap to the schedule (+ behind, − ahead,
 * said under the table). Read from the device (the skater's own runs arrive by pull), so
 * it works at the rink without a network. Shows nothing on a day without runs.
 */
import { StyleSheet, View } from 'react-native';

import { formatRaceTime } from '../../shared/timing';
import { Heading, Text, colors, fonts, radius, spacing } from '../ui';
import {
  distanceLabel,
  laneWord,
  layoutFor,
  planWords,
  rowLabel,
  runTable,
  scheduleForRun,
  tableLegend,
  targetFor,
  trackLabel,
  type ClockRun,
  type ClockTarget,
} from '../clock/clock-math';
import { clockTime, plural } from './format';

export function RunList({ runs, targets }: { runs: readonly ClockRun[]; targets?: readonly ClockTarget[] }) {
  if (runs.length === 0) return null;
  return (
    <View style={styles.wrap} testID="today-runs">
      <Heading level={2} testID="today-runs-title">
        {`Timed runs (${runs.length})`}
      </Heading>
      <View role="list" aria-label="Timed runs" style={styles.list}>
        {runs.map((run) => (
          <View key={run.id} role="listitem">
            <RunCard run={run} targets={targets} />
          </View>
        ))}
      </View>
    </View>
  );
}

function RunCard({ run, targets }: { run: ClockRun; targets?: readonly ClockTarget[] }) {
  const schedule = scheduleForRun(run, targets);
  const rows = runTable(run, schedule);
  const legend = tableLegend(rows, !!schedule, 'your');
  const layout = layoutFor(run.distanceM, run.track, run.crossings.length);
  const complete = !layout.free && rows.length === layout.splitsAtM.length;
  const target = targetFor(targets, run.skaterId, run.distanceM, run.track);
  const ending =
    run.status === 'finished'
      ? complete
        ? `\u2713 Finished in ${rows[rows.length - 1].split}`
        : `\u2713 Finished: ${plural(rows.length, 'lap', 'laps')}`
      : run.status === 'stopped'
        ? `\u25A0 Stopped: ${run.stopReason || 'no reason given'}`
        : '\u25B6 Still being timed';
  const id = `today-run-${run.id}`;
  return (
    <View style={styles.card} testID={id}>
      <Text variant="title" weight="bold" testID={`${id}-what`}>
        {`${distanceLabel(run.distanceM)} · ${trackLabel(run.track).toLowerCase()}`}
      </Text>
      <Text tone="muted">
        {`${clockTime(run.startedAt)} · ${run.lane === 'group' ? 'in a group' : `${laneWord(run.lane).toLowerCase()} lane`}`}
      </Text>
      <Text weight="bold" variant="bodyLarge" testID={`${id}-status`}>
        {ending}
      </Text>
      {run.targetMs ? (
        <Text testID={`${id}-target`}>
          {`Target ${formatRaceTime(run.targetMs)}${target && target.targetMs === run.targetMs ? `, ${planWords(target)}` : ''}`}
        </Text>
      ) : null}
      {rows.length === 0 ? (
        <Text tone="muted">No times recorded.</Text>
      ) : (
        <View role="table" aria-label={`${distanceLabel(run.distanceM)} at ${clockTime(run.startedAt)}: laps and splits`} style={styles.table}>
          <View role="row" style={[styles.row, styles.headRow]}>
            <Cell head first>
              Section
            </Cell>
            <Cell head>Lap</Cell>
            <Cell head>Split</Cell>
            <Cell head>km/h</Cell>
            {schedule ? <Cell head>Gap</Cell> : null}
          </View>
          {rows.map((row) => (
            <View role="row" key={row.crossingId} style={styles.row} testID={`${id}-row-${row.index}`}>
              <Cell first>{rowLabel(row)}</Cell>
              <Cell testID={`${id}-row-${row.index}-lap`}>{row.lap}</Cell>
              <Cell testID={`${id}-row-${row.index}-split`}>{row.split}</Cell>
              <Cell testID={`${id}-row-${row.index}-kmh`}>{row.kmh}</Cell>
              {schedule ? (
                <Cell testID={`${id}-row-${row.index}-gap`}>{row.gap ? row.gap.text : '—'}</Cell>
              ) : null}
            </View>
          ))}
        </View>
      )}
      {legend ? (
        <Text variant="caption" tone="muted">
          {legend}
        </Text>
      ) : null}
    </View>
  );
}

function Cell({ children, head = false, first = false, testID }: { children: string; head?: boolean; first?: boolean; testID?: string }) {
  return (
    <View role={head ? 'columnheader' : first ? 'rowheader' : 'cell'} style={[styles.cell, first && styles.first]} testID={testID}>
      <Text
        variant="caption"
        weight={head || first ? 'bold' : 'regular'}
        tone={head ? 'muted' : 'default'}
        style={head || first ? undefined : styles.figure}
      >
        {children}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  list: { gap: spacing.md },
  card: {
    gap: spacing.xxs,
    padding: spacing.md,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.divider,
    backgroundColor: colors.surface,
  },
  table: { marginTop: spacing.xs, borderTopWidth: 2, borderTopColor: colors.primary },
  row: { flexDirection: 'row', alignItems: 'center', minHeight: 36, borderBottomWidth: 1, borderBottomColor: colors.divider },
  headRow: { minHeight: 28 },
  cell: { flex: 1, minWidth: 0, paddingHorizontal: 2 },
  first: { flex: 1.3 },
  figure: { fontFamily: fonts.numbers, fontSize: 20, lineHeight: 24 },
});
