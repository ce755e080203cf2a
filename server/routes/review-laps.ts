/**
 * The evening review's lap-time trends (issue #10 §2, §6), under /api/teams/:teamId/review/:
 *
 *   GET skaters/:skaterId/laps?distanceM=1500&track=long&from=YYYY-Www&to=YYYY-Www
 *       one skater's runs of a distance over ISO weeks (team's zone): crossings, laps, finish,
 *       target and pace schedule, personal bests, and the distances the skater has runs of.
 *
 * Roles as the cue counts (server/routes/review.ts): coaches any skater of the team; a skater only
 * their own; a guardian the linked skater; any other id, and another team's, is 404. The query is
 * parsed with shared/schemas/review-laps.ts: a bad one is a 400 naming the field.
 */
import { Router, type Request } from 'express';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import { lapTrendQuerySchema } from '../../shared/schemas/review-laps';
import { requireTeamRole, requireUser } from '../lib/auth';
import { notFound, parse } from '../lib/errors';
import { assertSkaterVisible, teamTimeZone, viewerOf } from '../services/review/access';
import { lapTrend } from '../services/review/laps';
import { singleValued } from '../services/review/query-string';

/** A skater id from the path: one that is not a UUID names nobody in this team (404). */
function skaterIdOf(req: Request): string {
  const id = z.uuid().safeParse(req.params.skaterId);
  if (!id.success) throw notFound('No such skater in this team');
  // Lower case, as the database writes it: a skater's own id in upper case is still their own.
  return id.data.toLowerCase();
}

export function lapTrendRoutes(dataSource: DataSource) {
  const router = Router();
  const member = requireTeamRole(dataSource, 'head_coach', 'coach', 'skater', 'guardian');

  router.get('/teams/:teamId/review/skaters/:skaterId/laps', requireUser, member, async (req, res) => {
    const viewer = viewerOf(req.membership!);
    const skaterId = skaterIdOf(req);
    const query = parse(lapTrendQuerySchema, singleValued(req.query));
    await assertSkaterVisible(dataSource, viewer, skaterId);
    const timeZone = await teamTimeZone(dataSource, viewer.teamId);
    res.json(await lapTrend(dataSource, viewer.teamId, timeZone, skaterId, query));
  });

  return router;
}
