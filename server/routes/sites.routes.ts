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
    res.json({ sites: await services.health.fleet(actorOf(res)) });
  });

  router.post('/', requireRole('admin'), validate({ body: createBody }), async (_req, res) => {
    const site = await services.sites.create(actorOf(res), res.locals.body);
    res.status(201).json({ site: await services.health.site(actorOf(res), site.id) });
  });

  router.get('/:siteId', validate({ params: z.object({ siteId: id }) }), async (_req, res) => {
    res.json({ site: await services.health.site(actorOf(res), res.locals.params.siteId) });
  });

  router.get('/:siteId/agreement', validate({ params: z.object({ siteId: id }), query: z.strictObject({ days: z.coerce.number().int().min(1).max(60).default(7) }) }), async (_req, res) => {
    res.json({ agreement: await services.health.agreementBlocks(actorOf(res), res.locals.params.siteId, res.locals.query.days) });
  });

  return router;
}
