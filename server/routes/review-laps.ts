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
import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { lapTrendQuerySchema } from '../../shared/schemas/review-laps';
import { requireTeamRole, requireUser } from '../lib/auth';
import { parse } from '../lib/errors';
import { assertSkaterVisible, teamTimeZone, viewerOf } from '../services/review/access';
import { lapTrend } from '../services/review/laps';
import { skaterIdOf } from '../services/review/path-ids';
import { singleValued } from '../services/review/query-string';

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
