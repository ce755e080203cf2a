/**
 * React-query over the device store for the clock (issue #9): the day's runs with their
 * crossings, the runs left running (to resume after a reload), the team's targets, and every
 * write the clock makes. Reads never touch the network (networkMode 'always'); the sync engine's
 * onChanged re-reads them (the coach shell invalidates everything under ['device']).
 *
 * A crossing is the hot path: `useRecordCrossing().mutate` paints the crossing into every cached
 * list holding its run in the same frame as the tap, then writes row + outbox entry in one small
 * transaction (a reload mid-race loses nothing). It is not a useMutation, so a tap re-renders only
 * what reads the runs, not the hook's host twice more. A failed write takes the crossing back out
 * and says why (`isError`, `error`, `variables`).
 *
 * Every write tells sync a change is waiting (notifyLocalChange) and re-reads the outbox counts
 * once the writes go quiet.
 */
import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { v7 as uuidv7 } from 'uuid';
import type {
  Crossing,
  CrossingPatch,
  HeatStart,
  Run,
  RunCrossing,
  RunPatch,
  RunWithCrossings,
  Target,
  TargetInput,
} from '../shared/schemas/clock';
import { deviceStore } from '../sync';
import { boardKeys } from './board';
import { useMountedRef } from './use-mounted-ref';
import { useActiveMembership, useSession } from './session';
import { notifyLocalChange } from './sync-status';

export type { Crossing, Run, RunCrossing, RunDraft, RunWithCrossings, Target, TargetInput } from '../shared/schemas/clock';

export const clockKeys = {
  /** Every clock query of every team. */
  all: ['device', 'clock'] as const,
  team: (teamId: string) => ['device', 'clock', teamId] as const,
  /** Prefix of every cached list of runs of the team (a day's, the open ones). */
  runs: (teamId: string) => ['device', 'clock', teamId, 'runs'] as const,
  runsOnDay: (teamId: string, day: string) => ['device', 'clock', teamId, 'runs', 'day', day] as const,
  openRuns: (teamId: string) => ['device', 'clock', teamId, 'runs', 'open'] as const,
  targets: (teamId: string) => ['device', 'clock', teamId, 'targets'] as const,
  /**
   * One skater's runs of a day for their today page: under the today page's prefix
   * (store/today.ts todayKeys.all), so its refresh after a sync re-reads them too.
   */
  skaterRuns: (teamId: string, skaterId: string, day: string) => ['device', 'today', teamId, skaterId, 'runs', day] as const,
};

const local = { networkMode: 'always', staleTime: Infinity, retry: false } as const;

/**
 * Crossing writes painted but not committed yet (by crossing id; null: being deleted). A re-read of
 * the runs (another write settling, a sync) can run while a tap's write still waits in the store's
 * queue: laid over what it read, the tap stays on screen instead of blinking out and back.
 */
const inFlight = new Map<string, { runId: string; crossing: RunCrossing | null }>();

const byTime = (a: RunCrossing, b: RunCrossing) => a.atMs - b.atMs || a.id.localeCompare(b.id);

function overlay(runs: RunWithCrossings[]): RunWithCrossings[] {
  if (inFlight.size === 0) return runs;
  return runs.map((run) => {
    const pending = [...inFlight.entries()].filter(([, p]) => p.runId === run.id);
    if (pending.length === 0) return run;
    const gone = new Set(pending.map(([id]) => id));
    const added = pending.map(([, p]) => p.crossing).filter((c): c is RunCrossing => c !== null);
    return { ...run, crossings: [...run.crossings.filter((c) => !gone.has(c.id)), ...added].sort(byTime) };
  });
}

/** The team's runs of a rink day, newest first, each with its crossings sorted by atMs. */
export const runsOnDayQuery = (teamId: string, day: string) =>
  queryOptions({
    ...local,
    queryKey: clockKeys.runsOnDay(teamId, day),
    queryFn: async (): Promise<RunWithCrossings[]> => overlay(await (await deviceStore()).listRunsOnDay(teamId, day)),
  });

/**
 * Runs left running, newest first, with their crossings: the signed-in coach's only (the device
 * holds one person's rows; other coaches' open runs pulled here are theirs to finish).
 */
