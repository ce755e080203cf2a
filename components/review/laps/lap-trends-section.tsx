/**
 * The evening review's "Lap times" section (issue #10 §2): pick a skater (the review's skater
 * list), a distance they have runs of and how many weeks; then one measure at a time (the finish,
 * or the opener / a lap) as a chart over ISO weeks in the team's zone, with the target line and
 * the personal best, the same points as a table, the run a point shows, and two runs side by side
 * lap by lap with the difference. Everything comes from the server
 * (GET .../review/skaters/:id/laps, store/review-laps.ts). Wide: the chart beside the side-by-side;
 * phone: stacked, the chart as wide as the screen.
 */
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';

import type { ReviewGroup } from '../../../shared/schemas/review';
import type { LapTrend } from '../../../shared/schemas/review-laps';
import { formatRaceTime } from '../../../shared/timing';
import { addIsoWeeks, weekOf } from '../../../shared/weeks';
import { useConnectivity } from '../../../store/connectivity';
import { lapTrendQuery, type LapDistanceAsked } from '../../../store/review-laps';
import { Banner, Button, Card, ChoiceChips, Heading, Text, colors, layout, spacing } from '../../ui';
import type { ReviewSectionProps } from '../section-props';
import { SkaterPane } from '../skater-pane';
import { LapChart } from './lap-chart';
import { LapCompareCard, LapPointsTable, RunDetail } from './lap-tables';
import {
  bestOf,
  dayName,
  defaultPair,
  distanceName,
  measureName,
  pointsOf,
  runSummary,
  sectionNames,
  targetOf,
  type ChartPoint,
  type Measure,
} from './lap-view';

type WeeksShown = '8' | '26' | '52';
const distanceKey = (d: { distanceM: number; track: string }) => `${d.distanceM}-${d.track}`;

export function LapTrendsSection(props: ReviewSectionProps) {
  const { skaters, groups, skaterId, onPickSkater, wide } = props;
  const [group, setGroup] = useState<ReviewGroup>(props.group);
  const [search, setSearch] = useState('');
  const [showRetired, setShowRetired] = useState(false);
  const [listOpen, setListOpen] = useState(false);
  const skater = skaters.find((s) => s.id === skaterId) ?? null;

  const compactWho = !wide && skater && !listOpen;
  const who = compactWho ? (
    <View style={styles.compactWho} testID="laps-who">
      <Text weight="bold" style={styles.grow}>{`Skater: ${skater.displayName}`}</Text>
      <Button label="Change skater" variant="secondary" onPress={() => setListOpen(true)} testID="laps-change-skater" />
    </View>
  ) : (
    <Card testID="laps-who" style={wide ? styles.whoWide : undefined}>
      <Heading level={2}>Skaters</Heading>
      <SkaterPane
        groups={[...groups]}
        skaters={[...skaters]}
        group={group}
        onGroup={setGroup}
        search={search}
        onSearch={setSearch}
        showRetired={showRetired}
        onShowRetired={setShowRetired}
        selectedId={skaterId}
        onSelect={(s) => {
          onPickSkater(s.id);
          setListOpen(false);
        }}
      />
    </Card>
  );

  return (
    <View style={wide ? styles.wideRow : styles.stack} testID="laps-section">
      {who}
      <View style={styles.grow}>
        {skater ? (
          <SkaterLaps key={skater.id} {...props} skaterId={skater.id} skaterName={skater.displayName} />
        ) : (
          <Card>
            <Heading level={2}>Lap times</Heading>
            <Text tone="muted" testID="laps-pick-skater">
              Pick a skater from the list to see their lap and finish times week by week.
            </Text>
          </Card>
        )}
      </View>
    </View>
  );
}

