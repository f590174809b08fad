import { Router } from 'express';
import type { DataSource } from 'typeorm';
import type { DemoSeedProgress } from '../services/demo-seed.service.js';

/** /api/health: is the process up, the database reachable, and how far the demo seed has got. */
export function healthRoutes(db: DataSource, version: string, demo: DemoSeedProgress) {
  const router = Router();
  router.get('/', async (_req, res) => {
    try {
      await db.query('SELECT 1');
      res.json({ status: 'ok', database: 'ok', version, demo });
    } catch {
      res.status(503).json({ status: 'degraded', database: 'unreachable', version });
    }
  });
  return router;
}
