import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id } from './schemas.js';

const query = z.strictObject({ hours: z.coerce.number().int('must be a whole number of hours').min(1, 'must be at least 1').max(168, 'must be at most 168 (a week)').default(24) });

/** /api/sites/:siteId/paths: where the site's robots drove recently (the map's paths layer). */
export function pathsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate);

  router.get('/', validate({ params: z.object({ siteId: id }), query }), async (_req, res) => {
    res.json({ paths: await services.paths.recent(actorOf(res), res.locals.params.siteId, res.locals.query.hours) });
  });

  return router;
}
