import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { email, id, name, password, role } from './schemas.js';

const createBody = z.strictObject({ email, name: name(), role, organizationId: id });
const tokenParams = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, 'is not an invitation token') });

/** /api/invitations: admins invite; the public token routes let the invited person set a password. */
export function invitationsRoutes(services: Services) {
  const router = Router();

  router.get('/', authenticate, requireRole('admin'), async (_req, res) => {
    res.json({ invitations: await services.invitations.list() });
  });

  router.post('/', authenticate, requireRole('admin'), validate({ body: createBody }), async (_req, res) => {
    const body = res.locals.body as z.infer<typeof createBody>;
    res.status(201).json(await services.invitations.create(actorOf(res), { ...body, role: body.role as never }));
  });

  router.delete('/:id', authenticate, requireRole('admin'), validate({ params: z.object({ id }) }), async (_req, res) => {
    await services.invitations.revoke(actorOf(res), res.locals.params.id);
    res.status(204).end();
  });

  router.get('/token/:token', validate({ params: tokenParams }), async (_req, res) => {
    res.json(await services.invitations.describe(res.locals.params.token));
  });

  router.post('/token/:token/accept', validate({ params: tokenParams, body: z.strictObject({ password }) }), async (_req, res) => {
    const { userId, me } = await services.invitations.accept(res.locals.params.token, res.locals.body.password);
    res.append('Set-Cookie', (await services.users.openSession(userId)).serialize());
    res.json({ user: me });
  });

  return router;
}
