import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';

const query = z.strictObject({ limit: z.coerce.number().int().min(1).max(500).default(100) });

/** /api/audit-events: who did what, for admins. */
export function auditRoutes(services: Services) {
  const router = Router();
  router.get('/', authenticate, requireRole('admin'), validate({ query }), async (_req, res) => {
    res.json({ events: await services.audit.list(actorOf(res), res.locals.query.limit) });
  });
  return router;
}
