import { Router } from 'express';
import type { DataSource } from 'typeorm';

/** /api/health: is the process up and the database reachable. */
export function healthRoutes(db: DataSource, version: string) {
  const router = Router();
  router.get('/', async (_req, res) => {
    try {
      await db.query('SELECT 1');
      res.json({ status: 'ok', database: 'ok', version });
    } catch {
      res.status(503).json({ status: 'degraded', database: 'unreachable', version });
    }
  });
  return router;
}
