/** GET /api/health: is the server up and can it reach PostgreSQL. */
import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { serverNow } from '../services/sync/clock';

export function healthRoutes(dataSource: DataSource) {
  const router = Router();
  router.get('/health', async (_req, res) => {
    try {
      await dataSource.query('SELECT 1');
      // serverTime lets a device with a wrong clock correct itself before it sends changes.
      res.set('Cache-Control', 'no-store').json({ status: 'ok', database: 'up', serverTime: new Date(serverNow()).toISOString() });
    } catch {
      res.status(503).json({ status: 'degraded', database: 'down' });
    }
  });
  return router;
}
