/**
 * Team data from the server: the squad (groups + skater profiles), members and invitations, and
 * the head coach's changes to them. One key factory so mutations invalidate exactly what changed.
 *
 * Skaters and groups reach the board through sync (the device store holds the pulled copy). A
 * squad change the head coach makes here must show on their own board at once, so every squad
 * change is followed by a pull (`pullSquadNow`), which refreshes the device queries when it ends.
 */
import { queryOptions, useMutation, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import {
  groupSchema,
  invitationSchema,
  memberSchema,
  skaterSchema,
  squadSchema,
  type GroupCreateInput,
  type InvitationCreateInput,
  type SkaterCreateInput,
  type SkaterUpdateInput,
} from '../shared/schemas';
import { apiRequest, apiRequestParsed } from './api';
import { boardKeys } from './board';
import { runSync, useSyncStatus } from './sync-status';

export const teamKeys = {
  all: ['team'] as const,
  team: (teamId: string) => [...teamKeys.all, teamId] as const,
  squad: (teamId: string) => [...teamKeys.team(teamId), 'squad'] as const,
  members: (teamId: string) => [...teamKeys.team(teamId), 'members'] as const,
  invitations: (teamId: string) => [...teamKeys.team(teamId), 'invitations'] as const,
};

const teamPath = (teamId: string, rest: string) => `/api/teams/${encodeURIComponent(teamId)}/${rest}`;

export function squadQuery(teamId: string) {
  return queryOptions({
    queryKey: teamKeys.squad(teamId),
    queryFn: ({ signal }) => apiRequestParsed(teamPath(teamId, 'squad'), squadSchema, { signal }),
  });
}

export function membersQuery(teamId: string) {
  return queryOptions({
    queryKey: teamKeys.members(teamId),
    queryFn: ({ signal }) => apiRequestParsed(teamPath(teamId, 'members'), z.array(memberSchema), { signal }),
  });
}

export function invitationsQuery(teamId: string) {
  return queryOptions({
    queryKey: teamKeys.invitations(teamId),
    queryFn: ({ signal }) =>
      apiRequestParsed(teamPath(teamId, 'invitations'), z.array(invitationSchema), { signal }),
  });
}

/**
 * Brings a squad change the server just made onto this device's board: a sync run (its pull holds
 * the change), then the device queries are read again. A run already going may have pulled before
 * the change was made, so it is waited for and one more run follows. Never throws: a failed pull
 * leaves the change for the next sync, and the sync line says why.
 */
export async function pullSquadNow(client: QueryClient, teamId: string): Promise<void> {
  const refetchDevice = () => void client.invalidateQueries({ queryKey: boardKeys.all });
  if (useSyncStatus.getState().running) await runSync(teamId);
  await runSync(teamId, refetchDevice);
}

/** After a squad change: the squad screen's copy is read again and the board gets it at once. */
function squadChanged(client: QueryClient, teamId: string) {
  void pullSquadNow(client, teamId);
  return client.invalidateQueries({ queryKey: teamKeys.squad(teamId) });
}

export function useAddSkater(teamId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SkaterCreateInput) =>
      apiRequestParsed(teamPath(teamId, 'skaters'), skaterSchema, { method: 'POST', body: input }),
    onSuccess: () => squadChanged(queryClient, teamId),
  });
}

/** Rename, move to a group (or none), retire or bring back a skater (head coach). */
export function useUpdateSkater(teamId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ skaterId, change }: { skaterId: string; change: SkaterUpdateInput }) =>
      apiRequestParsed(teamPath(teamId, `skaters/${encodeURIComponent(skaterId)}`), skaterSchema, {
        method: 'PATCH',
        body: change,
      }),
    onSuccess: () => squadChanged(queryClient, teamId),
  });
}

export function useAddGroup(teamId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: GroupCreateInput) =>
      apiRequestParsed(teamPath(teamId, 'groups'), groupSchema, { method: 'POST', body: input }),
    onSuccess: () => squadChanged(queryClient, teamId),
  });
}

/** Removes a member from the team (head coach); the server also ends their sign-ins everywhere. */
export function useRemoveMember(teamId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) =>
      apiRequest<void>(teamPath(teamId, `members/${encodeURIComponent(userId)}`), { method: 'DELETE' }),
    onSuccess: () => {
      // A skater losing their account changes the squad's "can sign in" too.
      void queryClient.invalidateQueries({ queryKey: teamKeys.squad(teamId) });
      return queryClient.invalidateQueries({ queryKey: teamKeys.members(teamId) });
    },
  });
}

export function useInvite(teamId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: InvitationCreateInput) =>
      apiRequestParsed(teamPath(teamId, 'invitations'), invitationSchema, { method: 'POST', body: input }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: teamKeys.invitations(teamId) }),
  });
}

/** Withdraws an invitation (its link stops working) or sends it again with a fresh link. */
export function useInvitationAction(teamId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ invitationId, action }: { invitationId: string; action: 'withdraw' | 'resend' }) => {
      const path = teamPath(teamId, `invitations/${encodeURIComponent(invitationId)}`);
      return action === 'withdraw'
        ? apiRequestParsed(path, invitationSchema, { method: 'DELETE' })
        : apiRequestParsed(`${path}/resend`, invitationSchema, { method: 'POST' });
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: teamKeys.invitations(teamId) }),
  });
}
