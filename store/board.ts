/**
 * React-query over the device store: the board's reads (squad, cue library, today's session and
 * its notes, changes waiting) and its writes. Reads run with networkMode 'always' because they
 * never touch the network. Recording paints optimistically in the same frame as the tap, then
 * commits row + outbox entry; a failed write rolls the optimistic note back and says why.
 *
 * A tap must stay cheap (the coach taps every few hundred ms, and the store's commits queue behind
 * whatever keeps the main thread busy): recording re-renders nothing but the observers of the
 * session's notes, and the "waiting to be sent" count is bumped in the cache rather than re-read
 * from the device after every write (a re-read follows once the writes go quiet).
 */
import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { v7 as uuidv7 } from 'uuid';
import type { Phase } from '../shared/cues';
import { type BoardSessionPatch, type Mark, type Observation, type ObservationPatch } from '../shared/schemas';
import { deviceStore, localDay, sessionIdFor, type DeviceStore } from '../sync';
import { useActiveMembership, useSession } from './session';
import { notifyLocalChange } from './sync-status';
import { useTeamSettings } from './team-settings';
import { useMountedRef } from './use-mounted-ref';

export const boardKeys = {
  all: ['device'] as const,
  squad: (teamId: string) => ['device', teamId, 'squad'] as const,
  cues: (teamId: string) => ['device', teamId, 'cues'] as const,
  session: (teamId: string) => ['device', teamId, 'session'] as const,
  observations: (sessionId: string) => ['device', 'observations', sessionId] as const,
  outbox: () => ['device', 'outbox'] as const,
};

const local = { networkMode: 'always', staleTime: Infinity, retry: false } as const;

export const squadOnDevice = (teamId: string) =>
  queryOptions({
    ...local,
    queryKey: boardKeys.squad(teamId),
    queryFn: async () => {
      const store = await deviceStore();
      // `skaters`: the board's tiles and pickers (retired skaters are off the board);
      // `everyone`: names for what was written before (the feed still names a retired skater).
      const [groups, skaters, everyone] = await Promise.all([
        store.listGroups(teamId),
        store.listSkaters(teamId, { onBoard: true }),
        store.listSkaters(teamId),
      ]);
      return { groups, skaters, everyone };
    },
  });

export const cuesOnDevice = (teamId: string) =>
  queryOptions({ ...local, queryKey: boardKeys.cues(teamId), queryFn: async () => (await deviceStore()).listCues(teamId) });

export const outboxOnDevice = () =>
  queryOptions({
    ...local,
    queryKey: boardKeys.outbox(),
    queryFn: async () => {
      const store = await deviceStore();
      return { pending: await store.pendingRecordCount(), byTable: await store.pendingByTable() };
    },
  });

export const observationsOnDevice = (sessionId: string) =>
  queryOptions({
    ...local,
    queryKey: boardKeys.observations(sessionId),
    queryFn: async () => (await deviceStore()).listObservations(sessionId),
  });

/** How far back a new day's session looks for the focus cues to carry over. */
export const FOCUS_LOOKBACK_DAYS = 42;

/**
 * The focus cues of the team's most recent earlier session that pinned any (a day the board was
 * only opened, with nothing pinned, is passed over), limited to cues still live on the device.
 */
export async function previousFocus(store: DeviceStore, teamId: string, day: string): Promise<string[]> {
  const [y, m, d] = day.split('-').map(Number);
  const live = new Set((await store.listCues(teamId)).filter((c) => !c.archived).map((c) => c.id));
  for (let back = 1; back <= FOCUS_LOOKBACK_DAYS; back += 1) {
    const earlier = await store.getSession(sessionIdFor(teamId, localDay(new Date(y, m - 1, d - back, 12).getTime())));
    const pins = earlier?.focusCueIds.filter((id) => live.has(id)) ?? [];
    if (pins.length > 0) return pins;
  }
  return [];
}

/**
 * Today's session for the team (started on first use). A new day's session starts with the focus
 * cues of the last session that had any, so the coach's plan carries to the next ice time. Only
 * a session this device starts (none pulled for today yet) is given them: one another coach
 * already shaped keeps its own. Carrying them over is an edit like any other (it is sent).
 */
export function useTodaySession(teamId: string) {
  const userId = useSession((s) => s.user?.id ?? '');
  return useQuery({
    ...local,
    queryKey: boardKeys.session(teamId),
    queryFn: async () => {
      const store = await deviceStore();
      const day = localDay(Date.now());
      const known = await store.getSession(sessionIdFor(teamId, day));
      const today = await store.startSession(teamId, userId);
      // Carried only into a session this device has just started. The store's day follows its
      // corrected clock; when that is another day than this one, nothing is carried.
      const started = !known && today.day === day;
      if (!started || today.focusCueIds.length > 0) return today;
      try {
        const carried = await previousFocus(store, teamId, today.day);
        return carried.length > 0 ? await store.updateSession(today.id, userId, { focusCueIds: carried }) : today;
      } catch {
        // Carrying the plan over is a convenience: the board opens without it rather than not at all.
        return today;
      }
    },
    enabled: !!teamId && !!userId,
  });
}

