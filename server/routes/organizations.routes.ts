import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { name, timezone } from './schemas.js';

const createBody = z.strictObject({ name: name(), timezone });

/** /api/organizations: everyone reads what they may see; admins create customer organizations. */
export function organizationsRoutes(services: Services) {
  const router = Router();

  router.get('/', authenticate, async (_req, res) => {
    res.json({ organizations: await services.organizations.list(actorOf(res)) });
  });

  router.post('/', authenticate, requireRole('admin'), validate({ body: createBody }), async (_req, res) => {
    res.status(201).json({ organization: await services.organizations.create(actorOf(res), res.locals.body) });
  });

  return router;
}
