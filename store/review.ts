/**
 * The evening review from the server (issue #10 §1): one key factory and a queryOptions per
 * route of server/routes/review.ts, each reply parsed with shared/schemas/review.ts. The counting
 * is the server's (SQL over the whole team); nothing here counts. A range left out (`null`) asks
 * for the server's default: the last 8 ISO weeks of the team's time zone.
 */
import { queryOptions } from '@tanstack/react-query';

import {
  reviewCellSchema,
  reviewMatrixSchema,
  reviewWeekSchema,
  type ReviewGroup,
} from '../shared/schemas/review';
import { apiRequestParsed } from './api';

export type WeekRangeAsked = { from: string; to: string } | null;

export const reviewKeys = {
  all: ['review'] as const,
  team: (teamId: string) => [...reviewKeys.all, teamId] as const,
  skater: (teamId: string, skaterId: string, range: WeekRangeAsked) =>
    [...reviewKeys.team(teamId), 'skater', skaterId, range?.from ?? 'default', range?.to ?? 'default'] as const,
  group: (teamId: string, groupId: ReviewGroup, range: WeekRangeAsked) =>
    [...reviewKeys.team(teamId), 'group', groupId, range?.from ?? 'default', range?.to ?? 'default'] as const,
  week: (teamId: string, week: string, groupId: ReviewGroup) => [...reviewKeys.team(teamId), 'week', week, groupId] as const,
  cell: (teamId: string, skaterId: string, cueId: string, week: string) =>
    [...reviewKeys.team(teamId), 'cell', skaterId, cueId, week] as const,
};

const reviewPath = (teamId: string, rest: string, query: Record<string, string | undefined> = {}) => {
  const params = new URLSearchParams();
  for (const [name, value] of Object.entries(query)) if (value !== undefined) params.set(name, value);
  const search = params.toString();
  return `/api/teams/${encodeURIComponent(teamId)}/review/${rest}${search ? `?${search}` : ''}`;
};

const rangeQuery = (range: WeekRangeAsked) => (range ? { from: range.from, to: range.to } : {});

/**
 * The previous answer stays on screen while another range of the SAME skater or group loads (the
 * range buttons do not jump); another skater or group never shows someone else's counts meanwhile.
 */
const sameSubject =
  (subject: string) =>
  <T>(previous: T | undefined, previousQuery?: { queryKey: readonly unknown[] }) =>
    previousQuery?.queryKey[3] === subject ? previous : undefined;

/** One skater's cues x ISO weeks. */
export function skaterWeeksQuery(teamId: string, skaterId: string, range: WeekRangeAsked) {
  return queryOptions({
    queryKey: reviewKeys.skater(teamId, skaterId, range),
    queryFn: ({ signal }) =>
      apiRequestParsed(reviewPath(teamId, `skaters/${encodeURIComponent(skaterId)}/weeks`, rangeQuery(range)), reviewMatrixSchema, {
        signal,
      }),
    placeholderData: sameSubject(skaterId),
  });
}

/** The same matrix summed over a group ('all' skaters, 'none' = in no group, or a group's id). */
export function groupWeeksQuery(teamId: string, groupId: ReviewGroup, range: WeekRangeAsked) {
  return queryOptions({
    queryKey: reviewKeys.group(teamId, groupId, range),
    queryFn: ({ signal }) =>
      apiRequestParsed(reviewPath(teamId, `groups/${encodeURIComponent(groupId)}/weeks`, rangeQuery(range)), reviewMatrixSchema, {
        signal,
      }),
    placeholderData: sameSubject(groupId),
  });
}

/** Skaters x cues for one week, for a group or the whole team. */
export function weekGridQuery(teamId: string, week: string, groupId: ReviewGroup) {
  return queryOptions({
    queryKey: reviewKeys.week(teamId, week, groupId),
    queryFn: ({ signal }) =>
      apiRequestParsed(reviewPath(teamId, `week/${encodeURIComponent(week)}`, { groupId }), reviewWeekSchema, { signal }),
  });
}

/** The notes behind one cell: a skater, a cue, a week. */
export function cellNotesQuery(teamId: string, skaterId: string, cueId: string, week: string) {
  return queryOptions({
    queryKey: reviewKeys.cell(teamId, skaterId, cueId, week),
    queryFn: ({ signal }) =>
      apiRequestParsed(reviewPath(teamId, `skaters/${encodeURIComponent(skaterId)}/cells`, { cueId, week }), reviewCellSchema, {
        signal,
      }),
  });
}
