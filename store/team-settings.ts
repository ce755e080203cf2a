/**
 * The team's settings (today: whether boards notes are shared with the skater by default). Read
 * from the server when it answers; the last value seen is kept on the device per team, so the
 * board uses it offline at once. Only the head coach changes it (the server refuses others).
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';

import { teamSettingsSchema, type TeamSettings, type TeamSettingsPatch } from '../shared/schemas';
import { apiRequestParsed } from './api';

export const teamSettingsKeys = {
  settings: (teamId: string) => ['team', teamId, 'settings'] as const,
};

/** Until the server has answered once: notes at the boards stay with the coaches. */
export const DEFAULT_TEAM_SETTINGS: TeamSettings = { shareBoardNotes: false, timeZone: 'UTC' };

const storage = (): Storage | undefined => (typeof localStorage !== 'undefined' ? localStorage : undefined);
const storageKey = (teamId: string) => `boardside.team-settings.${teamId}`;

/** The last settings this device saw for the team, or undefined. */
export function lastKnownSettings(teamId: string): TeamSettings | undefined {
  try {
    const raw = storage()?.getItem(storageKey(teamId));
    const parsed = raw ? teamSettingsSchema.safeParse(JSON.parse(raw)) : undefined;
    return parsed?.success ? parsed.data : undefined;
  } catch {
    return undefined;
  }
}

function remember(teamId: string, settings: TeamSettings) {
  try {
    storage()?.setItem(storageKey(teamId), JSON.stringify(settings));
  } catch {
    // A full or blocked storage only costs the offline default.
  }
}

const path = (teamId: string) => `/api/teams/${encodeURIComponent(teamId)}/settings`;

/** The team's settings: the server's when it answers, else the last known, else the default. */
export function useTeamSettings(teamId: string | undefined): TeamSettings {
  const query = useQuery({
    queryKey: teamSettingsKeys.settings(teamId ?? ''),
    enabled: !!teamId,
    retry: false,
    staleTime: 60_000,
    initialData: () => (teamId ? lastKnownSettings(teamId) : undefined),
    initialDataUpdatedAt: 0,
    queryFn: async ({ signal }) => {
      const settings = await apiRequestParsed(path(teamId!), teamSettingsSchema, { signal });
      remember(teamId!, settings);
      return settings;
    },
  });
  return query.data ?? DEFAULT_TEAM_SETTINGS;
}

/** The head coach changes a setting (online: it is the team's, not the device's). */
export function useUpdateTeamSettings(teamId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (patch: TeamSettingsPatch) => apiRequestParsed(path(teamId), teamSettingsSchema, { method: 'PATCH', body: patch }),
    onSuccess: (settings) => {
      remember(teamId, settings);
      client.setQueryData(teamSettingsKeys.settings(teamId), settings);
    },
  });
}
