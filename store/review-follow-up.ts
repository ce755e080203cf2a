/**
 * Cue follow-up and the skater's runs by week from the server (issue #10 §3, §6): queryOptions
 * for server/routes/review-follow-up.ts, each reply parsed with shared/schemas/review-follow-up.ts.
 * The counting and the verdicts are the server's (shared/follow-up.ts); nothing here decides them.
 * Keys sit under the review's team key, so whatever refreshes the review refreshes these.
 */
import { queryOptions } from '@tanstack/react-query';

import type { ReviewGroup } from '../shared/schemas/review';
import { followUpReplySchema, groupFollowUpReplySchema, runsByWeekReplySchema } from '../shared/schemas/review-follow-up';
import { apiRequestParsed } from './api';
import { reviewKeys, type WeekRangeAsked } from './review';

export const followUpKeys = {
  skater: (teamId: string, skaterId: string, threshold: number, range: WeekRangeAsked) =>
    [...reviewKeys.team(teamId), 'follow-up', skaterId, threshold, range?.from ?? 'default', range?.to ?? 'default'] as const,
  group: (teamId: string, group: ReviewGroup, threshold: number, range: WeekRangeAsked) =>
    [...reviewKeys.team(teamId), 'follow-up-group', group, threshold, range?.from ?? 'default', range?.to ?? 'default'] as const,
  runs: (teamId: string, skaterId: string, range: WeekRangeAsked) =>
    [...reviewKeys.team(teamId), 'runs-by-week', skaterId, range?.from ?? 'default', range?.to ?? 'default'] as const,
};

const path = (teamId: string, skaterId: string, rest: string, query: Record<string, string>) => reviewPath(teamId, `skaters/${encodeURIComponent(skaterId)}/${rest}`, query);

const reviewPath = (teamId: string, rest: string, query: Record<string, string>) => {
  const search = new URLSearchParams(query).toString();
  return `/api/teams/${encodeURIComponent(teamId)}/review/${rest}${search ? `?${search}` : ''}`;
};

const rangeQuery = (range: WeekRangeAsked): Record<string, string> => (range ? { from: range.from, to: range.to } : {});

/**
 * The cues stressed for a skater in the range (at least `threshold` "needs work" marks in a week),
 * each with its next four weeks and verdict. The previous answer stays on screen while another
 * threshold or range of the SAME skater loads; another skater's never shows under this one's name.
 */
export function followUpQuery(teamId: string, skaterId: string, threshold: number, range: WeekRangeAsked) {
  return queryOptions({
    queryKey: followUpKeys.skater(teamId, skaterId, threshold, range),
    queryFn: ({ signal }) =>
      apiRequestParsed(path(teamId, skaterId, 'follow-up', { threshold: String(threshold), ...rangeQuery(range) }), followUpReplySchema, {
        signal,
      }),
    placeholderData: (previous, previousQuery) => (previousQuery?.queryKey[3] === skaterId ? previous : undefined),
  });
}

/** The same for every skater of a group with a stressed cue (coaches only; 'all', 'none' or a group's id). */
export function groupFollowUpQuery(teamId: string, group: ReviewGroup, threshold: number, range: WeekRangeAsked) {
  return queryOptions({
    queryKey: followUpKeys.group(teamId, group, threshold, range),
    queryFn: ({ signal }) =>
      apiRequestParsed(
        reviewPath(teamId, `groups/${encodeURIComponent(group)}/follow-up`, { threshold: String(threshold), ...rangeQuery(range) }),
        groupFollowUpReplySchema,
        { signal },
      ),
    placeholderData: (previous, previousQuery) => (previousQuery?.queryKey[3] === group ? previous : undefined),
  });
}

/** The skater's finished runs in the range's weeks, with their crossings. */
export function runsByWeekQuery(teamId: string, skaterId: string, range: WeekRangeAsked) {
  return queryOptions({
    queryKey: followUpKeys.runs(teamId, skaterId, range),
    queryFn: ({ signal }) => apiRequestParsed(path(teamId, skaterId, 'runs-by-week', rangeQuery(range)), runsByWeekReplySchema, { signal }),
    placeholderData: (previous, previousQuery) => (previousQuery?.queryKey[3] === skaterId ? previous : undefined),
  });
}
