import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { flagView } from '../services/scanner-check.service.js';
import { id, mounts, name } from './schemas.js';

const robotName = name(40).regex(/^[A-Za-z0-9_.-]+$/, 'may use letters, digits, _ . - only (it must match the name in scan logs)');
const createBody = z.strictObject({ name: robotName, model: name(80), mounts: mounts.default([]) });
const patchBody = z
  .strictObject({ name: robotName.optional(), model: name(80).optional(), mounts: mounts.optional() })
  .refine((b) => Object.keys(b).length > 0, 'give at least one field to change');
const siteParams = z.object({ siteId: id });
const robotParams = z.object({ siteId: id, robotId: id });
const tokenParams = z.object({ siteId: id, robotId: id, tokenId: id });

/** The roles that manage robots and tokens; a site manager only within their organization (the service scopes the site). */
const MANAGERS = ['admin', 'mapper', 'site_manager'] as const;

/** /api/sites/:siteId/robots: robots of a site and their ingest tokens. */
export function robotsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate);

  router.get('/', validate({ params: siteParams }), async (_req, res) => {
    res.json({ robots: await services.scannerCheck.robotsWithHealth(actorOf(res), res.locals.params.siteId) });
  });

  router.post('/', requireRole(...MANAGERS), validate({ params: siteParams, body: createBody }), async (_req, res) => {
    res.status(201).json({ robot: await services.robots.create(actorOf(res), res.locals.params.siteId, res.locals.body) });
  });

  router.patch('/:robotId', requireRole(...MANAGERS), validate({ params: robotParams, body: patchBody }), async (_req, res) => {
    const { siteId, robotId } = res.locals.params;
    res.json({ robot: await services.robots.update(actorOf(res), siteId, robotId, res.locals.body) });
  });

  router.delete('/:robotId', requireRole(...MANAGERS), validate({ params: robotParams }), async (_req, res) => {
    const { siteId, robotId } = res.locals.params;
    await services.robots.remove(actorOf(res), siteId, robotId);
    res.status(204).end();
  });

  router.get('/:robotId/tokens', requireRole(...MANAGERS), validate({ params: robotParams }), async (_req, res) => {
    const { siteId, robotId } = res.locals.params;
    res.json({ tokens: await services.robots.listTokens(actorOf(res), siteId, robotId) });
  });

  router.post('/:robotId/tokens', requireRole(...MANAGERS), validate({ params: robotParams, body: z.strictObject({ label: name(80) }) }), async (_req, res) => {
    const { siteId, robotId } = res.locals.params;
    res.status(201).json(await services.robots.createToken(actorOf(res), siteId, robotId, res.locals.body.label));
  });

  router.delete('/:robotId/tokens/:tokenId', requireRole(...MANAGERS), validate({ params: tokenParams }), async (_req, res) => {
    const { siteId, robotId, tokenId } = res.locals.params;
    await services.robots.revokeToken(actorOf(res), siteId, robotId, tokenId);
    res.status(204).end();
  });

  router.post('/:robotId/flags/:flagId/clear', requireRole(...MANAGERS), validate({ params: z.object({ siteId: id, robotId: id, flagId: id }), body: z.strictObject({ note: z.string().trim().min(1, 'say what was done, e.g. "window cleaned, mount re-aligned"').max(500) }) }), async (_req, res) => {
    const { siteId, robotId, flagId } = res.locals.params;
    res.json({ flag: flagView(await services.scannerCheck.clear(actorOf(res), siteId, robotId, flagId, res.locals.body.note)) });
  });

  return router;
}
