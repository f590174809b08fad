import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id, name, timezone } from './schemas.js';

const createBody = z.strictObject({ name: name(), city: name(80), timezone, organizationId: id });

/** /api/sites: scoped to the caller's organization unless the caller is an operator. */
export function sitesRoutes(services: Services) {
  const router = Router();
  router.use(authenticate);

  router.get('/', async (_req, res) => {
    res.json({ sites: await services.sites.list(actorOf(res)) });
  });

  router.post('/', requireRole('admin'), validate({ body: createBody }), async (_req, res) => {
    res.status(201).json({ site: await services.sites.create(actorOf(res), res.locals.body) });
  });

  router.get('/:siteId', validate({ params: z.object({ siteId: id }) }), async (_req, res) => {
    res.json({ site: await services.sites.get(actorOf(res), res.locals.params.siteId) });
  });

  return router;
}
