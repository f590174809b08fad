import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id, role } from './schemas.js';

const patchBody = z
  .strictObject({ role: role.optional(), status: z.enum(['active', 'disabled']).optional() })
  .refine((b) => b.role !== undefined || b.status !== undefined, 'give a role or a status to change');

/** /api/users: the admin's list of people and their roles. */
export function usersRoutes(services: Services) {
  const router = Router();
  router.use(authenticate, requireRole('admin'));

  router.get('/', async (_req, res) => {
    res.json({ users: await services.users.list() });
  });

  router.patch('/:id', validate({ params: z.object({ id }), body: patchBody }), async (_req, res) => {
    res.json({ user: await services.users.update(actorOf(res), res.locals.params.id, res.locals.body) });
  });

  return router;
}
