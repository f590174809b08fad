import { Router } from 'express';
import { z } from 'zod';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id, timezone } from './schemas.js';

const whole = (min: number, max: number) => z.number().int('must be a whole number').min(min, `must be at least ${min}`).max(max, `must be at most ${max}`);
const between = (min: number, max: number) => z.number().finite().min(min, `must be at least ${min}`).max(max, `must be at most ${max}`);

// The limits keep each setting where the computation stays meaningful (product choices, DESIGN.md §4).
const changeBody = z
  .strictObject({
    timezone: timezone.optional(),
    detectionHour: whole(0, 23).optional(),
    detectionWindowDays: whole(3, 60).optional(),
    healthGoodMin: between(50, 100).optional(),
    healthWatchMin: between(50, 100).optional(),
    agreementToleranceM: between(0.02, 0.5).optional(),
    countNoReturnAsPass: z.boolean().optional(),
    clearZoneAfterRuns: whole(1, 30).optional(),
    retentionDays: whole(14, 730).optional(),
    scannerFlagZ: between(2, 10).optional(),
    scannerMinReturnsPerDay: whole(100, 1_000_000).optional(),
    remapDriveSpeedMps: between(0.1, 3).optional(),
    remapSweepWidthM: between(1, 40).optional(),
    remapSetupMinutes: whole(0, 480).optional(),
    remapMarginM: between(0, 10).optional(),
    dockingToleranceMm: between(1, 100).optional(),
    dockingToleranceDeg: between(0.1, 10).optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'name at least one setting to change');

/** /api/sites/:siteId/settings: every role reads a site's settings; admins change them. */
export function siteSettingsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate);
  const params = z.object({ siteId: id });

  router.get('/', validate({ params }), async (_req, res) => {
    res.json({ settings: await services.siteSettings.view(actorOf(res), res.locals.params.siteId) });
  });

  router.patch('/', requireRole('admin'), validate({ params, body: changeBody }), async (_req, res) => {
    res.json({ settings: await services.siteSettings.update(actorOf(res), res.locals.params.siteId, res.locals.body) });
  });

  return router;
}