function SkaterLaps({ teamId, skaterId, skaterName, timeZone: fallbackZone, wide }: ReviewSectionProps & { skaterId: string; skaterName: string }) {
  const online = useConnectivity((s) => s.online);
  const [distance, setDistance] = useState<LapDistanceAsked>(null);
  const [weeks, setWeeks] = useState<WeeksShown>('26');
  const [measure, setMeasure] = useState<Measure>('finish');
  const [pinned, setPinned] = useState<string | null>(null);
  const [peek, setPeek] = useState<string | null>(null);
  const [pair, setPair] = useState<{ subject: string; a: string | null; b: string | null } | null>(null);
  const [chartWidth, setChartWidth] = useState(0);

  const [zone, setZone] = useState(fallbackZone);
  const currentWeek = weekOf(Date.now(), zone);
  const range = weeks === '26' ? null : { from: addIsoWeeks(currentWeek, -(Number(weeks) - 1)), to: currentWeek };
  const query = useQuery({ ...lapTrendQuery(teamId, skaterId, distance, range), enabled: !!teamId });
  const trend = query.data;
  if (trend && trend.timeZone !== zone) setZone(trend.timeZone);

  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.floor(e.nativeEvent.layout.width);
    if (w > 0 && Math.abs(w - chartWidth) > 1) setChartWidth(w);
  };

  const controls = (
    <Card testID="laps-controls">
      <Heading level={2} testID="laps-heading">{`Lap times: ${skaterName}`}</Heading>
      {!online ? (
        <Banner kind="info" title="No connection to the server" testID="laps-offline">
          {trend ? 'Lap times are read from the server. Below are the ones this device loaded last.' : 'Lap times are read from the server, so they need a connection.'}
        </Banner>
      ) : null}
      {trend && trend.distances.length > 0 ? (
        <ChoiceChips
          label="Distance"
          choices={[
            ...trend.distances,
            ...(trend.distanceM !== null && !trend.distances.some((d) => d.distanceM === trend.distanceM && d.track === trend.track)
              ? [{ distanceM: trend.distanceM, track: trend.track!, runs: 0, lastDay: '' }]
              : []),
          ].map((d) => ({
            value: distanceKey(d),
            label: `${distanceName(d.distanceM, d.track)} (${d.runs} run${d.runs === 1 ? '' : 's'})`,
            testID: `laps-distance-${distanceKey(d)}`,
          }))}
          value={trend.distanceM !== null ? distanceKey({ distanceM: trend.distanceM, track: trend.track! }) : null}
          onChange={(key) => {
            const [d, track] = key.split('-');
            setDistance({ distanceM: Number(d), track: track as 'long' | 'short' });
            setMeasure('finish');
            setPinned(null);
          }}
          testID="laps-distances"
        />
      ) : null}
      <ChoiceChips<WeeksShown>
        label="Weeks"
        choices={[
          { value: '8', label: 'Last 8 weeks', testID: 'laps-weeks-8' },
          { value: '26', label: 'Last 26 weeks', testID: 'laps-weeks-26' },
          { value: '52', label: 'Last 52 weeks', testID: 'laps-weeks-52' },
        ]}
        value={weeks}
        onChange={(next) => {
          setWeeks(next);
          setPinned(null);
        }}
        testID="laps-weeks"
      />
      {trend ? (
        <Text variant="caption" tone="muted" testID="laps-range">
          {`${trend.from} to ${trend.to}: weeks run Monday to Sunday in the team\u2019s time zone (${trend.timeZone}).`}
        </Text>
      ) : null}
    </Card>
  );

  let body;
  if (!trend) {
    body = query.error ? (
      <View style={styles.stack}>
        <Banner kind="error" title="Could not load the lap times" testID="laps-error">
          {query.error.message}
        </Banner>
        <Button label="Try again" variant="secondary" onPress={() => void query.refetch()} testID="laps-retry" />
      </View>
    ) : (
      <Text tone="muted" role="status" testID="laps-loading">
        Loading lap times…
      </Text>
    );
  } else if (trend.distanceM === null) {
    body = (
      <Text tone="muted" testID="laps-empty">
        {`No timed runs for ${skaterName} yet. Time a 1500 m with the clock to see it here.`}
      </Text>
    );
  } else if (trend.runs.length === 0) {
    body = (
      <Text tone="muted" testID="laps-empty">
        {`No ${trend.distanceM} m runs for ${skaterName} in ${trend.from} to ${trend.to}. Pick more weeks, or time a ${trend.distanceM} m with the clock to see it here.`}
      </Text>
    );
  }

  if (body || !trend || trend.distanceM === null) {
    return (
      <View style={styles.stack}>
        {controls}
        <Card testID="laps-chart-card">{body}</Card>
      </View>
    );
  }

  const splits = trend.splitsAtM.length;
  const shownMeasure: Measure = measure !== 'finish' && measure >= splits ? 'finish' : measure;
  const points = pointsOf(trend, shownMeasure);
  const target = targetOf(trend, shownMeasure);
  const best = bestOf(trend, shownMeasure);
  const name = measureName(trend, shownMeasure);
  const zoneShown = trend.timeZone;
  const pointLabel = (p: ChartPoint) =>
    `${runSummary(trend, p.run, shownMeasure, p.ms, zoneShown)}${p.best ? '; personal best' : ''}. Show this run.`;
  const summary = chartSummary(trend, name, points, target, best, skaterName);
  const shownRun = trend.runs.find((r) => r.id === (peek ?? pinned)) ?? null;

  const subject = `${trend.distanceM}-${trend.track}-${trend.from}-${trend.to}`;
  const [defaultA, defaultB] = defaultPair(trend.runs);
  const current = pair && pair.subject === subject ? pair : { subject, a: defaultA, b: defaultB };
  const width = chartWidth || (wide ? 620 : 320);

  const chartCard = (
    <Card testID="laps-chart-card" style={wide ? styles.chartWide : undefined}>
      <Heading level={2} testID="laps-chart-heading">{`${name} by week`}</Heading>
      <ChoiceChips<string>
        label="Show"
        choices={[
          { value: 'finish', label: 'Finish', testID: 'laps-measure-finish' },
          ...sectionNames(trend).map((s, i) => ({ value: String(i), label: s.short, testID: `laps-measure-${i}` })),
        ]}
        value={String(shownMeasure)}
        onChange={(v) => setMeasure(v === 'finish' ? 'finish' : Number(v))}
        testID="laps-measures"
      />
      <Text testID="laps-best">
        {best
          ? `Personal best: ${formatRaceTime(best.ms)} on ${dayName(best.day)}${trend.runs.some((r) => r.id === best.runId) ? '' : ' (before these weeks)'}`
          : 'No personal best yet: no finished run with every crossing.'}
        {target !== null ? ` \u00B7 Target: ${formatRaceTime(target)}` : ' \u00B7 No target set (set one on the clock).'}
      </Text>
      <View onLayout={onLayout} style={styles.chartBox}>
        {points.length > 0 ? (
          <LapChart
            trend={trend}
            measure={shownMeasure}
            points={points}
            targetMs={target}
            timeZone={zoneShown}
            width={width}
            height={wide ? 300 : 240}
            pinnedId={pinned}
            summary={summary}
            pointLabel={pointLabel}
            onPeek={setPeek}
            onPin={(id) => setPinned((was) => (was === id ? null : id))}
          />
        ) : (
          <Text tone="muted" testID="laps-no-points">
            {shownMeasure === 'finish'
              ? `No finish times in these weeks: each ${trend.distanceM} m here was stopped or missed a crossing (see the table). Their laps show under Opener and Lap.`
              : `No run in these weeks reached this section.`}
          </Text>
        )}
      </View>
      <Text variant="caption" tone="muted" testID="laps-legend">
        {'Lower is faster. \u25CF a finished run with every crossing (joined by the line); \u25C7 a lap of a stopped or partial run (not a finish time, never a best); ringed PB: personal best; dashed: the target. Hover, focus or tap a point to see the run.'}
      </Text>
      {shownRun ? <RunDetail trend={trend} run={shownRun} timeZone={zoneShown} pinned={shownRun.id === pinned} onClose={() => setPinned(null)} /> : null}
      <Heading level={3}>{`${name}: every run`}</Heading>
      <LapPointsTable trend={trend} measure={shownMeasure} timeZone={zoneShown} />
    </Card>
  );

  const compare = (
    <LapCompareCard
      trend={trend}
      aId={current.a}
      bId={current.b}
      onPick={(which, id) => setPair({ ...current, [which]: id })}
      timeZone={zoneShown}
      wide={wide}
      style={wide ? styles.compareWide : undefined}
    />
  );

  return (
    <View style={styles.stack}>
      {controls}
      {query.isPlaceholderData ? (
        <Text tone="muted" role="status" testID="laps-loading">
          Loading the runs asked for… (showing the previous ones)
        </Text>
      ) : null}
      {query.error ? (
        <Banner kind="error" title="Showing the lap times loaded earlier" testID="laps-error">
          {query.error.message}
        </Banner>
      ) : null}
      {wide ? (
        <View style={styles.wideRow}>
          {chartCard}
          {compare}
        </View>
      ) : (
        <>
          {chartCard}
          {compare}
        </>
      )}
    </View>
  );
}