export const openRunsQuery = (teamId: string) =>
  queryOptions({
    ...local,
    queryKey: clockKeys.openRuns(teamId),
    queryFn: async (): Promise<RunWithCrossings[]> => {
      const store = await deviceStore();
      return overlay(await store.listOpenRuns(teamId, store.user ?? undefined));
    },
  });

/** The team's targets on this device (the screen picks by skater, track and distance). */
export const targetsQuery = (teamId: string) =>
  queryOptions({ ...local, queryKey: clockKeys.targets(teamId), queryFn: async (): Promise<Target[]> => (await deviceStore()).listTargets(teamId) });

/** One skater's runs of a day (the today page), in the order they were timed, with crossings. */
export const skaterRunsQuery = (teamId: string, skaterId: string, day: string) =>
  queryOptions({
    ...local,
    queryKey: clockKeys.skaterRuns(teamId, skaterId, day),
    queryFn: async (): Promise<RunWithCrossings[]> => (await deviceStore()).runsForSkater(teamId, skaterId, day),
  });

export function useSkaterRuns(teamId: string, skaterId: string, day: string) {
  return useQuery({ ...skaterRunsQuery(teamId, skaterId, day), enabled: !!teamId && !!skaterId });
}

/**
 * Now on the device's clock corrected by the server's: the time a stored run's startedAt is in.
 * Rebuilding a running clock after a reload: elapsed = (await correctedNow()) - Date.parse(startedAt).
 */
export async function correctedNow(): Promise<number> {
  return (await deviceStore()).correctedNow();
}

// ---- cache helpers ---------------------------------------------------------------------------

/** How long the device must be free of clock writes before the outbox counts are re-read. */
const OUTBOX_REFRESH_MS = 1000;
const outboxTimers = new WeakMap<QueryClient, ReturnType<typeof setTimeout>>();

/** A change was written: sync hears of it at once, the waiting counts once the taps go quiet. */
function changed(client: QueryClient) {
  notifyLocalChange();
  clearTimeout(outboxTimers.get(client));
  outboxTimers.set(
    client,
    setTimeout(() => {
      outboxTimers.delete(client);
      void client.invalidateQueries({ queryKey: boardKeys.outbox() });
    }, OUTBOX_REFRESH_MS),
  );
}

/** Changes one run wherever a cached list of the team holds it (other runs keep their objects). */
function patchRun(client: QueryClient, teamId: string, runId: string, change: (run: RunWithCrossings) => RunWithCrossings) {
  client.setQueriesData<RunWithCrossings[]>({ queryKey: clockKeys.runs(teamId) }, (old) =>
    old?.some((r) => r.id === runId) ? old.map((r) => (r.id === runId ? change(r) : r)) : old,
  );
}

/** Every cached run list of the team, to put back when a write fails. */
const snapshot = (client: QueryClient, teamId: string) => client.getQueriesData<RunWithCrossings[]>({ queryKey: clockKeys.runs(teamId) });
const restore = (client: QueryClient, saved: ReturnType<typeof snapshot> | undefined) => {
  for (const [key, data] of saved ?? []) client.setQueryData(key, data);
};

/** Re-reads the team's run lists (after a write settles, to take the store's word). */
const rereadRuns = (client: QueryClient, teamId: string) => client.invalidateQueries({ queryKey: clockKeys.runs(teamId) });

function useWriter() {
  const userId = useSession((s) => s.user?.id ?? '');
  const authorName = useSession((s) => s.user?.displayName ?? '');
  const role = useActiveMembership()?.role;
  const ref = useRef({ userId, authorName, role });
  ref.current = { userId, authorName, role };
  return ref;
}

type DeviceStore = Awaited<ReturnType<typeof deviceStore>>;
type Writer = ReturnType<typeof useWriter>['current'];

/**
 * A write to runs or crossings painted at once: `paint` changes the cached run lists before the
 * store writes (it gets the lists as they were), and they are put back if the store refuses;
 * either way the lists are re-read after, to take the store's word, and sync hears of it.
 */
function usePaintedRunWrite<TArgs, TResult>(
  teamId: string,
  write: (store: DeviceStore, args: TArgs, writer: Writer) => Promise<TResult>,
  paint: (client: QueryClient, args: TArgs, saved: ReturnType<typeof snapshot>) => void,
) {
  const client = useQueryClient();
  const writer = useWriter();
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: TArgs): Promise<TResult> => {
      const who = writer.current;
      return write(await deviceStore(), args, who);
    },
    onMutate: async (args) => {
      const saved = snapshot(client, teamId);
      paint(client, args, saved);
      return { saved };
    },
    onError: (_error, _args, context) => restore(client, context?.saved),
    onSettled: () => {
      void rereadRuns(client, teamId);
      changed(client);
    },
  });
}

