/**
 * The lap section's words and tables: the chart's points as a table (its text alternative), the
 * run a point shows (date, time, laps, who timed it), and the side-by-side of two runs lap by lap
 * with the difference (B − A, shared/timing formatGap: "+0.42" slower, "−0.12" faster).
 */
import { StyleSheet, View } from 'react-native';

import type { LapRun, LapTrend } from '../../../shared/schemas/review-laps';
import { formatGap, formatRaceTime, speedKmh } from '../../../shared/timing';
import { kmhText } from '../../clock/clock-math';
import { Button, Card, ChoiceChips, Heading, Text, colors, spacing } from '../../ui';
import {
  bestOf,
  compareRows,
  dayName,
  gapText,
  gapWords,
  measureName,
  runStateText,
  sectionNames,
  shortDay,
  startTime,
  targetOf,
  timeText,
  type Measure,
} from './lap-view';

// ---- the chart's text alternative ---------------------------------------------------------------

export function LapPointsTable({ trend, measure, timeZone }: { trend: LapTrend; measure: Measure; timeZone: string }) {
  const target = targetOf(trend, measure);
  const best = bestOf(trend, measure);
  const splits = trend.splitsAtM.length;
  const name = measureName(trend, measure);
  return (
    <View role="table" aria-label={`${name} of each run, ${trend.from} to ${trend.to}`} testID="laps-table" style={styles.table}>
      <View role="row" style={[styles.row, styles.headRow]}>
        <View role="columnheader" style={styles.dayCell}>
          <Text variant="caption" weight="bold">Run</Text>
        </View>
        <View role="columnheader" style={styles.timeCell}>
          <Text variant="caption" weight="bold">{measure === 'finish' ? 'Finish' : sectionNames(trend)[measure]?.short}</Text>
        </View>
        <View role="columnheader" style={styles.noteCell}>
          <Text variant="caption" weight="bold">Note</Text>
        </View>
      </View>
      {trend.runs.map((run) => {
        const ms = measure === 'finish' ? run.finishMs : (run.lapsMs[measure] ?? null);
        const notes: string[] = [];
        if (ms !== null && best?.runId === run.id) notes.push('Personal best');
        if (ms !== null && target !== null) notes.push(`${formatGap(ms - target)} on target`);
        const state = runStateText(run, splits);
        if (state) notes.push(state);
        if (run.handTimed) notes.push('hand-timed');
        return (
          <View role="row" key={run.id} style={styles.row} testID={`laps-table-row-${run.id}`}>
            <View role="cell" style={styles.dayCell}>
              <Text variant="caption">{`${shortDay(run.day)} ${startTime(run, timeZone)}`}</Text>
              <Text variant="caption" tone="muted">{run.week}</Text>
            </View>
            <View role="cell" style={styles.timeCell}>
              <Text numeric testID={`laps-table-time-${run.id}`}>{timeText(ms)}</Text>
            </View>
            <View role="cell" style={styles.noteCell}>
              <Text variant="caption" tone={state ? 'muted' : 'default'}>{notes.join('; ') || '\u2013'}</Text>
            </View>
          </View>
        );
      })}
    </View>
  );
}

// ---- the run a point shows ------------------------------------------------------------------------

