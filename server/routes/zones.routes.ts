import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id } from './schemas.js';

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'must be a date like 2026-11-03');
const listQuery = z.strictObject({
  kind: z.enum(['new', 'missing', 'unmapped']).optional(),
  status: z.enum(['active', 'open', 'acknowledged', 'planned', 'resolved', 'dismissed', 'cleared']).optional(),
  persistence: z.enum(['persistent', 'intermittent']).optional(),
  seenFrom: day.optional(),
  seenTo: day.optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
});
const zoneParams = z.object({ siteId: id, zoneId: id });
const note = z.string().trim().max(500);

/** /api/sites/:siteId/zones: changed areas, their timelines, and status changes by role. */
export function zonesRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate);

  router.get('/', validate({ params: z.object({ siteId: id }), query: listQuery }), async (_req, res) => {
    res.json(await services.detection.list(actorOf(res), res.locals.params.siteId, res.locals.query));
  });

  router.get('/:zoneId', validate({ params: zoneParams }), async (_req, res) => {
    const { siteId, zoneId } = res.locals.params;
    res.json({ zone: await services.detection.get(actorOf(res), siteId, zoneId) });
  });

  // DESIGN.md §2 and the issue: site managers acknowledge; mappers and admins dismiss.
  router.post('/:zoneId/acknowledge', requireRole('admin', 'site_manager'), validate({ params: zoneParams, body: z.strictObject({ note: note.default('') }) }), async (_req, res) => {
    const { siteId, zoneId } = res.locals.params;
    res.json({ zone: await services.detection.changeStatus(actorOf(res), siteId, zoneId, 'acknowledged', res.locals.body.note) });
  });

  router.post('/:zoneId/dismiss', requireRole('admin', 'mapper'), validate({ params: zoneParams, body: z.strictObject({ reason: note.min(1, 'give a reason, e.g. "volatile area"') }) }), async (_req, res) => {
    const { siteId, zoneId } = res.locals.params;
    res.json({ zone: await services.detection.changeStatus(actorOf(res), siteId, zoneId, 'dismissed', res.locals.body.reason) });
  });

  return router;
}
