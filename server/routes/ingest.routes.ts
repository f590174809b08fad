import express, { Router } from 'express';
import { z } from 'zod';
import { robotOf, robotToken } from '../middleware/robot-token.js';
import { validate } from '../middleware/validate.js';
import { DOCKING_BATCH_MAX_BYTES } from '../services/docking.service.js';
import { ROBOT_BATCH_MAX_BYTES } from '../services/ingest.service.js';
import type { Services } from '../services/index.js';

const headers = z.object({ 'idempotency-key': z.string().regex(/^[\x21-\x7e]{1,128}$/, 'must be 1–128 visible ASCII characters').optional() });

/** /api/ingest: robots post JSON Lines scan batches and docking results with their bearer token. */
export function ingestRoutes(services: Services) {
  const router = Router();
  // Any content type: robots send JSON Lines as text or gzip; Content-Encoding: gzip is unpacked
  // by the parser and its limit applies to the unpacked size.
  const body = express.raw({ type: () => true, limit: ROBOT_BATCH_MAX_BYTES, inflate: true });

  router.post('/scans', robotToken(services.robots), body, validate({ headers }), async (req, res) => {
    const raw = Buffer.isBuffer(req.body) ? req.body : Buffer.alloc(0);
    const key = res.locals.headers['idempotency-key'] ?? null;
    const result = await services.ingest.ingestRobotBatch(robotOf(res), raw, key);
    res.status(result.status === 'counted' ? 201 : 200).json(result);
  });

  // Docking results (station, final dx, dy, dyaw): the same token, key and replay rules as scans.
  const dockingBody = express.raw({ type: () => true, limit: DOCKING_BATCH_MAX_BYTES, inflate: true });
  router.post('/docking', robotToken(services.robots), dockingBody, validate({ headers }), async (req, res) => {
    const raw = Buffer.isBuffer(req.body) ? req.body : Buffer.alloc(0);
    const result = await services.docking.ingestRobotBatch(robotOf(res), raw, res.locals.headers['idempotency-key'] ?? null);
    res.status(result.status === 'counted' ? 201 : 200).json(result);
  });

  return router;
}
