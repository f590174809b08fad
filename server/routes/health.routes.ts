import { Router } from 'express';
import type { Actor } from '../auth/actor.js';
import type { DemoSeedProgress } from '../services/demo-seed.service.js';
import type { SystemStatusService } from '../services/system-status.service.js';

/**
 * /api/health, public so that monitors and load balancers can ask without signing in: the database,
 * the last run of each job kind, the data directory's disk and how far the demo seed has got.
 * 503 when the database cannot be reached; 'warn' (200) when the disk is low or a job kind's last
 * run failed. Error texts and byte counts only for signed-in admins.
 */
export function healthRoutes(systemStatus: SystemStatusService, version: string, demo: DemoSeedProgress) {
  const router = Router();
  router.get('/', async (_req, res) => {
    const admin = (res.locals.actor as Actor | undefined)?.role === 'admin';
    const status = await systemStatus.check(admin);
    res.status(status.database === 'ok' ? 200 : 503).json({ ...status, version, demo });
  });
  return router;
}
