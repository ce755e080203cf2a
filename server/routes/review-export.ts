/** Evening review routes (issue #10), under /api/teams/:teamId/review/. Being built. */
import { Router } from 'express';
import type { DataSource } from 'typeorm';

export function exportRoutes(_dataSource: DataSource) {
  return Router();
}
