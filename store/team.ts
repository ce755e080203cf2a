/**
 * Team data from the server: the squad (groups + skater profiles), members and invitations.
 * One key factory so mutations and, later, the sync engine invalidate exactly what changed.
 */
import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import {
  invitationSchema,
  memberSchema,
  skaterSchema,
  squadSchema,
  type InvitationCreateInput,
  type SkaterCreateInput,
} from '../shared/schemas';
import { apiRequestParsed } from './api';

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

export function useAddSkater(teamId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SkaterCreateInput) =>
      apiRequestParsed(teamPath(teamId, 'skaters'), skaterSchema, { method: 'POST', body: input }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: teamKeys.squad(teamId) }),
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
