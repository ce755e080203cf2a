/**
 * Cue follow-up (issue #10 §3) and the skater's runs by week (§6), under /api/teams/:teamId/review/:
 *
 *   GET skaters/:skaterId/follow-up?threshold=3&from=YYYY-Www&to=YYYY-Www
 *       the cues stressed in those weeks (at least `threshold` "needs work" marks in a week), each
 *       with the four weeks after it, the related lap times and the verdict (shared/follow-up.ts)
 *   GET groups/:groupId/follow-up?threshold&from&to       (coaches only; a group's id, 'all' or 'none')
 *       the same for every live skater of the group who has a stressed cue
 *   GET skaters/:skaterId/runs-by-week?from&to
 *       the skater's finished runs in those weeks (by rink day), with their crossings
 *
 * Like server/routes/review.ts: coaches see every skater of the team; a skater their own, a
 * guardian the linked skater's, and no group view (403); another id, or another team's, is 404; no sign-in 401. Query
 * strings are parsed with shared/schemas/review-follow-up.ts: a bad one is a 400 naming the field.
 * Weeks are ISO weeks in the team's time zone; no range asked for = the last 8 weeks.
 */
import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { reviewGroupSchema } from '../../shared/schemas/review';
import { followUpQuerySchema, runsByWeekQuerySchema } from '../../shared/schemas/review-follow-up';
import { requireTeamRole, requireUser } from '../lib/auth';
import { notFound, parse } from '../lib/errors';
import { assertGroupExists, assertSkaterVisible, teamTimeZone, viewerOf } from '../services/review/access';
import { groupFollowUp, skaterFollowUp, skaterRunsByWeek } from '../services/review/follow-up';
import { skaterIdOf } from '../services/review/path-ids';
import { singleValued } from '../services/review/query-string';
import { resolveRange } from '../services/review/range';

export function followUpRoutes(dataSource: DataSource) {
  const router = Router();
  const member = requireTeamRole(dataSource, 'head_coach', 'coach', 'skater', 'guardian');
  const coach = requireTeamRole(dataSource, 'head_coach', 'coach');

  router.get('/teams/:teamId/review/skaters/:skaterId/follow-up', requireUser, member, async (req, res) => {
    const viewer = viewerOf(req.membership!);
    const skaterId = skaterIdOf(req);
    const { threshold, from, to } = parse(followUpQuerySchema, singleValued(req.query));
    await assertSkaterVisible(dataSource, viewer, skaterId);
    const timeZone = await teamTimeZone(dataSource, viewer.teamId);
    res.json(await skaterFollowUp(dataSource, viewer.teamId, timeZone, skaterId, resolveRange({ from, to }, timeZone), threshold));
  });

  router.get('/teams/:teamId/review/groups/:groupId/follow-up', requireUser, coach, async (req, res) => {
    const { teamId } = req.membership!;
    const group = reviewGroupSchema.safeParse(req.params.groupId);
    if (!group.success) throw notFound('No such group in this team');
    const { threshold, from, to } = parse(followUpQuerySchema, singleValued(req.query));
    await assertGroupExists(dataSource, teamId, group.data);
    const timeZone = await teamTimeZone(dataSource, teamId);
    res.json(await groupFollowUp(dataSource, teamId, timeZone, group.data, resolveRange({ from, to }, timeZone), threshold));
  });

  router.get('/teams/:teamId/review/skaters/:skaterId/runs-by-week', requireUser, member, async (req, res) => {
    const viewer = viewerOf(req.membership!);
    const skaterId = skaterIdOf(req);
    const query = parse(runsByWeekQuerySchema, singleValued(req.query));
    await assertSkaterVisible(dataSource, viewer, skaterId);
    const timeZone = await teamTimeZone(dataSource, viewer.teamId);
    res.json(await skaterRunsByWeek(dataSource, viewer.teamId, timeZone, skaterId, resolveRange(query, timeZone)));
  });

  return router;
}