/** What the chart shows, in one sentence or three, for screen readers. */
function chartSummary(trend: LapTrend, name: string, points: ChartPoint[], target: number | null, best: ReturnType<typeof bestOf>, skaterName: string) {
  const parts = [`${name} of ${skaterName}, ${trend.from} to ${trend.to}: ${points.length} point${points.length === 1 ? '' : 's'}`];
  const counted = points.filter((p) => p.counted);
  if (counted.length > 0) {
    const fastest = counted.reduce((a, b) => (b.ms < a.ms ? b : a));
    const latest = counted[counted.length - 1];
    parts.push(`fastest ${formatRaceTime(fastest.ms)} on ${dayName(fastest.run.day)}, latest ${formatRaceTime(latest.ms)} on ${dayName(latest.run.day)}`);
  }
  if (points.length > counted.length) parts.push(`${points.length - counted.length} from runs that were stopped or missed a crossing`);
  if (best) parts.push(`personal best ${formatRaceTime(best.ms)}`);
  parts.push(target !== null ? `target ${formatRaceTime(target)}` : 'no target');
  return `${parts.join('; ')}. Every point is listed in the table below.`;
}

const styles = StyleSheet.create({
  stack: { gap: spacing.md },
  grow: { flex: 1, minWidth: 0, gap: spacing.md },
  wideRow: { flexDirection: 'row', gap: spacing.md, alignItems: 'flex-start' },
  whoWide: { width: layout.railWidth + spacing.xl },
  compactWho: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    padding: spacing.sm,
    borderRadius: 10,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.divider,
  },
  chartWide: { flex: 3, minWidth: 0 },
  compareWide: { flex: 2, minWidth: 0 },
  chartBox: { width: '100%' },
});