// ---- writes ------------------------------------------------------------------------------------

export type StartHeatArgs = Pick<HeatStart, 'heatId' | 'startedAt' | 'day' | 'runs'>;

/**
 * Starts a heat: every run row and its outbox entry in one transaction. The runs appear in the
 * day's list and the open runs at once (the caller may pass run ids to paint its lanes first).
 * Resolves to the stored runs.
 */
export function useStartHeat(teamId: string) {
  const client = useQueryClient();
  const writer = useWriter();
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: StartHeatArgs): Promise<Run[]> => {
      const { userId, authorName } = writer.current;
      return (await deviceStore()).startHeat({ ...args, teamId, userId, authorName });
    },
    onSuccess: (runs) => {
      const added: RunWithCrossings[] = runs.map((run) => ({ ...run, crossings: [] }));
      const day = runs[0]?.day;
      if (day) client.setQueryData<RunWithCrossings[]>(clockKeys.runsOnDay(teamId, day), (old) => (old ? [...added, ...old] : old));
      client.setQueryData<RunWithCrossings[]>(clockKeys.openRuns(teamId), (old) => (old ? [...added, ...old] : old));
    },
    onSettled: () => {
      void rereadRuns(client, teamId);
      changed(client);
    },
  });
}

export interface RecordCrossingArgs {
  runId: string;
  atMs: number;
  handTimed?: boolean;
  /** Made here when left out (the crossing is painted under it before the write). */
  id?: string;
}

/**
 * One tap on a lane button. `mutate` paints the crossing in the same frame (no await before the
 * paint) and writes it right after; `mutateAsync` does the same and resolves to the stored
 * crossing (or rejects, with the crossing taken back out). Both are stable.
 */
export function useRecordCrossing(teamId: string) {
  const client = useQueryClient();
  const writer = useWriter();
  const mounted = useMountedRef();
  const [failure, setFailure] = useState<{ error: Error; variables: RecordCrossingArgs } | null>(null);

  const mutateAsync = useCallback(
    async (args: RecordCrossingArgs): Promise<Crossing> => {
      const id = args.id ?? uuidv7();
      const painted: RunCrossing = { id, atMs: args.atMs, handTimed: args.handTimed ?? false };
      patchRun(client, teamId, args.runId, (run) => ({ ...run, crossings: [...run.crossings, painted].sort(byTime) }));
      inFlight.set(id, { runId: args.runId, crossing: painted });
      const { userId, role } = writer.current;
      try {
        const stored = await (await deviceStore()).recordCrossing({ ...args, id, userId, role });
        // A User Timing mark: the benchmark measures tap-to-commit from it (cheap, standard API).
        performance.mark?.('boardside:crossing-committed', { detail: id });
        return stored;
      } catch (error) {
        patchRun(client, teamId, args.runId, (run) => ({ ...run, crossings: run.crossings.filter((c) => c.id !== id) }));
        const failed = error instanceof Error ? error : new Error(String(error));
        if (mounted.current) setFailure({ error: failed, variables: { ...args, id } });
        throw failed;
      } finally {
        inFlight.delete(id);
        changed(client);
      }
    },
    [client, teamId, writer],
  );
  const mutate = useCallback((args: RecordCrossingArgs) => void mutateAsync(args).catch(() => undefined), [mutateAsync]);

  return useMemo(
    () => ({ mutate, mutateAsync, isError: failure !== null, error: failure?.error ?? null, variables: failure?.variables, reset: () => setFailure(null) }),
    [mutate, mutateAsync, failure],
  );
}

export interface CrossingRef {
  id: string;
  /** The crossing's run, when the caller knows it (the lists are searched otherwise). */
  runId?: string;
}

/**
 * Deletes crossings by id: taken off the screen at once; gone without a trace if they never left
 * the device, else a delete that syncs.
 */
