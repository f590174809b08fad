import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { email, id, name } from './schemas.js';

const orgParams = z.object({ orgId: id });
const recipientParams = z.object({ orgId: id, recipientId: id });
const token = z.string().min(10, 'is too short').max(200, 'is too long').regex(/^[A-Za-z0-9_.-]+$/, 'holds characters a link never has');

/** /api/organizations/:orgId/recipients: who receives the monthly report (site managers of the organization and admins). */
export function recipientsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate, requireRole('admin', 'site_manager'));

  router.get('/', validate({ params: orgParams }), async (_req, res) => {
    res.json({ recipients: await services.recipients.list(actorOf(res), res.locals.params.orgId) });
  });

  router.post('/', validate({ params: orgParams, body: z.strictObject({ email, name: name().optional() }) }), async (_req, res) => {
    res.status(201).json({ recipient: await services.recipients.add(actorOf(res), res.locals.params.orgId, res.locals.body) });
  });

  router.delete('/:recipientId', validate({ params: recipientParams }), async (_req, res) => {
    await services.recipients.remove(actorOf(res), res.locals.params.orgId, res.locals.params.recipientId);
    res.status(204).end();
  });

  return router;
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/** /api/unsubscribe/:token: the signed link in every report mail; public, records the unsubscribe, answers a small page (or JSON when asked). */
export function unsubscribeRoutes(services: Services) {
  const router = Router();
  router.get('/:token', validate({ params: z.object({ token }) }), async (req, res) => {
    const done = await services.recipients.unsubscribe(res.locals.params.token);
    if (!req.accepts('html') || req.accepts(['json', 'html']) === 'json') {
      res.json(done);
      return;
    }
    res.type('html').send(
      `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Unsubscribed · Driftline</title></head>` +
        `<body style="font-family: system-ui, sans-serif; max-width: 36rem; margin: 4rem auto; padding: 0 1rem; color: #1d2733;">` +
        `<h1 style="font-size: 1.4rem;">You are unsubscribed</h1>` +
        `<p>${escapeHtml(done.email)} will no longer receive the monthly map health report of ${escapeHtml(done.organization)}.</p>` +
        `<p style="color: #5b6673;">Ask a site manager of your organization if you want it again.</p></body></html>`,
    );
  });
  return router;
}

const monthParams = z.object({ orgId: id, month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'must be a month written YYYY-MM') });

/**
 * /api/organizations/:orgId/reports: history and preview for admins and the organization's site
 * managers; its viewers read the reports that were sent; admins send a month's report now.
 */
export function reportsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate, requireRole('admin', 'site_manager', 'viewer'));

  router.get('/', validate({ params: orgParams }), async (_req, res) => {
    res.json(await services.reports.history(actorOf(res), res.locals.params.orgId));
  });

  router.get('/:month/preview', validate({ params: monthParams }), async (_req, res) => {
    res.json(await services.reports.preview(actorOf(res), res.locals.params.orgId, res.locals.params.month));
  });

  router.post('/:month/send', requireRole('admin'), validate({ params: monthParams, body: z.strictObject({}).optional() }), async (_req, res) => {
    res.json(await services.reports.send(res.locals.params.orgId, res.locals.params.month));
  });

  return router;
}
