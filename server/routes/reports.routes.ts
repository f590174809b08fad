import express, { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { email, id, name } from './schemas.js';

const orgParams = z.object({ orgId: id });
const recipientParams = z.object({ orgId: id, recipientId: id });
// Only the length is checked here: whether a token holds is the signature's question, so a cut or
// mangled link gets the same sentence as a forged one (RecipientsService.byToken).
const token = z.string().max(200, 'is too long');

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

/** The body of an unsubscribe POST: empty from the app's page, or RFC 8058's `List-Unsubscribe=One-Click` from a mail client. */
const unsubscribeBody = z.strictObject({ 'List-Unsubscribe': z.literal('One-Click', { error: 'must be One-Click (RFC 8058)' }).optional() }).optional();

/**
 * /api/unsubscribe/:token: the signed link of every report mail; public, no session. GET only
 * reads whom the link names (mail scanners open links, so opening one must change nothing) and
 * sends a browser to the app's page `/unsubscribe/:token`, which asks before it acts; POST
 * records the unsubscribe, from that page or as the one-click POST a mail client makes for the
 * List-Unsubscribe header (RFC 8058, a form body `List-Unsubscribe=One-Click`).
 */
export function unsubscribeRoutes(services: Services) {
  const router = Router();
  const params = validate({ params: z.object({ token }) });

  router.get('/:token', params, async (req, res) => {
    if (req.accepts(['json', 'html']) === 'html') {
      res.redirect(303, `/unsubscribe/${encodeURIComponent(res.locals.params.token)}`);
      return;
    }
    res.json(await services.recipients.describe(res.locals.params.token));
  });

  router.post('/:token', express.urlencoded({ extended: false, limit: '1kb' }), params, validate({ body: unsubscribeBody }), async (_req, res) => {
    res.json(await services.recipients.unsubscribe(res.locals.params.token));
  });
  return router;
}

const monthParams = z.object({ orgId: id, month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'must be a month written YYYY-MM') });

/**
 * /api/organizations/:orgId/reports: history, preview and a month's figures for admins and the
 * organization's site managers; its viewers read the reports that were sent; admins send a month's report now.
 */
export function reportsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate, requireRole('admin', 'site_manager', 'viewer'));

  router.get('/', validate({ params: orgParams }), async (_req, res) => {
    res.json(await services.reports.history(actorOf(res), res.locals.params.orgId));
  });

  router.get('/:month', validate({ params: monthParams }), async (_req, res) => {
    res.json(await services.reports.figuresView(actorOf(res), res.locals.params.orgId, res.locals.params.month));
  });

  router.get('/:month/preview', validate({ params: monthParams }), async (_req, res) => {
    res.json(await services.reports.preview(actorOf(res), res.locals.params.orgId, res.locals.params.month));
  });

  router.post('/:month/send', requireRole('admin'), validate({ params: monthParams, body: z.strictObject({}).optional() }), async (_req, res) => {
    res.json(await services.reports.send(res.locals.params.orgId, res.locals.params.month));
  });

  return router;
}
