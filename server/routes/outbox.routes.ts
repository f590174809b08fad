import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id } from './schemas.js';

const paging = { limit: z.coerce.number().int().min(1).max(200).default(50), offset: z.coerce.number().int().min(0).default(0) };
const partParams = z.object({ id, partId: z.string().min(1).max(200).regex(/^[^/\\]+$/, 'is not a part id') });

/** /api/outbox: what the built-in capture SMTP server received (admins). */
export function outboxRoutes(services: Services) {
  const router = Router();
  router.use(authenticate, requireRole('admin'));

  router.get('/', validate({ query: z.strictObject(paging) }), async (_req, res) => {
    res.json(await services.outbox.list(res.locals.query.limit, res.locals.query.offset));
  });

  router.get('/:id', validate({ params: z.object({ id }) }), async (_req, res) => {
    res.json({ message: await services.outbox.get(res.locals.params.id) });
  });

  router.get('/:id/parts/:partId', validate({ params: partParams }), async (_req, res) => {
    const part = await services.outbox.part(res.locals.params.id, res.locals.params.partId);
    res.setHeader('Content-Type', part.contentType);
    // Bytes from a mail are never run as a page of this origin.
    res.setHeader('Content-Security-Policy', "default-src 'none'; sandbox");
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Cache-Control', 'private, max-age=300');
    res.attachment(part.filename);
    if (part.inline) res.setHeader('Content-Disposition', `inline; filename="${encodeURIComponent(part.filename)}"`);
    res.send(part.content);
  });

  return router;
}

const mailQuery = z.strictObject({ ...paging, status: z.enum(['queued', 'sending', 'sent', 'failed']).optional() });

/** /api/mail: the delivery queue (admins all, site managers their organization's). */
export function mailRoutes(services: Services) {
  const router = Router();
  router.get('/', authenticate, requireRole('admin', 'site_manager'), validate({ query: mailQuery }), async (_req, res) => {
    res.json(await services.mail.list(actorOf(res), res.locals.query));
  });
  return router;
}
