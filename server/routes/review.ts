/**
 * The evening review's counts (issue #10 §1, §6), all under /api/teams/:teamId/review/:
 *
 *   GET skaters/:skaterId/weeks?from=YYYY-Www&to=YYYY-Www   one skater's cues x ISO weeks
 *   GET groups/:groupId/weeks?from&to                       summed over a group ('all', 'none')
 *   GET week/:week?groupId=…                                skaters x cues for one week
 *   GET skaters/:skaterId/cells?cueId=…&week=…              the notes behind one cell
 *
 * Weeks are ISO weeks in the team's time zone (teams.time_zone). Coaches see the whole team; a
 * skater or guardian only their (linked) skater's weeks and cells, a private note's text blanked,
 * and no group or one-week views (403). An id of another team, or another skater's for a skater,
 * is 404. Query strings are parsed with shared/schemas/review.ts: a bad one is a 400 naming it.
 */
import { Router, type Request } from 'express';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import {
  reviewCellQuerySchema,
  reviewGroupSchema,
  reviewRangeQuerySchema,
  reviewWeekQuerySchema,
} from '../../shared/schemas/review';
import { isoWeekSchema } from '../../shared/weeks';
import { requireTeamRole, requireUser } from '../lib/auth';
import { notFound, parse } from '../lib/errors';
import { assertGroupExists, assertSkaterVisible, teamTimeZone, viewerOf } from '../services/review/access';
import { cellNotes, groupMatrix, skaterMatrix, weekGrid } from '../services/review/queries';
import { skaterIdOf } from '../services/review/path-ids';
import { singleValued } from '../services/review/query-string';
import { resolveRange, weekRange } from '../services/review/range';

function groupIdOf(req: Request) {
  const id = reviewGroupSchema.safeParse(req.params.groupId);
  if (!id.success) throw notFound('No such group in this team');
  return id.data;
}

export function reviewRoutes(dataSource: DataSource) {
  const router = Router();
  const member = requireTeamRole(dataSource, 'head_coach', 'coach', 'skater', 'guardian');
  const coach = requireTeamRole(dataSource, 'head_coach', 'coach');

  router.use('/teams/:teamId/review', requireUser);

  router.get('/teams/:teamId/review/skaters/:skaterId/weeks', member, async (req, res) => {
    const viewer = viewerOf(req.membership!);
    const skaterId = skaterIdOf(req);
    const query = parse(reviewRangeQuerySchema, singleValued(req.query));
    await assertSkaterVisible(dataSource, viewer, skaterId);
    const timeZone = await teamTimeZone(dataSource, viewer.teamId);
    res.json(await skaterMatrix(dataSource, viewer.teamId, timeZone, skaterId, resolveRange(query, timeZone)));
  });

  router.get('/teams/:teamId/review/groups/:groupId/weeks', coach, async (req, res) => {
    const { teamId } = req.membership!;
    const groupId = groupIdOf(req);
    const query = parse(reviewRangeQuerySchema, singleValued(req.query));
    await assertGroupExists(dataSource, teamId, groupId);
    const timeZone = await teamTimeZone(dataSource, teamId);
    res.json(await groupMatrix(dataSource, teamId, timeZone, groupId, resolveRange(query, timeZone)));
  });

  router.get('/teams/:teamId/review/week/:week', coach, async (req, res) => {
    const { teamId } = req.membership!;
    const week = parse(z.object({ week: isoWeekSchema('week') }), { week: req.params.week }).week;
    const { groupId = 'all' } = parse(reviewWeekQuerySchema, singleValued(req.query));
    await assertGroupExists(dataSource, teamId, groupId);
    const timeZone = await teamTimeZone(dataSource, teamId);
    res.json(await weekGrid(dataSource, teamId, timeZone, groupId, weekRange(week, week)));
  });

  router.get('/teams/:teamId/review/skaters/:skaterId/cells', member, async (req, res) => {
    const viewer = viewerOf(req.membership!);
    const skaterId = skaterIdOf(req);
    const { cueId, week } = parse(reviewCellQuerySchema, singleValued(req.query));
    await assertSkaterVisible(dataSource, viewer, skaterId);
    const cue: unknown[] = await dataSource.query(`SELECT 1 FROM cues WHERE team_id = $1 AND id = $2 AND deleted_at IS NULL`, [
      viewer.teamId,
      cueId,
    ]);
    if (cue.length === 0) throw notFound('No such cue in this team');
    const timeZone = await teamTimeZone(dataSource, viewer.teamId);
    res.json(await cellNotes(dataSource, viewer, timeZone, skaterId, cueId, weekRange(week, week)));
  });

  return router;
}