export function RunDetail({ trend, run, timeZone, pinned, onClose }: { trend: LapTrend; run: LapRun; timeZone: string; pinned: boolean; onClose: () => void }) {
  const names = sectionNames(trend);
  const sectionM = trend.splitsAtM.map((at, i) => at - (i === 0 ? 0 : trend.splitsAtM[i - 1]));
  const state = runStateText(run, trend.splitsAtM.length);
  return (
    <View style={styles.detail} testID="laps-run-detail" aria-live="polite">
      <Heading level={3} testID="laps-run-detail-title">{`${dayName(run.day)}, ${startTime(run, timeZone)}`}</Heading>
      <Text variant="caption" tone="muted">
        {`Week ${run.week} \u00B7 timed by ${run.authorName || 'a coach'} \u00B7 ${run.lane === 'group' ? 'group start' : `${run.lane} lane`}${run.handTimed ? ' \u00B7 hand-timed crossings' : ''}`}
      </Text>
      <Text weight="bold" testID="laps-run-detail-finish">
        {run.finishMs !== null ? `Finish ${formatRaceTime(run.finishMs)}` : (state ?? 'No finish time')}
      </Text>
      {run.finishMs !== null && trend.distanceM ? (
        <Text variant="caption" tone="muted" testID="laps-run-detail-speed">
          {`Average ${kmhText(speedKmh(trend.distanceM, run.finishMs))} km/h`}
        </Text>
      ) : null}
      <View role="list" aria-label="Laps of this run" style={styles.lapList}>
        {run.lapsMs.map((ms, i) => {
          const planned = trend.target?.sectionsMs[i];
          return (
            <View role="listitem" key={i} style={styles.lapItem}>
              <Text variant="caption">{names[i]?.short ?? `Extra crossing ${i + 1 - names.length}`}</Text>
              <Text numeric>{formatRaceTime(ms)}</Text>
              {sectionM[i] !== undefined && ms > 0 ? (
                <Text variant="caption" tone="muted">{`${kmhText(speedKmh(sectionM[i], ms))} km/h`}</Text>
              ) : null}
              {planned !== undefined ? (
                <Text variant="caption" tone="muted">{`${formatGap(ms - planned)} on plan`}</Text>
              ) : null}
            </View>
          );
        })}
      </View>
      {run.note ? <Text variant="caption">{`Note: ${run.note}`}</Text> : null}
      {pinned ? <Button label="Close the run" variant="quiet" onPress={onClose} testID="laps-run-detail-close" /> : null}
    </View>
  );
}

// ---- two runs side by side ------------------------------------------------------------------------

const runChoice = (run: LapRun, timeZone: string, sameDay: boolean) =>
  `${shortDay(run.day)}${sameDay ? ` ${startTime(run, timeZone)}` : ''}${run.state === 'complete' ? '' : ` (${run.state === 'partial' ? 'missing laps' : run.state})`}`;

