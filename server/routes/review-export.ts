/**
 * The review's export and print (issue #10 §5), coaches only (a skater or guardian gets 403):
 *
 *   GET /api/teams/:teamId/review/export.csv?kind=observations|runs&from=YYYY-MM-DD&to=YYYY-MM-DD&skaterIds=a,b
 *       text/csv; charset=utf-8, an attachment named boardside-<kind>-<from>-<to>.csv: a header
 *       row, then one row per note or run, streamed page by page (services/review/export.ts).
 *       from/to are local days of the team's zone, both included, at most 366 days; skaterIds
 *       optional (every skater); an id that is not a skater of this team is a 400 naming it.
 *   GET /api/teams/:teamId/review/skaters/:skaterId/sheet?week=YYYY-Www
 *       one skater's week to print: cue counts, shared notes, runs (404 for another team's id).
 *
 * Private notes are in the export: they are the coaches' own notes, and only coaches export.
 */
import { pipeline } from 'node:stream/promises';
import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { exportQuerySchema, sheetQuerySchema } from '../../shared/schemas/review-export';
import { requireTeamRole, requireUser } from '../lib/auth';
import { parse } from '../lib/errors';
import { logger } from '../lib/logger';
import { assertSkaterVisible, teamTimeZone, viewerOf } from '../services/review/access';
import { assertSkatersInTeam, coalesce, csvWriter, exportColumns, exportRecords, weeklySheet } from '../services/review/export';
import { skaterIdOf } from '../services/review/path-ids';
import { singleValued } from '../services/review/query-string';

export function exportRoutes(dataSource: DataSource) {
  const router = Router();
  const coach = requireTeamRole(dataSource, 'head_coach', 'coach');

  router.get('/teams/:teamId/review/export.csv', requireUser, coach, async (req, res) => {
    const { teamId } = req.membership!;
    const query = parse(exportQuerySchema, singleValued(req.query));
    if (query.skaterIds) await assertSkatersInTeam(dataSource, teamId, query.skaterIds);
    const timeZone = await teamTimeZone(dataSource, teamId);
    const records = await exportRecords(dataSource, query.kind, {
      teamId,
      timeZone,
      from: query.from,
      to: query.to,
      skaterIds: query.skaterIds ?? null,
    });
    res.status(200);
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="boardside-${query.kind}-${query.from}-${query.to}.csv"`);
    res.setHeader('X-Content-Type-Options', 'nosniff');
    try {
      await pipeline(records, csvWriter(exportColumns(query.kind)), coalesce(), res);
    } catch (error) {
      // The first page was read above; a later failure can only cut the file off (pipeline
      // destroyed the response), which the browser reports as a failed download.
      logger.warn({ err: error, teamId, kind: query.kind }, 'CSV export ended early');
    }
  });

  router.get('/teams/:teamId/review/skaters/:skaterId/sheet', requireUser, coach, async (req, res) => {
    const viewer = viewerOf(req.membership!);
    const skaterId = skaterIdOf(req);
    const { week } = parse(sheetQuerySchema, singleValued(req.query));
    await assertSkaterVisible(dataSource, viewer, skaterId);
    const timeZone = await teamTimeZone(dataSource, viewer.teamId);
    res.json(await weeklySheet(dataSource, viewer.teamId, timeZone, skaterId, week));
  });

  return router;
}
