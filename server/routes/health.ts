/**
 * GET /api/health: is the server up, can it reach PostgreSQL, and can its sync clocks still
 * advance (a clock running past the allowed lead would stamp replies from the future: 503).
 */
import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { clockHealth, serverNow } from '../services/sync/clock';

export function healthRoutes(dataSource: DataSource) {
  const router = Router();
  router.get('/health', async (_req, res) => {
    try {
      await dataSource.query('SELECT 1');
    } catch {
      res.status(503).set('Cache-Control', 'no-store').json({ status: 'degraded', database: 'down' });
      return;
    }
    const clock = clockHealth();
    // serverTime lets a device with a wrong clock correct itself before it sends changes.
    res
      .status(clock.ok ? 200 : 503)
      .set('Cache-Control', 'no-store')
      .json({
        status: clock.ok ? 'ok' : 'degraded',
        database: 'up',
        clock: { status: clock.ok ? 'ok' : 'ahead', maxLeadMs: clock.maxLeadMs },
        serverTime: new Date(serverNow()).toISOString(),
      });
  });
  return router;
}