export function LapCompare({
  trend,
  aId,
  bId,
  onPick,
  timeZone,
  wide,
}: {
  trend: LapTrend;
  aId: string | null;
  bId: string | null;
  onPick: (which: 'a' | 'b', id: string) => void;
  timeZone: string;
  wide: boolean;
}) {
  const runs = trend.runs;
  if (runs.length < 2) {
    return (
      <Text tone="muted" testID="laps-compare-empty">
        {`Two runs of ${trend.distanceM} m are needed to compare; ${runs.length === 0 ? 'these weeks have none' : 'these weeks have one'}. Time another ${trend.distanceM} m with the clock, or pick more weeks.`}
      </Text>
    );
  }
  const a = runs.find((r) => r.id === aId) ?? null;
  const b = runs.find((r) => r.id === bId) ?? null;
  const days = new Map<string, number>();
  for (const r of runs) days.set(r.day, (days.get(r.day) ?? 0) + 1);
  const choices = (which: 'a' | 'b') =>
    [...runs].reverse().map((r) => ({ value: r.id, label: runChoice(r, timeZone, (days.get(r.day) ?? 0) > 1), testID: `laps-compare-${which}-${r.id}` }));
  const rows = compareRows(trend, a, b);
  const head = (run: LapRun | null, letter: string) => (run ? `${letter}: ${shortDay(run.day)} ${startTime(run, timeZone)}` : `${letter}: none picked`);
  return (
    <View style={styles.compare} testID="laps-compare">
      <ChoiceChips label="Run A (earlier)" choices={choices('a')} value={aId} onChange={(id) => onPick('a', id)} testID="laps-compare-a" />
      <ChoiceChips label="Run B" choices={choices('b')} value={bId} onChange={(id) => onPick('b', id)} testID="laps-compare-b" />
      <Text weight="bold" testID="laps-compare-which">{`${head(a, 'A')} \u00B7 ${head(b, 'B')}`}</Text>
      <View role="table" aria-label={`Lap by lap: ${head(a, 'A')} against ${head(b, 'B')}`} style={styles.table} testID="laps-compare-table">
        <View role="row" style={[styles.row, styles.headRow]}>
          <View role="columnheader" style={styles.nameCell}>
            <Text variant="caption" weight="bold">Section</Text>
          </View>
          <View role="columnheader" style={styles.numCell}>
            <Text variant="caption" weight="bold">A</Text>
          </View>
          <View role="columnheader" style={styles.numCell}>
            <Text variant="caption" weight="bold">B</Text>
          </View>
          <View role="columnheader" style={styles.numCell}>
            <Text variant="caption" weight="bold">{'B \u2212 A'}</Text>
          </View>
          {wide ? (
            <View role="columnheader" style={styles.numCell}>
              <Text variant="caption" weight="bold">Target</Text>
            </View>
          ) : null}
        </View>
        {rows.map((row) => (
          <View role="row" key={row.key} style={[styles.row, row.key === 'finish' && styles.finishRow]} testID={`laps-compare-row-${row.key}`}>
            <View role="rowheader" style={styles.nameCell}>
              <Text variant="caption" weight={row.key === 'finish' ? 'bold' : 'regular'}>{row.name}</Text>
            </View>
            <View role="cell" style={styles.numCell}>
              <Text numeric testID={`laps-compare-a-${row.key}`}>{timeText(row.a)}</Text>
            </View>
            <View role="cell" style={styles.numCell}>
              <Text numeric testID={`laps-compare-b-${row.key}`}>{timeText(row.b)}</Text>
            </View>
            <View role="cell" style={styles.numCell} aria-label={gapWords(row.diffMs)}>
              <Text numeric weight="bold" testID={`laps-compare-diff-${row.key}`}>{gapText(row.diffMs)}</Text>
            </View>
            {wide ? (
              <View role="cell" style={styles.numCell}>
                <Text numeric tone="muted">{timeText(row.targetMs)}</Text>
              </View>
            ) : null}
          </View>
        ))}
      </View>
      <Text variant="caption" tone="muted">
        {'B \u2212 A: a plus sign means B was slower by that much, a minus sign faster.'}
        {a && a.state !== 'complete' ? ` Run A: ${runStateText(a, trend.splitsAtM.length)}.` : ''}
        {b && b.state !== 'complete' ? ` Run B: ${runStateText(b, trend.splitsAtM.length)}.` : ''}
      </Text>
    </View>
  );
}

export function LapCompareCard(props: Parameters<typeof LapCompare>[0] & { style?: object }) {
  return (
    <Card testID="laps-compare-card" style={props.style}>
      <Heading level={2}>Two runs side by side</Heading>
      <LapCompare {...props} />
    </Card>
  );
}

const styles = StyleSheet.create({
  table: { borderTopWidth: 1, borderColor: colors.divider },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderColor: colors.divider, paddingVertical: spacing.xxs, alignItems: 'center' },
  headRow: { backgroundColor: colors.surfaceSunken },
  finishRow: { backgroundColor: colors.surfaceSunken },
  dayCell: { flex: 3, paddingHorizontal: spacing.xxs },
  timeCell: { flex: 2, paddingHorizontal: spacing.xxs },
  noteCell: { flex: 4, paddingHorizontal: spacing.xxs },
  nameCell: { flex: 3, paddingHorizontal: spacing.xxs },
  numCell: { flex: 2, paddingHorizontal: spacing.xxs, alignItems: 'flex-end' },
  detail: { gap: spacing.xs, padding: spacing.md, borderRadius: 10, borderWidth: 2, borderColor: colors.focus, backgroundColor: colors.surface },
  lapList: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  lapItem: { minWidth: 72 },
  compare: { gap: spacing.md },
});
