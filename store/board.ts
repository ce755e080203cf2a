/**
 * React-query over the device store: the board's reads (squad, cue library, today's session and
 * its notes, changes waiting) and its writes. Reads run with networkMode 'always' because they
 * never touch the network. Recording paints optimistically in the same frame as the tap, then
 * commits row + outbox entry; a failed write rolls the optimistic note back and says why.
 */
import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import { v7 as uuidv7 } from 'uuid';
import type { Phase } from '../shared/cues';
import { cueSchema, squadSchema, type BoardSessionPatch, type Mark, type Observation, type ObservationPatch } from '../shared/schemas';
import { deviceStore } from '../sync';
import { apiRequestParsed } from './api';
import { useSession } from './session';
import { z } from 'zod';

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
      const [groups, skaters] = await Promise.all([store.listGroups(teamId), store.listSkaters(teamId)]);
      return { groups, skaters };
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
      return { pending: await store.pendingCount(), byTable: await store.pendingByTable() };
    },
  });

export const observationsOnDevice = (sessionId: string) =>
  queryOptions({
    ...local,
    queryKey: boardKeys.observations(sessionId),
    queryFn: async () => (await deviceStore()).listObservations(sessionId),
  });

/** Today's session for the team (started on first use). */
export function useTodaySession(teamId: string) {
  const userId = useSession((s) => s.user?.id ?? '');
  return useQuery({
    ...local,
    queryKey: boardKeys.session(teamId),
    queryFn: async () => (await deviceStore()).startSession(teamId, userId),
    enabled: !!teamId && !!userId,
  });
}

/**
 * After sign-in with a network: copies the team's squad and cue library from the server into the
 * device (a plain read; offline, the device keeps what it has).
 */
export function useLoadTeamFromServer(teamId: string) {
  const client = useQueryClient();
  const online = useSession((s) => s.status === 'signedIn' && !s.offline && !!s.accessToken);
  const query = useQuery({
    queryKey: ['server', teamId, 'board-seed'],
    enabled: online && !!teamId,
    staleTime: 5 * 60_000,
    queryFn: async () => {
      const [squad, cues] = await Promise.all([
        apiRequestParsed(`/api/teams/${teamId}/squad`, squadSchema),
        apiRequestParsed(`/api/teams/${teamId}/cues`, z.array(cueSchema)),
      ]);
      await (await deviceStore()).loadTeam(teamId, { ...squad, cues });
      return { loadedAt: Date.now() };
    },
  });
  useEffect(() => {
    if (query.data) {
      void client.invalidateQueries({ queryKey: boardKeys.squad(teamId) });
      void client.invalidateQueries({ queryKey: boardKeys.cues(teamId) });
    }
  }, [client, query.data, teamId]);
  return query;
}

function refreshCounts(client: QueryClient) {
  void client.invalidateQueries({ queryKey: boardKeys.outbox() });
}

export interface RecordArgs {
  teamId: string;
  sessionId: string;
  skaterIds: readonly string[];
  cueId: string;
  mark: Mark;
  note?: string;
}

/** One tap: an observation per selected skater. Resolves with the ids (for undo). */
export function useRecordObservations() {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: RecordArgs & { ids: string[] }) => {
      const created = await (await deviceStore()).recordObservations({ ...args, userId });
      // A User Timing mark: the benchmark measures tap-to-commit from it (cheap, standard API).
      performance.mark('boardside:committed', { detail: args.ids });
      return created;
    },
    onMutate: async (args) => {
      const key = boardKeys.observations(args.sessionId);
      const previous = client.getQueryData<Observation[]>(key);
      const createdAt = new Date().toISOString();
      const optimistic: Observation[] = args.skaterIds.map((skaterId, index) => ({
        id: args.ids[index],
        teamId: args.teamId,
        sessionId: args.sessionId,
        skaterId,
        cueId: args.cueId,
        mark: args.mark,
        note: args.note?.trim() ?? '',
        noteShared: false,
        createdAt,
        createdBy: userId,
      }));
      client.setQueryData<Observation[]>(key, (old) => [...optimistic.reverse(), ...(old ?? [])]);
      return { previous };
    },
    onError: (_error, args, context) => {
      client.setQueryData(boardKeys.observations(args.sessionId), context?.previous);
    },
    onSettled: () => refreshCounts(client),
  });
}

/** Makes the ids for a tap up front, so the note can be painted and undone before it commits. */
export const newObservationIds = (count: number) => Array.from({ length: count }, () => uuidv7());

export function useRemoveObservations() {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: { sessionId: string; ids: readonly string[] }) =>
      (await deviceStore()).removeObservations(args.ids, userId),
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
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: { sessionId: string; id: string; patch: ObservationPatch }) =>
      (await deviceStore()).updateObservation(args.id, userId, args.patch),
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

/** "24 notes and 1 session waiting to be sent": what waits, in the coach's words. */
export function describePending(byTable: { observations: number; sessions: number; cues: number }): string {
  const parts = [
    byTable.observations ? plural(byTable.observations, 'note', 'notes') : '',
    byTable.sessions ? plural(byTable.sessions, 'session', 'sessions') : '',
    byTable.cues ? plural(byTable.cues, 'cue change', 'cue changes') : '',
  ].filter(Boolean);
  if (parts.length === 0) return 'Nothing waiting to be sent';
  const list = parts.length > 1 ? `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}` : parts[0];
  return `${list} waiting to be sent`;
}

export function usePendingSummary() {
  const data = useQuery(outboxOnDevice()).data;
  return { total: data?.pending ?? 0, text: describePending(data?.byTable ?? { observations: 0, sessions: 0, cues: 0 }) };
}
