/**
 * The heat's actions, between the screen and the device store (store/clock.ts):
 * - start: one run per lane written in one transaction, the run ids made here so the lanes paint
 *   before the write commits; the start instant is the Start tap's own event time;
 * - tap: the double-tap rule, then the crossing written at once (a reload loses nothing), the
 *   split read aloud (never piling up), and the run finished at its last split;
 * - undo (the lane's last crossing; a run finished by it runs again), stop with a reason, resume a
 *   stopped skater, end the heat;
 * - after the race: edit, delete, add (hand-timed) crossings and mark a run finished;
 * - resume: after a reload, the newest heat this coach left running is timed on, its clock
 *   rebuilt from the wall-clock start (crossings already stored are exact).
 *
 * The latest runs are read through a ref at the tap, so a tap never waits for a render.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo, useRef } from 'react';
import { v7 as uuidv7 } from 'uuid';

import { localDay } from '../../sync';
import {
  correctedNow,
  useDeleteCrossing,
  useEditCrossing,
  useEditRun,
  useFinishRun,
  useRecordCrossing,
  useStartHeat,
  useUndoCrossing,
} from '../../store/clock';
import * as speech from '../../store/speech';
import {
  DOUBLE_TAP_MS,
  FREE_LAPS,
  crossingAtMs,
  layoutFor,
  scheduleForRun,
  sectionName,
  splitSentence,
  targetFor,
  type ClockRun,
  type ClockTarget,
} from './clock-math';
import { setupLanes, setupOffset } from './setup-panel';
import { createSplitVoice } from './split-voice';
import { useClockUi } from './use-clock';
import { formatRaceTime } from '../../shared/timing';

/** A heat left running longer ago than this is not resumed: it is offered for closing instead. */
export const RESUME_WITHIN_MS = 6 * 3600_000;

/** One voice for the app: a heat's sentences never pile up, whichever screen is open. */
const voice = createSplitVoice(speech);
export const splitVoice = voice;

export function useHeatActions(teamId: string, heatRuns: readonly ClockRun[], targets: readonly ClockTarget[] | undefined, nameOf: (id: string) => string) {
  const start = useStartHeat(teamId);
  const record = useRecordCrossing(teamId);
  const undo = useUndoCrossing(teamId);
  const remove = useDeleteCrossing(teamId);
  const edit = useEditCrossing(teamId);
  const finish = useFinishRun(teamId);
  const editRun = useEditRun(teamId);

  const runsRef = useRef(heatRuns);
  runsRef.current = heatRuns;
  const targetsRef = useRef(targets);
  targetsRef.current = targets;
  const nameRef = useRef(nameOf);
  nameRef.current = nameOf;
  const client = useQueryClient();

  const firstName = (skaterId: string) => nameRef.current(skaterId).split(/\s+/)[0] || 'the skater';

  const startHeat = useCallback(
    async (timeStamp: number) => {
      const ui = useClockUi.getState();
      if (ui.live) return;
      const { setup } = ui;
      const lanes = setupLanes(setup);
      const offset = setupOffset(setup);
      if (lanes.length === 0 || offset.error) return;
      // The wall clock at the moment of the tap (not when this code runs): display, and the anchor
      // a reload rebuilds the clock from.
      const startedAtMs = Date.now() - Math.max(0, performance.now() - timeStamp);
      const startedAt = new Date(startedAtMs).toISOString();
      const heatId = uuidv7();
      const runs = lanes.map((l) => ({
        id: uuidv7(),
        skaterId: l.skaterId,
        distanceM: setup.distanceM,
        track: setup.track,
        lane: l.lane,
        startOffsetMs: offset.ms,
        targetMs: targetFor(targetsRef.current, l.skaterId, setup.distanceM, setup.track)?.targetMs ?? null,
      }));
      ui.startHeat({
        heatId,
        runIds: runs.map((r) => r.id),
        startPerfTs: timeStamp,
        startedAt,
        day: localDay(startedAtMs),
        offsetMs: offset.ms,
        distanceM: setup.distanceM,
        track: setup.track,
        resumed: false,
      });
      voice.hush();
      try {
        await start.mutateAsync({ heatId, startedAt, day: localDay(startedAtMs), runs });
      } catch (error) {
        useClockUi.getState().endHeat();
        useClockUi.getState().showHeat(null);
        useClockUi.getState().say('error', `The heat could not be started on this device: ${error instanceof Error ? error.message : String(error)}`);
      }
    },
    [start],
  );

  const tap = useCallback(
    (runId: string, ts: number) => {
      const ui = useClockUi.getState();
      const live = ui.live;
      const run = runsRef.current.find((r) => r.id === runId);
      if (!live || !run || run.status !== 'running') return;
      const who = firstName(run.skaterId);
      const last = ui.lastTap[runId] ?? live.startPerfTs;
      const atMs = crossingAtMs(ts, live.startPerfTs, live.offsetMs);
      const before = run.crossings.length ? run.crossings[run.crossings.length - 1].atMs : live.offsetMs;
      if (ts - last < DOUBLE_TAP_MS || atMs - before < DOUBLE_TAP_MS) {
        ui.say('ignored', `Second tap for ${who} within ${DOUBLE_TAP_MS / 1000} s: ignored as a double tap.`);
        return;
      }
      ui.acceptTap(runId, ts);
      record.mutate({ runId, atMs });
      const times = [...run.crossings.map((c) => c.atMs), atMs];
      if (ui.voiceOn) {
        const schedule = scheduleForRun(run, targetsRef.current);
        try {
          voice.say(runId, splitSentence(run, times, schedule, runsRef.current.length > 1 ? who : undefined));
        } catch {
          // A sentence that cannot be made (more crossings than splits) is simply not read.
        }
      }
      const layout = layoutFor(run.distanceM, run.track, times.length);
      if (!layout.free && times.length >= layout.splitsAtM.length) {
        finish.mutate({ runId, status: 'finished' });
      }
    },
    [record, finish],
  );

  const undoLast = useCallback(
    (runId: string) => {
      const run = runsRef.current.find((r) => r.id === runId);
      const last = run?.crossings[run.crossings.length - 1];
      if (!run || !last) return;
      const ui = useClockUi.getState();
      voice.hush();
      ui.forgetTap(runId);
      undo.mutate({ id: last.id, runId });
      if (run.status === 'finished') editRun.mutate({ runId, status: 'running' });
      const layout = layoutFor(run.distanceM, run.track, run.crossings.length);
      const name = sectionName(run.crossings.length - 1, layout);
      ui.say('info', `Undone: ${firstName(run.skaterId)}’s ${name.toLowerCase() === 'finish' ? 'finish' : name} (${formatRaceTime(last.atMs)}).`);
    },
    [undo, editRun],
  );

  const stop = useCallback(
    (runId: string, reason: string) => {
      const run = runsRef.current.find((r) => r.id === runId);
      if (!run) return;
      finish.mutate({ runId, status: 'stopped', stopReason: reason });
      useClockUi.getState().say('info', `${firstName(run.skaterId)} stopped: ${reason}. The times so far are kept.`);
    },
    [finish],
  );

  const finishFree = useCallback((runId: string) => finish.mutate({ runId, status: 'finished' }), [finish]);

  const resumeRun = useCallback(
    (runId: string) => {
      editRun.mutate({ runId, status: 'running', stopReason: '' });
    },
    [editRun],
  );

  const endHeat = useCallback(() => {
    for (const run of runsRef.current) {
      if (run.status !== 'running') continue;
      if (run.distanceM === FREE_LAPS) finish.mutate({ runId: run.id, status: 'finished' });
      else finish.mutate({ runId: run.id, status: 'stopped', stopReason: 'Timing ended before the finish' });
    }
    useClockUi.getState().endHeat();
  }, [finish]);

  // ---- after the race --------------------------------------------------------------------------
  const tableActions = useMemo(
    () => ({
      onEditCrossing: (id: string, patch: { atMs?: number; handTimed?: boolean }) => edit.mutateAsync({ id, ...patch }),
      onDeleteCrossing: (id: string) => remove.mutateAsync({ id }),
      onAddCrossing: (runId: string, atMs: number) => record.mutateAsync({ runId, atMs, handTimed: true }),
      onMarkFinished: (runId: string) => finish.mutateAsync({ runId, status: 'finished' }),
    }),
    [edit, remove, record, finish],
  );

  return { startHeat, tap, undoLast, stop, finishFree, resumeRun, endHeat, tableActions, starting: start.isPending, client };
}

