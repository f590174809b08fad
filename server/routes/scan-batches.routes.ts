import { mkdirSync } from 'node:fs';
import { Router } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { Config } from '../config.js';
import { badRequest } from '../http-error.js';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import { UPLOAD_MAX_BYTES } from '../services/ingest.service.js';
import type { Services } from '../services/index.js';
import { uploadsDir } from '../services/upload-scratch.js';
import { id } from './schemas.js';

const siteParams = z.object({ siteId: id });

/** /api/sites/:siteId/scan-batches: received batches, and uploads of recorded scan logs (streamed to disk). */
export function scanBatchesRoutes(services: Services, config: Config) {
  const router = Router({ mergeParams: true });
  const dir = uploadsDir(config.dataDir);
  // The log goes to disk as it arrives and is read back line by line: never whole in memory.
  const upload = multer({
    storage: multer.diskStorage({
      destination: (_req, _file, cb) => {
        mkdirSync(dir, { recursive: true });
        cb(null, dir);
      },
    }),
    limits: { fileSize: UPLOAD_MAX_BYTES, files: 1, fields: 5 },
  }).single('log');
  router.use(authenticate);

  router.get('/', validate({ params: siteParams, query: z.strictObject({ limit: z.coerce.number().int().min(1).max(200).default(50) }) }), async (_req, res) => {
    res.json({ batches: await services.ingest.listBatches(actorOf(res), res.locals.params.siteId, res.locals.query.limit) });
  });

  router.post('/', requireRole('admin', 'mapper'), validate({ params: siteParams }), upload, async (req, res) => {
    if (!req.file) throw badRequest('Attach the scan log as the "log" file (.jsonl or .jsonl.gz).');
    const batch = await services.ingest.startUpload(actorOf(res), res.locals.params.siteId, req.file);
    res.status(202).json({ batch });
  });

  router.get('/:batchId', validate({ params: z.object({ siteId: id, batchId: id }) }), async (_req, res) => {
    const { siteId, batchId } = res.locals.params;
    res.json({ batch: await services.ingest.getBatch(actorOf(res), siteId, batchId) });
  });

  return router;
}
