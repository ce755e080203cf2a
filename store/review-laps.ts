/**
 * Lap-time trends from the server (issue #10 §2): the query options for
 * GET /api/teams/:teamId/review/skaters/:skaterId/laps, the reply parsed with
 * shared/schemas/review-laps.ts. The selection (runs, laps, bests) is the server's; nothing here
 * counts. A distance left out (`null`) asks for the one the skater ran last; a range left out,
 * the server's default (the last 26 ISO weeks of the team's zone).
 */
import { queryOptions } from '@tanstack/react-query';

import type { Track } from '../shared/schemas/clock';
import { lapTrendSchema } from '../shared/schemas/review-laps';
import { apiRequestParsed } from './api';
import { reviewKeys, type WeekRangeAsked } from './review';

export type LapDistanceAsked = { distanceM: number; track: Track } | null;

export const lapTrendKeys = {
  skater: (teamId: string, skaterId: string, distance: LapDistanceAsked, range: WeekRangeAsked) =>
    [
      ...reviewKeys.team(teamId),
      'laps',
      skaterId,
      distance ? `${distance.distanceM}-${distance.track}` : 'latest',
      range?.from ?? 'default',
      range?.to ?? 'default',
    ] as const,
};

export function lapTrendPath(teamId: string, skaterId: string, distance: LapDistanceAsked, range: WeekRangeAsked): string {
  const params = new URLSearchParams();
  if (distance) {
    params.set('distanceM', String(distance.distanceM));
    params.set('track', distance.track);
  }
  if (range) {
    params.set('from', range.from);
    params.set('to', range.to);
  }
  const search = params.toString();
  return `/api/teams/${encodeURIComponent(teamId)}/review/skaters/${encodeURIComponent(skaterId)}/laps${search ? `?${search}` : ''}`;
}

/**
 * One skater's runs of a distance. While another distance or range of the SAME skater loads, the
 * previous answer stays (the chart does not jump to empty); another skater never shows someone
 * else's runs meanwhile.
 */
export function lapTrendQuery(teamId: string, skaterId: string, distance: LapDistanceAsked, range: WeekRangeAsked) {
  return queryOptions({
    queryKey: lapTrendKeys.skater(teamId, skaterId, distance, range),
    queryFn: ({ signal }) => apiRequestParsed(lapTrendPath(teamId, skaterId, distance, range), lapTrendSchema, { signal }),
    placeholderData: (previous, previousQuery) => (previousQuery?.queryKey[3] === skaterId ? previous : undefined),
  });
}
