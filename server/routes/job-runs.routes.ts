import { Router } from 'express';
import { z } from 'zod';
import { authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id } from './schemas.js';

const listQuery = z.strictObject({ job: z.enum(['detection', 'retention']).optional(), limit: z.coerce.number().int().min(1).max(500).default(100) });
const runBody = z.strictObject({ job: z.enum(['detection', 'retention']), siteId: id.optional() });

/** /api/job-runs: what the scheduled jobs did, and "run now" (admins). */
export function jobRunsRoutes(services: Services) {
  const router = Router();
  router.use(authenticate, requireRole('admin'));

  router.get('/', validate({ query: listQuery }), async (_req, res) => {
    res.json({ runs: await services.jobRuns.list(res.locals.query.limit, res.locals.query.job) });
  });

  router.post('/', validate({ body: runBody }), async (_req, res) => {
    const { job, siteId } = res.locals.body as z.infer<typeof runBody>;
    // Started in the background; the page polls the list. A run already under way is not doubled.
    const started = job === 'detection' ? services.jobRuns.detect('manual', siteId) : services.jobRuns.retention('manual');
    started.catch(() => undefined);
    res.status(202).json({ started: { job, siteId: siteId ?? null } });
  });

  return router;
}
