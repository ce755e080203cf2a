/**
 * The sync endpoints (shared/SYNC.md): POST /api/sync/push and GET /api/sync/pull. Both need a
 * signed-in member of the team named in the body or query (404 otherwise, so team ids reveal
 * nothing). A push's client id belongs to the first user that pushes with it; anyone else using
 * it gets 403. A database failure during a push answers 503 `unavailable` with nothing applied.
 */
import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { pullQuerySchema, pushBodySchema } from '../../shared/schemas/sync';
import { requireUser } from '../lib/auth';
import { forbidden, HttpError, notFound, parse } from '../lib/errors';
import { syncLimit } from '../lib/rate-limit';
import { readPull } from '../services/sync/pull';
import { applyPush } from '../services/sync/push';
import type { Caller } from '../services/sync/settle';

async function callerIn(dataSource: DataSource, teamId: string, userId: string): Promise<Caller> {
  const [membership]: { role: Caller['role']; skater_id: string | null; display_name: string }[] = await dataSource.query(
    `SELECT m.role, m.skater_id, u.display_name FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.team_id = $1 AND m.user_id = $2`,
    [teamId, userId],
  );
  if (!membership) throw notFound('Team not found');
  return { userId, role: membership.role, skaterId: membership.skater_id, displayName: membership.display_name };
}

/** Registers the client id to the user on first use; answers the id's owner. */
async function claimClient(dataSource: DataSource, clientId: string, userId: string) {
  const [row]: { user_id: string }[] = await dataSource.query(
    `INSERT INTO sync_clients (client_id, user_id) VALUES ($1, $2)
     ON CONFLICT (client_id) DO UPDATE SET client_id = excluded.client_id
     RETURNING user_id`,
    [clientId, userId],
  );
  if (row.user_id !== userId) throw forbidden('This device id belongs to another account: sign in again on this device');
}

export function syncRoutes(dataSource: DataSource) {
  const router = Router();
  router.use('/sync', requireUser);
  router.use('/sync', syncLimit());

  router.post('/sync/push', async (req, res) => {
    const body = parse(pushBodySchema, req.body);
    const caller = await callerIn(dataSource, body.teamId, req.userId!);
    await claimClient(dataSource, body.clientId, req.userId!);
    try {
      res.json(await applyPush(dataSource, caller, body));
    } catch (error) {
      if (error instanceof HttpError) throw error;
      // The batch rolled back as a whole: the device keeps every op and retries later.
      req.log?.error({ err: error }, 'sync push failed; batch rolled back');
      throw new HttpError(503, 'unavailable', 'The server could not save this batch; nothing was applied, try again shortly');
    }
  });

  router.get('/sync/pull', async (req, res) => {
    const query = parse(pullQuerySchema, req.query);
    const caller = await callerIn(dataSource, query.teamId, req.userId!);
    res.json(await readPull(dataSource, caller, query.teamId, query.cursor, query.limit));
  });

  return router;
}
