/**
 * React-query over the device store for the skater's "today" page (a skater, or a guardian
 * reading for their linked skater): one rink day's notes with their cues, the recent days with
 * notes, the skater's name, and "Got it" (acknowledge) painted at once and committed with its
 * outbox entry. Reads never touch the network (networkMode 'always'); everything arrives by pull.
 *
 * Keys live under ['device', ...] so whatever clears or refetches the device queries (the device
 * gate, the sync's onChanged) covers these too.
 */
import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';

import { deviceStore, localDay } from '../sync';
import type { SkaterDay, SkaterNote } from '../sync/store';
import { useActiveMembership, useSession } from './session';
import { notifyLocalChange } from './sync-status';

export type { SkaterDay, SkaterNote } from '../sync/store';

export const todayKeys = {
  all: ['device', 'today'] as const,
  notes: (teamId: string, skaterId: string, day: string) => ['device', 'today', teamId, skaterId, 'notes', day] as const,
  days: (teamId: string, skaterId: string) => ['device', 'today', teamId, skaterId, 'days'] as const,
  skater: (teamId: string, skaterId: string) => ['device', 'today', teamId, skaterId, 'skater'] as const,
};

const local = { networkMode: 'always', staleTime: Infinity, retry: false } as const;

/** How many recent days the page offers. */
export const RECENT_DAYS = 14;

/** Today's rink day on this device (YYYY-MM-DD, local time). */
export const todayOnDevice = () => localDay(Date.now());

export const skaterNotesOnDevice = (teamId: string, skaterId: string, day: string) =>
  queryOptions({
    ...local,
    queryKey: todayKeys.notes(teamId, skaterId, day),
    queryFn: async (): Promise<SkaterNote[]> => (await deviceStore()).listForSkater(teamId, skaterId, day),
  });

export const skaterDaysOnDevice = (teamId: string, skaterId: string) =>
  queryOptions({
    ...local,
    queryKey: todayKeys.days(teamId, skaterId),
    queryFn: async (): Promise<SkaterDay[]> => (await deviceStore()).daysForSkater(teamId, skaterId, RECENT_DAYS),
  });

/** The day's notes for the skater (oldest first). */
export function useSkaterNotes(teamId: string, skaterId: string, day: string) {
  return useQuery({ ...skaterNotesOnDevice(teamId, skaterId, day), enabled: !!teamId && !!skaterId });
}

/** The recent days with notes (newest first). */
export function useSkaterDays(teamId: string, skaterId: string) {
  return useQuery({ ...skaterDaysOnDevice(teamId, skaterId), enabled: !!teamId && !!skaterId });
}

/** The skater's display name as pulled to this device (their own profile), or null. */
export function useSkaterName(teamId: string, skaterId: string) {
  return useQuery({
    ...local,
    queryKey: todayKeys.skater(teamId, skaterId),
    enabled: !!teamId && !!skaterId,
    queryFn: async () => (await (await deviceStore()).listSkaters(teamId)).find((s) => s.id === skaterId)?.displayName ?? null,
  }).data ?? null;
}

/** Refetches everything on the page (after a sync run). */
export function refreshToday(client: QueryClient) {
  return client.invalidateQueries({ queryKey: todayKeys.all });
}

export interface AcknowledgeArgs {
  teamId: string;
  skaterId: string;
  day: string;
  id: string;
}

/** "Got it": shows as acknowledged in the same frame, then writes the row and its outbox entry. */
export function useAcknowledge() {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  // Only the skater acknowledges: the device store (and the server) refuse a guardian.
  const role = useActiveMembership()?.role;
  return useMutation({
    networkMode: 'always',
    mutationFn: async (args: AcknowledgeArgs) => (await deviceStore()).acknowledgeObservation(args.id, userId, role),
    onMutate: async (args) => {
      const key = todayKeys.notes(args.teamId, args.skaterId, args.day);
      await client.cancelQueries({ queryKey: key });
      const previous = client.getQueryData<SkaterNote[]>(key);
      const now = new Date().toISOString();
      client.setQueryData<SkaterNote[]>(key, (old) => (old ?? []).map((n) => (n.id === args.id ? { ...n, acknowledgedAt: n.acknowledgedAt ?? now } : n)));
      return { previous };
    },
    onError: (_error, args, context) => client.setQueryData(todayKeys.notes(args.teamId, args.skaterId, args.day), context?.previous),
    onSuccess: () => notifyLocalChange(),
    onSettled: (_data, _error, args) => {
      void client.invalidateQueries({ queryKey: todayKeys.notes(args.teamId, args.skaterId, args.day) });
      void client.invalidateQueries({ queryKey: todayKeys.days(args.teamId, args.skaterId) });
    },
  });
}