/** How long the device must be free of writes before the outbox counts are re-read. */
const OUTBOX_REFRESH_MS = 1000;
const outboxTimers = new WeakMap<QueryClient, ReturnType<typeof setTimeout>>();

/**
 * Re-reads the outbox counts (coalesced). Taps pass OUTBOX_REFRESH_MS, so the re-read waits until
 * the taps go quiet: one after every tap would queue two more statements on the device per tap,
 * ahead of the next tap's commit.
 */
function refreshCounts(client: QueryClient, delayMs = 0) {
  // A change was written: sync knows at once (the leave warning and the push on hide with it).
  notifyLocalChange();
  clearTimeout(outboxTimers.get(client));
  outboxTimers.set(
    client,
    setTimeout(() => {
      outboxTimers.delete(client);
      void client.invalidateQueries({ queryKey: boardKeys.outbox() });
    }, delayMs),
  );
}

type OutboxCounts = { pending: number; byTable: { observations: number; sessions: number; cues: number } };

/** The status line counts a tap's notes at once (the re-read above corrects any difference). */
function bumpPendingNotes(client: QueryClient, notes: number) {
  client.setQueryData<OutboxCounts>(boardKeys.outbox(), (old) =>
    old
      ? { pending: old.pending + notes, byTable: { ...old.byTable, observations: old.byTable.observations + notes } }
      : old,
  );
}

export interface RecordArgs {
  teamId: string;
  sessionId: string;
  skaterIds: readonly string[];
  cueId: string;
  mark: Mark;
  note?: string;
}

export type RecordVariables = RecordArgs & { ids: string[] };

/**
 * One tap: an observation per selected skater. `mutate` paints the notes into the session's cached
 * list at once (no await before the paint), then commits through the device store's serial queue.
 *
 * Not a useMutation: its observer re-renders the hook's host on every state change (pending,
 * success), i.e. the whole board twice per tap. Here the host re-renders only when a write fails
 * (`isError`, `error` and `variables` then describe the failed tap), and `mutate` is stable.
 */
export function useRecordObservations() {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  const userRef = useRef(userId);
  userRef.current = userId;
  // Who wrote the note (shown at once; the server writes its own copy) and the team's sharing
  // default (the last known value offline).
  const authorName = useSession((s) => s.user?.displayName ?? '');
  const shareDefault = useTeamSettings(useActiveMembership()?.teamId).shareBoardNotes;
  const authorRef = useRef({ authorName, shareDefault });
  authorRef.current = { authorName, shareDefault };
  const mounted = useMountedRef();
  const [failure, setFailure] = useState<{ error: Error; variables: RecordVariables } | null>(null);

  const mutate = useCallback(
    (args: RecordVariables) => {
      const createdBy = userRef.current;
      const { authorName: author, shareDefault: shared } = authorRef.current;
      const key = boardKeys.observations(args.sessionId);
      const createdAt = new Date().toISOString();
      const optimistic: Observation[] = args.skaterIds.map((skaterId, index) => ({
        id: args.ids[index],
        teamId: args.teamId,
        sessionId: args.sessionId,
        skaterId,
        cueId: args.cueId,
        mark: args.mark,
        note: args.note?.trim() ?? '',
        noteShared: shared,
        createdAt,
        createdBy,
        authorName: author,
      }));
      // Newest first, the rest of the list (and every object in it) untouched, so memoised feed
      // items and tile counts see only what changed.
      client.setQueryData<Observation[]>(key, (old) => [...optimistic.reverse(), ...(old ?? [])]);
      bumpPendingNotes(client, args.ids.length);

      void (async () => {
        try {
          await (await deviceStore()).recordObservations({ ...args, userId: createdBy, authorName: author, noteShared: shared });
          // A User Timing mark: the benchmark measures tap-to-commit from it (cheap, standard API).
          performance.mark('boardside:committed', { detail: args.ids });
        } catch (error) {
          // Take out only this tap's notes: later taps may already be painted above them.
          const failed = new Set(args.ids);
          client.setQueryData<Observation[]>(key, (old) => old?.filter((o) => !failed.has(o.id)));
          if (mounted.current) setFailure({ error: error instanceof Error ? error : new Error(String(error)), variables: args });
        } finally {
          refreshCounts(client, OUTBOX_REFRESH_MS);
        }
      })();
    },
    [client],
  );

  return useMemo(
    () => ({ mutate, isError: failure !== null, error: failure?.error ?? null, variables: failure?.variables }),
    [mutate, failure],
  );
}