export function useDeleteCrossing(teamId: string) {
  return usePaintedRunWrite(
    teamId,
    async (store, args: CrossingRef, { userId, role }) => {
      try {
        await store.removeCrossings([args.id], userId, role);
      } finally {
        inFlight.delete(args.id);
      }
    },
    (client, args, saved) => {
      const runId = args.runId ?? saved.flatMap(([, runs]) => runs ?? []).find((r) => r.crossings.some((c) => c.id === args.id))?.id;
      if (runId) inFlight.set(args.id, { runId, crossing: null });
      client.setQueriesData<RunWithCrossings[]>({ queryKey: clockKeys.runs(teamId) }, (old) =>
        old?.some((r) => (args.runId === undefined || r.id === args.runId) && r.crossings.some((c) => c.id === args.id))
          ? old.map((r) => (r.crossings.some((c) => c.id === args.id) ? { ...r, crossings: r.crossings.filter((c) => c.id !== args.id) } : r))
          : old,
      );
    },
  );
}

/** Undo of the last tap on a lane: the same as deleting that crossing. */
export const useUndoCrossing = useDeleteCrossing;

/** Moves a crossing's time or marks it hand-timed (after the race). */
export function useEditCrossing(teamId: string) {
  return usePaintedRunWrite(
    teamId,
    (store, { id, ...patch }: { id: string } & CrossingPatch, { userId, role }): Promise<Crossing> => store.updateCrossing(id, userId, patch, role),
    (client, { id, ...patch }) => {
      client.setQueriesData<RunWithCrossings[]>({ queryKey: clockKeys.runs(teamId) }, (old) =>
        old?.some((r) => r.crossings.some((c) => c.id === id))
          ? old.map((r) =>
              r.crossings.some((c) => c.id === id) ? { ...r, crossings: r.crossings.map((c) => (c.id === id ? { ...c, ...patch } : c)).sort(byTime) } : r,
            )
          : old,
      );
    },
  );
}

export type EditRunArgs = { runId: string } & RunPatch;

/** Changes a run (its note, its status, what was set up wrong); painted at once. */
export function useEditRun(teamId: string) {
  return usePaintedRunWrite(
    teamId,
    (store, { runId, ...patch }: EditRunArgs, { userId, role }): Promise<Run> => store.updateRun(runId, userId, patch, role),
    (client, { runId, ...patch }) => patchRun(client, teamId, runId, (run) => ({ ...run, ...patch })),
  );
}

export interface FinishRunArgs {
  runId: string;
  status: 'finished' | 'stopped';
  stopReason?: string;
}

/** Ends a run: finished, or stopped with a reason (a fall, a disqualification); kept either way. */
export function useFinishRun(teamId: string) {
  return usePaintedRunWrite(
    teamId,
    (store, { runId, status, stopReason }: FinishRunArgs, { userId, role }): Promise<Run> =>
      store.finishRun(runId, userId, { status, stopReason }, role),
    (client, { runId, status, stopReason }) =>
      patchRun(client, teamId, runId, (run) => ({ ...run, status, stopReason: status === 'stopped' ? (stopReason ?? '') : '' })),
  );
}

/** Deletes a run (a false start) with its crossings; gone without a trace if it never left the device. */
export function useDeleteRun(teamId: string) {
  return usePaintedRunWrite(
    teamId,
    async (store, { runId }: { runId: string }, { userId, role }) => {
      await store.removeRun(runId, userId, role);
    },
    (client, { runId }) => {
      client.setQueriesData<RunWithCrossings[]>({ queryKey: clockKeys.runs(teamId) }, (old) =>
        old?.some((r) => r.id === runId) ? old.filter((r) => r.id !== runId) : old,
      );
    },
  );
}

/** Sets a skater's target for a distance (one record per skater, track and distance, team-wide). */
export function useSetTarget(teamId: string) {
  const client = useQueryClient();
  const writer = useWriter();
  return useMutation({
    networkMode: 'always',
    mutationFn: async (input: TargetInput): Promise<Target> => {
      const { userId, role } = writer.current;
      return (await deviceStore()).setTarget({ ...input, teamId, userId, role });
    },
    onSuccess: (target) => {
      client.setQueryData<Target[]>(clockKeys.targets(teamId), (old) =>
        old ? [...old.filter((t) => t.id !== target.id), target] : old,
      );
    },
    onSettled: () => {
      void client.invalidateQueries({ queryKey: clockKeys.targets(teamId) });
      changed(client);
    },
  });
}
