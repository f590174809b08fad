import { Router } from 'express';
import { z } from 'zod';
import { STATION_NAME_MAX } from '../../shared/docking/docking-record.js';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id, name } from './schemas.js';

// Robots write the station's name in every docking result, so it keeps to printable characters.
const stationName = name(STATION_NAME_MAX).regex(/^[^\u0000-\u001f\u007f]+$/, 'must not hold control characters');
const siteParams = z.object({ siteId: id });
const stationParams = z.object({ siteId: id, stationId: id });
const between = (min: number, max: number) => z.number().finite().min(min, `must be at least ${min}`).max(max, `must be at most ${max}`);
// The same limits as the site settings dockingToleranceMm and dockingToleranceDeg (site-settings.routes.ts).
const toleranceBody = z.strictObject({ toleranceMm: between(1, 100).nullable(), toleranceDeg: between(0.1, 10).nullable() });

/**
 * Who may do what (README "Roles"): every role reads; site managers, mappers and admins add and
 * rename stations (site managers look after their site's robots and docking equipment); mappers
 * and admins attach station models (they make them); admins set a station's own tolerance
 * (thresholds are the admins', DESIGN §2).
 */
const STATION_KEEPERS = ['admin', 'mapper', 'site_manager'] as const;

/** /api/sites/:siteId/stations: docking stations, their accuracy and drift. */
export function dockingRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate);

  router.get('/', validate({ params: siteParams }), async (_req, res) => {
    res.json(await services.docking.list(actorOf(res), res.locals.params.siteId));
  });

  router.post('/', requireRole(...STATION_KEEPERS), validate({ params: siteParams, body: z.strictObject({ name: stationName }) }), async (_req, res) => {
    res.status(201).json({ station: await services.docking.create(actorOf(res), res.locals.params.siteId, res.locals.body) });
  });

  router.get('/:stationId', validate({ params: stationParams }), async (_req, res) => {
    const { siteId, stationId } = res.locals.params;
    res.json({ station: await services.docking.detail(actorOf(res), siteId, stationId) });
  });

  router.patch('/:stationId', requireRole(...STATION_KEEPERS), validate({ params: stationParams, body: z.strictObject({ name: stationName }) }), async (_req, res) => {
    const { siteId, stationId } = res.locals.params;
    res.json({ station: await services.docking.rename(actorOf(res), siteId, stationId, res.locals.body.name) });
  });

  router.put('/:stationId/model', requireRole('admin', 'mapper'), validate({ params: stationParams, body: z.strictObject({ mapVersionId: id }) }), async (_req, res) => {
    const { siteId, stationId } = res.locals.params;
    res.json({ station: await services.docking.attachModel(actorOf(res), siteId, stationId, res.locals.body.mapVersionId) });
  });

  router.put('/:stationId/tolerance', requireRole('admin'), validate({ params: stationParams, body: toleranceBody }), async (_req, res) => {
    const { siteId, stationId } = res.locals.params;
    res.json({ station: await services.docking.setTolerance(actorOf(res), siteId, stationId, res.locals.body) });
  });

  return router;
}
