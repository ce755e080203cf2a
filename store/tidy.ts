/**
 * React-query over the device store for the evening review's Tidy-up (sync/tables/tidy.ts): the
 * team's sessions with their notes, read from the device (so tidy-up works offline), and the
 * fixes, moves and merges, each a device write with its outbox entry, sent by the next sync like
 * the board's taps. Keys live under ['device', ...]: the coach shell's sync refresh re-reads them.
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { deviceStore, type NoteFix } from '../sync';
export { mayMergeSessions, mergeKeeps } from '../sync/tables/tidy';
import { boardKeys } from './board';
import { useActiveMembership, useSession } from './session';
import { notifyLocalChange } from './sync-status';

export const tidyKeys = {
  sessions: (teamId: string) => ['device', teamId, 'tidy'] as const,
};

/** The team's sessions, newest day first, with their notes (the device's copy). */
export function useTidySessions(teamId: string) {
  return useQuery({
    networkMode: 'always',
    staleTime: Infinity,
    retry: false,
    queryKey: tidyKeys.sessions(teamId),
    queryFn: async () => (await deviceStore()).listTidySessions(teamId),
    enabled: !!teamId,
  });
}

type TidyChange =
  | { kind: 'fix'; id: string; fix: NoteFix }
  | { kind: 'delete'; id: string }
  | { kind: 'merge'; a: string; b: string };

/** One tidy-up change: written on the device with its outbox entry, then every device view re-read. */
export function useTidyChange(teamId: string) {
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? '');
  const role = useActiveMembership()?.role;
  return useMutation({
    networkMode: 'always',
    /** Resolves to the session that is left (a merge), else null. */
    mutationFn: async (change: TidyChange): Promise<string | null> => {
      const store = await deviceStore();
      switch (change.kind) {
        case 'fix':
          await store.fixNote(change.id, userId, change.fix, role);
          return null;
        case 'delete':
          await store.removeObservations([change.id], userId, role);
          return null;
        case 'merge':
          return (await store.mergeSessions(teamId, userId, change.a, change.b, role)).kept;
      }
    },
    onSettled: () => {
      // The board's notes, the session and the counts read the same rows.
      void client.invalidateQueries({ queryKey: tidyKeys.sessions(teamId) });
      void client.invalidateQueries({ queryKey: ['device', 'observations'] });
      void client.invalidateQueries({ queryKey: boardKeys.session(teamId) });
      void client.invalidateQueries({ queryKey: boardKeys.outbox() });
      notifyLocalChange();
    },
  });
}
