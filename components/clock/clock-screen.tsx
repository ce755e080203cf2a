/**
 * The Clock: one phone times a pair (inner and outer lane) or a group of up to six at the boards.
 * Set up in a few taps, start on the gun, tap each skater's lane card as they cross the line; the
 * laps, splits, km/h, the gap to each skater's schedule and the predicted finish show at once and
 * are read aloud. Every crossing is written to this device as it is tapped, so a reload or a crash
 * loses nothing: the heat is picked up again on the next load. Finished heats of the day are
 * listed with their tables, to tidy (edit, delete, add hand-timed crossings) and to sync.
 *
 * Parts: setup-panel (distance, track, lanes, offset, Start), live-heat (clock and lane buttons),
 * run-table (a run's laps and splits), target-editor (a skater's target and pace plan); the UI
 * state lives in use-clock (zustand), the actions in use-heat, the arithmetic in clock-math.
 */
import { useQuery } from '@tanstack/react-query';
import { useRouter } from 'expo-router';
import { memo, useCallback, useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { squadOnDevice } from '../../store/board';
import { useBoardUi } from '../../store/board-ui';
import { openRunsQuery, runsOnDayQuery, targetsQuery, useSetTarget } from '../../store/clock';
import { useActiveMembership } from '../../store/session';
import { localDay } from '../../sync';
import { Banner, Button, Heading, Loading, Screen, Text, colors, clockTime, radius, spacing, useBreakpoint } from '../ui';
import { ClockCaution } from './clock-caution';
import {
  distanceLabel,
  laneReadout,
  layoutFor,
  scheduleForRun,
  targetFor,
  trackLabel,
  type ClockRun,
  type ClockTarget,
} from './clock-math';
import type { LaneView } from './lane-button';
import { LiveHeatView } from './live-heat';
import { RunTable, type RunTableActions } from './run-table';
import { SetupPanel, StartButton } from './setup-panel';
import { TargetEditor, type TargetSave } from './target-editor';
import { RESUME_WITHIN_MS, laneOrder, useHeatActions, useResumeHeat } from './use-heat';
import { useClockUi } from './use-clock';
import { useWakeLock } from './wake-lock';

const EMPTY_RUNS: ClockRun[] = [];

export function ClockScreen() {
  const wide = useBreakpoint() === 'wide';
  const router = useRouter();
  const membership = useActiveMembership();
  const teamId = membership?.teamId ?? '';
  const [today] = useState(() => localDay(Date.now()));

  const live = useClockUi((s) => s.live);
  const shownHeatId = useClockUi((s) => s.shownHeatId);
  const day = live?.day ?? today;

  const squad = useQuery({ ...squadOnDevice(teamId), enabled: !!teamId });
  const targetsQ = useQuery({ ...targetsQuery(teamId), enabled: !!teamId });
  const dayRuns = useQuery({ ...runsOnDayQuery(teamId, day), enabled: !!teamId });
  const openRuns = useQuery({ ...openRunsQuery(teamId), enabled: !!teamId });
  const setTarget = useSetTarget(teamId);

  const targets = targetsQ.data as ClockTarget[] | undefined;
  const runs = (dayRuns.data as ClockRun[] | undefined) ?? EMPTY_RUNS;
  const names = useMemo(() => new Map((squad.data?.everyone ?? []).map((s) => [s.id, s.displayName])), [squad.data]);
  const nameOf = useCallback((id: string) => names.get(id) ?? 'A skater', [names]);

  useResumeHeat(openRuns.data as ClockRun[] | undefined);

  // The live heat's runs, in lane order (inner, outer, then the group as started).
  const heatRuns = useMemo(() => {
    if (!live) return EMPTY_RUNS;
    const byId = new Map(runs.filter((r) => r.heatId === live.heatId).map((r) => [r.id, r]));
    // Before the start is written the day's list does not hold the runs yet: the open runs may.
    for (const r of (openRuns.data as ClockRun[] | undefined) ?? []) if (r.heatId === live.heatId && !byId.has(r.id)) byId.set(r.id, r);
    return live.runIds.map((id) => byId.get(id)).filter((r): r is ClockRun => !!r);
  }, [live, runs, openRuns.data]);

  const actions = useHeatActions(teamId, heatRuns, targets, nameOf);
  const wake = useWakeLock(!!live);

  // The heat ends by itself once every lane has finished or stopped.
  const allDone = !!live && heatRuns.length === live.runIds.length && heatRuns.every((r) => r.status !== 'running');
  useEffect(() => {
    if (allDone && useClockUi.getState().live?.heatId === live?.heatId) useClockUi.getState().endHeat();
  }, [allDone, live?.heatId]);

  const openOnBoard = useCallback(
    (skaterId: string) => {
      useBoardUi.setState({ selected: [skaterId] });
      router.push('/board');
    },
    [router],
  );
  const tableActions: RunTableActions = useMemo(() => ({ ...actions.tableActions, onOpenSkater: openOnBoard }), [actions.tableActions, openOnBoard]);

  const [editingTarget, setEditingTarget] = useState<string | null>(null);
  const setup = useClockUi((s) => s.setup);
  const saveTarget = useCallback((t: TargetSave) => setTarget.mutateAsync(t), [setTarget]);

  if (!teamId) return <Loading label="Finding your team…" testID="clock-home" />;
  if (squad.isPending || dayRuns.isPending || openRuns.isPending) {
    return <Loading label="Opening the clock on this device…" testID="clock-home" />;
  }
  const loadError = squad.error ?? dayRuns.error ?? openRuns.error ?? targetsQ.error;
  if (loadError) {
    return (
      <Screen testID="clock-home" edges={[]}>
        <Banner kind="error" title="The clock could not be opened" testID="clock-load-error">
          {loadError.message}
        </Banner>
      </Screen>
    );
  }

  // ---- timing ------------------------------------------------------------------------------------
  if (live) {
    const lanes: LaneView[] = heatRuns.map((run, i) => laneView(run, i, nameOf, targets));
    const table = wide ? (
      <>
        {heatRuns.map((run, i) => (
          <RunTable
            key={run.id}
            {...runTableFor(run, i, nameOf, targets)}
            wide
            live
            testID={`live-table-${lanes[i].key}`}
            {...tableActions}
          />
        ))}
      </>
    ) : undefined;
    return (
      <View style={styles.fill} testID="clock-home">
        <LiveHeatView
          heat={live}
          lanes={lanes}
          wide={wide}
          wake={wake}
          onEnd={actions.endHeat}
          onTap={actions.tap}
          onUndo={actions.undoLast}
          onStop={actions.stop}
          onFinish={actions.finishFree}
          onResume={actions.resumeRun}
          table={table}
        />
      </View>
    );
  }

  // ---- setting up, and the day's heats -----------------------------------------------------------
  const skaters = squad.data?.skaters ?? [];
  const stale = ((openRuns.data as ClockRun[] | undefined) ?? []).filter((r) => Date.now() - Date.parse(r.startedAt) >= RESUME_WITHIN_MS);
  const editor = editingTarget ? (
    <TargetEditor
      key={`${editingTarget}/${setup.track}/${setup.distanceM}`}
      skaterId={editingTarget}
      skaterName={nameOf(editingTarget)}
      distanceM={setup.distanceM}
      track={setup.track}
      existing={targetFor(targets, editingTarget, setup.distanceM, setup.track)}
      onSave={saveTarget}
      onClose={() => setEditingTarget(null)}
    />
  ) : null;
  const setupPanel = (
    <View style={styles.section}>
      <Heading level={2}>New heat</Heading>
      {editor ?? (
        <SetupPanel
          skaters={skaters}
          targets={targets}
          onStart={actions.startHeat}
          onEditTarget={setEditingTarget}
          starting={actions.starting}
          wide={wide}
          inlineStart={false}
        />
      )}
    </View>
  );
  const notice = <SetupNotice />;
  const staleNote =
    stale.length > 0 ? (
      <Banner kind="info" title="Runs left running earlier" testID="clock-stale">
        <Text style={{ color: colors.info }}>
          {`${stale.length} run${stale.length === 1 ? ' was' : 's were'} never finished (the page closed mid-race). Their crossings are kept.`}
        </Text>
        <Button
          label="Close them as stopped"
          variant="secondary"
          testID="clock-stale-close"
          onPress={() => stale.forEach((r) => actions.stop(r.id, 'Not finished: timing was interrupted'))}
        />
      </Banner>
    ) : null;
  const dayList = (
    <DayHeats runs={runs} nameOf={nameOf} targets={targets} shownHeatId={shownHeatId} wide={wide} actions={tableActions} />
  );

  if (wide) {
    return (
      <Screen testID="clock-home" edges={[]} width="full">
        <Heading>Clock</Heading>
        {notice}
        {staleNote}
        <View style={styles.wideRow}>
          <View style={[styles.pane, styles.setupPane]}>{setupPanel}</View>
          <View style={styles.dayCol}>
            {editingTarget ? null : <StartButton skaters={skaters} onStart={actions.startHeat} starting={actions.starting} />}
            <ClockCaution />
            <View style={styles.pane}>{dayList}</View>
          </View>
        </View>
      </Screen>
    );
  }
  // Phone: the page scrolls; Start waits in a bar at the bottom, always under the thumb.
  return (
    <View style={styles.fill} testID="clock-home">
      <Screen edges={[]}>
        <Heading>Clock</Heading>
        {/* One line while a finished heat's table is on show, so the times come first. */}
        <ClockCaution short={!!shownHeatId} />
        {notice}
        {staleNote}
        {shownHeatId ? dayList : null}
        {setupPanel}
        {shownHeatId ? null : dayList}
      </Screen>
      {editingTarget ? null : (
        <View style={styles.startBar} testID="clock-start-bar">
          <StartButton skaters={skaters} onStart={actions.startHeat} starting={actions.starting} compact />
        </View>
      )}
    </View>
  );
}

/** What the clock last said (an error starting, runs closed), until the next heat starts. */
function SetupNotice() {
  const notice = useClockUi((s) => s.notice);
  const clear = useClockUi((s) => s.clearNotice);
  useEffect(() => {
    if (!notice || notice.kind === 'error') return;
    const timer = setTimeout(clear, 6000);
    return () => clearTimeout(timer);
  }, [notice, clear]);
  if (!notice || notice.kind === 'ignored') return null;
  return (
    <Banner kind={notice.kind === 'error' ? 'error' : 'info'} testID="clock-setup-notice">
      {notice.text}
    </Banner>
  );
}

/** A run's lane in its heat: "inner", "outer", or "group-N" (its place in the group, from 1). */
const laneKey = (run: ClockRun, index: number) => (run.lane === 'group' ? `group-${index + 1}` : run.lane);

/** A run's table's own props: the skater, their number in a group, the schedule and target it is measured against. */
function runTableFor(run: ClockRun, index: number, nameOf: (id: string) => string, targets?: readonly ClockTarget[]) {
  return {
    run,
    name: nameOf(run.skaterId),
    number: run.lane === 'group' ? index + 1 : undefined,
    schedule: scheduleForRun(run, targets),
    target: targetFor(targets, run.skaterId, run.distanceM, run.track),
  };
}

function laneView(run: ClockRun, index: number, nameOf: (id: string) => string, targets?: readonly ClockTarget[]): LaneView {
  const schedule = scheduleForRun(run, targets);
  const times = run.crossings.map((c) => c.atMs);
  const number = run.lane === 'group' ? index + 1 : undefined;
  return {
    runId: run.id,
    key: laneKey(run, index),
    lane: run.lane,
    number,
    name: nameOf(run.skaterId),
    status: run.status,
    stopReason: run.stopReason,
    readout: laneReadout(run, times, schedule),
    hasTarget: !!schedule,
    free: layoutFor(run.distanceM, run.track).free,
  };
}

/** The day's heats, newest first; the one just finished opens with its tables. */
const DayHeats = memo(function DayHeats({
  runs,
  nameOf,
  targets,
  shownHeatId,
  wide,
  actions,
}: {
  runs: readonly ClockRun[];
  nameOf: (id: string) => string;
  targets?: readonly ClockTarget[];
  shownHeatId: string | null;
  wide: boolean;
  actions: RunTableActions;
}) {
  const heats = useMemo(() => {
    const byHeat = new Map<string, ClockRun[]>();
    for (const r of runs) byHeat.set(r.heatId, [...(byHeat.get(r.heatId) ?? []), r]);
    return [...byHeat.entries()]
      .map(([heatId, rs]) => ({ heatId, runs: rs.sort((a, b) => laneOrder(a) - laneOrder(b) || a.id.localeCompare(b.id)) }))
      .sort((a, b) => b.runs[0].startedAt.localeCompare(a.runs[0].startedAt));
  }, [runs]);
  const [open, setOpen] = useState<Set<string>>(() => new Set());
  const toggle = (id: string) =>
    setOpen((old) => {
      const next = new Set(old);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });

  return (
    <View style={styles.section} testID="clock-day">
      <Heading level={2}>Today’s runs</Heading>
      {heats.length === 0 ? (
        <Text tone="muted" testID="clock-day-empty">
          No runs timed today on this device yet. Timed runs are kept here and go to the team with the next sync.
        </Text>
      ) : null}
      {heats.map(({ heatId, runs: hr }, index) => {
        const shown = heatId === shownHeatId || open.has(heatId);
        const first = hr[0];
        const who = hr.map((r) => nameOf(r.skaterId)).join(hr.length === 2 ? ' and ' : ', ');
        const key = `heat-${heats.length - index}`;
        return (
          <View key={heatId} style={[styles.heat, heatId === shownHeatId && styles.heatShown]} testID={heatId === shownHeatId ? 'clock-last-heat' : `clock-${key}`}>
            <View style={styles.heatHead}>
              <View style={styles.grow}>
                <Text weight="bold" variant="bodyLarge">
                  {`${clockTime(first.startedAt)} · ${distanceLabel(first.distanceM)} ${trackLabel(first.track).toLowerCase()}`}
                </Text>
                <Text>{who}</Text>
              </View>
              <Button
                label={shown ? 'Hide' : 'Show'}
                accessibilityLabel={`${shown ? 'Hide' : 'Show'} the table of ${clockTime(first.startedAt)}, ${who}`}
                variant="secondary"
                testID={`clock-${key}-toggle`}
                onPress={() => (heatId === shownHeatId ? useClockUi.getState().showHeat(null) : toggle(heatId))}
              />
            </View>
            {shown
              ? hr.map((run, i) => (
                  <RunTable
                    key={run.id}
                    {...runTableFor(run, i, nameOf, targets)}
                    wide={wide}
                    testID={`run-${laneKey(run, i)}${heatId === shownHeatId ? '' : `-${key}`}`}
                    {...actions}
                  />
                ))
              : null}
          </View>
        );
      })}
    </View>
  );
});

const styles = StyleSheet.create({
  fill: { flex: 1 },
  section: { gap: spacing.md },
  grow: { flex: 1, minWidth: 0 },
  wideRow: { flexDirection: 'row', gap: spacing.xl, alignItems: 'flex-start' },
  pane: { padding: spacing.lg, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.divider, backgroundColor: colors.surface },
  setupPane: { flex: 1, minWidth: 0 },
  dayCol: { width: 460, gap: spacing.lg },
  startBar: {
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.xs,
    borderTopWidth: 1,
    borderTopColor: colors.divider,
    backgroundColor: colors.background,
  },
  heat: { gap: spacing.md, paddingTop: spacing.md, borderTopWidth: 1, borderTopColor: colors.divider },
  heatShown: { borderTopWidth: 3, borderTopColor: colors.primary },
  heatHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
});
