import { Router } from 'express';
import { z } from 'zod';
import { authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id } from './schemas.js';

const jobName = z.enum(['detection', 'retention', 'report', 'backup']);
const listQuery = z.strictObject({ job: jobName.optional(), limit: z.coerce.number().int().min(1).max(500).default(100) });
const runBody = z
  .strictObject({ job: jobName, siteId: id.optional() })
  .refine((b) => b.siteId === undefined || b.job === 'detection', { message: 'only change detection runs for one site; leave it out for the other jobs', path: ['siteId'] });

/** /api/job-runs: what the scheduled jobs did, and "run now" (admins). */
export function jobRunsRoutes(services: Services) {
  const router = Router();
  router.use(authenticate, requireRole('admin'));

  router.get('/', validate({ query: listQuery }), async (_req, res) => {
    res.json({ runs: await services.jobRuns.list(res.locals.query.limit, res.locals.query.job) });
  });

  router.post('/', validate({ body: runBody }), async (_req, res) => {
    const { job, siteId } = res.locals.body as z.infer<typeof runBody>;
    const now = new Date();
    // The monthly reports go out only when due; "run now" makes the same check as the hourly job
    // and says so when nothing is due instead of leaving an empty run.
    if (job === 'report' && (await services.reports.due(now)).length === 0) {
      res.json({ started: null, message: 'No monthly report is due now: each customer organization’s report goes out from 07:00 on the 1st of the month in its own time zone, once per month.' });
      return;
    }
    // Started in the background; the page polls the list. A run already under way is not doubled.
    const started =
      job === 'detection' ? services.jobRuns.detect('manual', siteId)
      : job === 'retention' ? services.jobRuns.retention('manual')
      : job === 'report' ? services.jobRuns.report('manual', services.reports, now)
      : services.jobRuns.backup('manual', services.backups, now);
    started.catch(() => undefined);
    res.status(202).json({ started: { job, siteId: siteId ?? null } });
  });

  return router;
}