/** Makes the ids for a tap up front, so the note can be painted and undone before it commits. */
export const newObservationIds = (count: number) => Array.from({ length: count }, () => uuidv7());

export function useRemoveObservations() {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  const role = useActiveMembership()?.role;
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: { sessionId: string; ids: readonly string[] }) =>
      (await deviceStore()).removeObservations(args.ids, userId, role),
    onMutate: async (args) => {
      const key = boardKeys.observations(args.sessionId);
      const previous = client.getQueryData<Observation[]>(key);
      client.setQueryData<Observation[]>(key, (old) => (old ?? []).filter((o) => !args.ids.includes(o.id)));
      return { previous };
    },
    onError: (_error, args, context) => client.setQueryData(boardKeys.observations(args.sessionId), context?.previous),
    onSettled: (_data, _error, args) => {
      void client.invalidateQueries({ queryKey: boardKeys.observations(args.sessionId) });
      refreshCounts(client);
    },
  });
}

export function useUpdateObservation() {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  const role = useActiveMembership()?.role;
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: { sessionId: string; id: string; patch: ObservationPatch }) =>
      (await deviceStore()).updateObservation(args.id, userId, args.patch, role),
    onMutate: async (args) => {
      const key = boardKeys.observations(args.sessionId);
      const previous = client.getQueryData<Observation[]>(key);
      client.setQueryData<Observation[]>(key, (old) => (old ?? []).map((o) => (o.id === args.id ? { ...o, ...args.patch } : o)));
      return { previous };
    },
    onError: (_error, args, context) => client.setQueryData(boardKeys.observations(args.sessionId), context?.previous),
    onSettled: (_data, _error, args) => {
      void client.invalidateQueries({ queryKey: boardKeys.observations(args.sessionId) });
      refreshCounts(client);
    },
  });
}

export function useUpdateSession(teamId: string) {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: { sessionId: string; patch: BoardSessionPatch }) =>
      (await deviceStore()).updateSession(args.sessionId, userId, args.patch),
    onSuccess: (session) => client.setQueryData(boardKeys.session(teamId), session),
    onSettled: () => refreshCounts(client),
  });
}

type CueEdit =
  | { kind: 'add'; phase: Phase; label: string }
  | { kind: 'rename'; id: string; label: string }
  | { kind: 'move'; id: string; direction: 'up' | 'down' }
  | { kind: 'archive'; id: string; archived: boolean };

/** Cue library edits (head coach): each one a row change plus its outbox entry. */
export function useEditCue(teamId: string) {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  return useMutation({
    networkMode: 'always',
    mutationFn: async (edit: CueEdit) => {
      const store = await deviceStore();
      switch (edit.kind) {
        case 'add':
          return void (await store.addCue(teamId, userId, edit.phase, edit.label));
        case 'rename':
          return store.renameCue(edit.id, userId, edit.label);
        case 'move':
          return store.moveCue(edit.id, userId, edit.direction);
        case 'archive':
          return store.setCueArchived(edit.id, userId, edit.archived);
      }
    },
    onSettled: () => {
      void client.invalidateQueries({ queryKey: boardKeys.cues(teamId) });
      refreshCounts(client);
    },
  });
}

/** Changes waiting on this device (for the status line). */
export function usePendingCount() {
  return useQuery(outboxOnDevice()).data?.pending ?? 0;
}

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** "24 notes and 1 session waiting to be sent": what waits, in the coach's words (the clock's too). */
export function describePending(byTable: {
  observations: number;
  sessions: number;
  cues: number;
  runs?: number;
  crossings?: number;
  targets?: number;
}): string {
  const parts = [
    byTable.observations ? plural(byTable.observations, 'note', 'notes') : '',
    byTable.sessions ? plural(byTable.sessions, 'session', 'sessions') : '',
    byTable.cues ? plural(byTable.cues, 'cue change', 'cue changes') : '',
    byTable.runs ? plural(byTable.runs, 'timed run', 'timed runs') : '',
    byTable.crossings ? plural(byTable.crossings, 'lap time', 'lap times') : '',
    byTable.targets ? plural(byTable.targets, 'target', 'targets') : '',
  ].filter(Boolean);
  if (parts.length === 0) return 'Nothing waiting to be sent';
  const list = parts.length > 1 ? `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}` : parts[0];
  return `${list} waiting to be sent`;
}

export function usePendingSummary() {
  const data = useQuery(outboxOnDevice()).data;
  return { total: data?.pending ?? 0, text: describePending(data?.byTable ?? { observations: 0, sessions: 0, cues: 0 }) };
}