/**
 * After a reload (or a crash), picks up the newest heat this coach left running: its lanes come
 * back with every stored crossing, and the clock is rebuilt from the stored start (wall-clock
 * time as the store keeps it, corrected by the server's). Runs left running longer ago than
 * RESUME_WITHIN_MS are not resumed: the screen offers to close them.
 */
export function useResumeHeat(openRuns: readonly ClockRun[] | undefined) {
  const checked = useClockUi((s) => s.resumeChecked);
  useEffect(() => {
    const ui = useClockUi.getState();
    if (checked || openRuns === undefined) return;
    ui.markResumeChecked();
    if (ui.live) return;
    const fresh = openRuns.filter((r) => Date.now() - Date.parse(r.startedAt) < RESUME_WITHIN_MS);
    if (fresh.length === 0) return;
    const newest = [...fresh].sort((a, b) => b.startedAt.localeCompare(a.startedAt))[0];
    const runs = fresh
      .filter((r) => r.heatId === newest.heatId)
      .sort((a, b) => laneOrder(a) - laneOrder(b) || a.id.localeCompare(b.id));
    const startedAtMs = Date.parse(newest.startedAt);
    // The setup comes back as the heat was set up, for the next repetition after this one.
    const pair = runs.every((r) => r.lane !== 'group');
    ui.patchSetup({
      distanceM: newest.distanceM,
      track: newest.track,
      mode: pair ? 'pair' : 'group',
      inner: pair ? runs.find((r) => r.lane === 'inner')?.skaterId ?? null : ui.setup.inner,
      outer: pair ? runs.find((r) => r.lane === 'outer')?.skaterId ?? null : ui.setup.outer,
      group: pair ? ui.setup.group : runs.map((r) => r.skaterId),
      offsetMode: newest.startOffsetMs ? 'direct' : 'none',
      offsetText: (newest.startOffsetMs / 1000).toFixed(2),
    });
    void (async () => {
      // startedAt is stored in the server's time (the device clock corrected by it): "now" must be
      // read the same way. performance.now() ticks with it, so the start sits that far back on
      // this page's performance clock.
      let now: number;
      try {
        now = await correctedNow();
      } catch {
        now = Date.now();
      }
      const perfNow = performance.now();
      if (useClockUi.getState().live) return;
      useClockUi.getState().startHeat({
        heatId: newest.heatId,
        runIds: runs.map((r) => r.id),
        startPerfTs: perfNow - (now - startedAtMs),
        startedAt: newest.startedAt,
        day: newest.day,
        offsetMs: newest.startOffsetMs,
        distanceM: newest.distanceM,
        track: newest.track,
        resumed: true,
      });
    })();
  }, [checked, openRuns]);
}

export const laneOrder = (run: Pick<ClockRun, 'lane'>) => (run.lane === 'inner' ? 0 : run.lane === 'outer' ? 1 : 2);
