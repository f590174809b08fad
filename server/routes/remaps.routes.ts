import { Router } from 'express';
import { z } from 'zod';
import { REMAP_STATUSES } from '../entities/remap-request.entity.js';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import { REMAP_ROLES } from '../services/remaps.service.js';
import type { Services } from '../services/index.js';
import { id } from './schemas.js';

const siteParams = z.object({ siteId: id });
const remapParams = z.object({ siteId: id, remapId: id });
const instant = z.iso.datetime({ offset: true, message: 'must be an ISO date-time with its offset, e.g. 2026-11-12T01:00:00Z' }).transform((s) => new Date(s));
const listQuery = z.strictObject({
  status: z.enum(REMAP_STATUSES as [string, ...string[]]).optional(),
  page: z.coerce.number().int('must be a whole number').min(1, 'must be at least 1').default(1),
  pageSize: z.coerce.number().int('must be a whole number').min(1, 'must be at least 1').max(200, 'must be at most 200').default(25),
});
const createBody = z.strictObject({
  zoneIds: z
    .array(id)
    .min(1, 'name at least one zone')
    .max(50, 'a request holds at most 50 zones')
    .refine((ids) => new Set(ids).size === ids.length, 'name each zone once'),
  title: z.string().trim().max(200, 'must have at most 200 characters').optional(),
  note: z.string().trim().max(2000, 'must have at most 2000 characters').optional(),
});
const quietQuery = z.strictObject({
  days: z.coerce.number().int('must be a whole number').min(1, 'must be at least 1').max(28, 'must be at most 28').default(14),
  count: z.coerce.number().int('must be a whole number').min(1, 'must be at least 1').max(10, 'must be at most 10').default(3),
});
const scheduleBody = z.strictObject({ start: instant, end: instant.optional(), assigneeId: id });
const emptyBody = z.strictObject({}).optional();

/** /api/sites/:siteId/remaps: remap requests of a site, their quiet windows and their moves by role. */
export function remapsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate);
  const remaps = services.remaps;

  router.get('/', validate({ params: siteParams, query: listQuery }), async (_req, res) => {
    res.json(await remaps.list(actorOf(res), res.locals.params.siteId, res.locals.query));
  });

  router.post('/', requireRole(...REMAP_ROLES.create), validate({ params: siteParams, body: createBody }), async (_req, res) => {
    res.status(201).json({ remap: await remaps.create(actorOf(res), res.locals.params.siteId, res.locals.body) });
  });

  router.get('/assignees', requireRole(...REMAP_ROLES.schedule), validate({ params: siteParams }), async (_req, res) => {
    res.json({ assignees: await remaps.assignees(actorOf(res), res.locals.params.siteId) });
  });

  router.get('/:remapId', validate({ params: remapParams }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    res.json({ remap: await remaps.get(actorOf(res), siteId, remapId) });
  });

  router.get('/:remapId/calendar.ics', validate({ params: remapParams }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    const file = await remaps.calendarFile(actorOf(res), siteId, remapId);
    res.setHeader('Content-Disposition', `attachment; filename="${file.fileName}"`);
    res.type('text/calendar; charset=utf-8').send(file.text);
  });

  router.get('/:remapId/quiet-windows', validate({ params: remapParams, query: quietQuery }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    res.json({ quietWindows: await remaps.quietWindows(actorOf(res), siteId, remapId, res.locals.query) });
  });

  router.post('/:remapId/approve', requireRole(...REMAP_ROLES.approve), validate({ params: remapParams, body: emptyBody }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    res.json({ remap: await remaps.approve(actorOf(res), siteId, remapId) });
  });

  router.post('/:remapId/schedule', requireRole(...REMAP_ROLES.schedule), validate({ params: remapParams, body: scheduleBody }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    res.json({ remap: await remaps.schedule(actorOf(res), siteId, remapId, res.locals.body) });
  });

  router.post('/:remapId/start', requireRole(...REMAP_ROLES.start), validate({ params: remapParams, body: emptyBody }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    res.json({ remap: await remaps.start(actorOf(res), siteId, remapId) });
  });

  router.post('/:remapId/attach-map', requireRole(...REMAP_ROLES.attachMap), validate({ params: remapParams, body: z.strictObject({ mapVersionId: id }) }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    res.json({ remap: await remaps.attachMap(actorOf(res), siteId, remapId, res.locals.body.mapVersionId) });
  });

  router.post('/:remapId/cancel', requireRole(...REMAP_ROLES.cancel), validate({ params: remapParams, body: z.strictObject({ reason: z.string().trim().min(1, 'give a reason').max(500, 'must have at most 500 characters') }) }), async (_req, res) => {
    const { siteId, remapId } = res.locals.params;
    res.json({ remap: await remaps.cancel(actorOf(res), siteId, remapId, res.locals.body.reason) });
  });

  return router;
}

/** /api/remaps: the calendar of remap windows across every site the caller may see. */
export function remapCalendarRoutes(services: Services) {
  const router = Router();
  router.use(authenticate);

  router.get('/', validate({ query: z.strictObject({ from: instant, to: instant }) }), async (_req, res) => {
    res.json(await services.remaps.calendar(actorOf(res), res.locals.query.from, res.locals.query.to));
  });

  return router;
}
