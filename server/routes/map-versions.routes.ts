import { Router } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { MAP_IMAGE_MAX_BYTES } from '../../shared/grid/map-kinds.js';
import { badRequest } from '../http-error.js';
import { actorOf, authenticate, requireRole } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { id } from './schemas.js';


const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAP_IMAGE_MAX_BYTES, files: 2, fields: 20 } }).fields([
  { name: 'image', maxCount: 1 },
  { name: 'metadata', maxCount: 1 },
]);

const num = (label: string) => z.coerce.number({ message: `${label} must be a number` }).finite();
const uploadFields = z.strictObject({
  kind: z.enum(['floor', 'station']).default('floor'),
  label: z.string().trim().max(200).default(''),
  resolution: num('resolution').positive('resolution must be greater than 0').optional(),
  originX: num('originX').optional(),
  originY: num('originY').optional(),
  originYaw: num('originYaw').min(-Math.PI).max(Math.PI).optional(),
  negate: z.enum(['0', '1']).transform(Number).optional(),
  occupiedThresh: num('occupiedThresh').min(0).max(1).optional(),
  freeThresh: num('freeThresh').min(0).max(1).optional(),
  mode: z.enum(['trinary', 'scale', 'raw']).optional(),
});
const siteParams = z.object({ siteId: id });
const versionParams = z.object({ siteId: id, versionId: id });
const tileIndex = z.string().regex(/^\d{1,6}$/, 'must be a whole number from 0').transform(Number);
const tileParams = versionParams.extend({ z: tileIndex, x: tileIndex, y: tileIndex });
// The style only makes the URL change with the look (shared/render/palette.ts); any style gets today's tiles.
const tileStyle = z.coerce.number().int('must be a whole number').min(1).optional();
const tileQuery = z.strictObject({ style: tileStyle });
// The version compared with the one in the path; without it there is nothing to compare.
const against = z.uuid({ error: (issue) => (issue.input === undefined ? 'name the version to compare with as ?against=<version id>' : 'must be a valid id') });
const diffQuery = z.strictObject({ against });
const diffTileQuery = z.strictObject({ against, style: tileStyle });

/** /api/sites/:siteId/map-versions: upload (mappers), list, preview, grid tiles, differences and their tiles, activate. */
export function mapVersionsRoutes(services: Services) {
  const router = Router({ mergeParams: true });
  router.use(authenticate);

  router.get('/', validate({ params: siteParams, query: z.strictObject({ kind: z.enum(['floor', 'station']).optional() }) }), async (_req, res) => {
    res.json({ mapVersions: await services.mapVersions.list(actorOf(res), res.locals.params.siteId, res.locals.query.kind) });
  });

  router.post('/', requireRole('admin', 'mapper'), validate({ params: siteParams }), upload, async (req, res) => {
    const files = (req.files ?? {}) as Record<string, Express.Multer.File[] | undefined>;
    const image = files.image?.[0];
    if (!image) throw badRequest('Attach the map image as the "image" file (PGM or PNG).');
    const parsed = uploadFields.safeParse(req.body ?? {});
    if (!parsed.success) throw badRequest(`The upload form is not valid: ${parsed.error.issues[0].message}.`);
    const f = parsed.data;
    const metadataFile = files.metadata?.[0];
    const form =
      !metadataFile && f.resolution !== undefined
        ? {
            resolution: f.resolution,
            origin: [f.originX ?? 0, f.originY ?? 0, f.originYaw ?? 0] as [number, number, number],
            negate: (f.negate ?? 0) as 0 | 1,
            occupiedThresh: f.occupiedThresh ?? 0.65,
            freeThresh: f.freeThresh ?? 0.196,
            mode: f.mode ?? 'trinary',
          }
        : undefined;
    if (form && form.freeThresh >= form.occupiedThresh) throw badRequest('The upload form is not valid: freeThresh must be smaller than occupiedThresh.');
    const version = await services.mapVersions.upload(actorOf(res), res.locals.params.siteId, { kind: f.kind, label: f.label, image, metadataFile, form });
    res.status(201).json({ mapVersion: version });
  });

  router.get('/:versionId', validate({ params: versionParams }), async (_req, res) => {
    const { siteId, versionId } = res.locals.params;
    res.json({ mapVersion: await services.mapVersions.get(actorOf(res), siteId, versionId) });
  });

  router.get('/:versionId/preview.png', validate({ params: versionParams, query: z.strictObject({ size: z.coerce.number().int().min(64).max(2048).default(1024) }) }), async (_req, res) => {
    const { siteId, versionId } = res.locals.params;
    const png = await services.mapVersions.preview(actorOf(res), siteId, versionId, res.locals.query.size);
    // A version's grid never changes, so its preview may be cached privately for long.
    res.setHeader('Cache-Control', 'private, max-age=86400, immutable');
    res.type('png').send(png);
  });

  router.get('/:versionId/tiles/:z/:x/:y.png', validate({ params: tileParams, query: tileQuery }), async (req, res) => {
    const { siteId, versionId, z: zoom, x, y } = res.locals.params;
    const tile = await services.mapVersions.tile(actorOf(res), siteId, versionId, zoom, x, y);
    // A version's tile never changes: one ETag per version, style and tile, cached for a year
    // (the URL's ?style= changes with the style, so a new look is fetched anew).
    res.setHeader('ETag', tile.etag);
    res.setHeader('Cache-Control', 'private, max-age=31536000, immutable');
    if (req.fresh) {
      res.status(304).end();
      return;
    }
    res.type('png').send(await tile.render());
  });

  router.get('/:versionId/diff', validate({ params: versionParams, query: diffQuery }), async (_req, res) => {
    const { siteId, versionId } = res.locals.params;
    res.json({ diff: await services.mapVersions.diff(actorOf(res), siteId, versionId, res.locals.query.against) });
  });

  router.get('/:versionId/diff-tiles/:z/:x/:y.png', validate({ params: tileParams, query: diffTileQuery }), async (req, res) => {
    const { siteId, versionId, z: zoom, x, y } = res.locals.params;
    const tile = await services.mapVersions.diffTile(actorOf(res), siteId, versionId, res.locals.query.against, zoom, x, y);
    // Two versions' grids never change, so neither does their difference: cached like grid tiles.
    res.setHeader('ETag', tile.etag);
    res.setHeader('Cache-Control', 'private, max-age=31536000, immutable');
    if (req.fresh) {
      res.status(304).end();
      return;
    }
    res.type('png').send(await tile.render());
  });

  router.post('/:versionId/activate', requireRole('admin', 'mapper'), validate({ params: versionParams, body: z.strictObject({}).optional() }), async (_req, res) => {
    const { siteId, versionId } = res.locals.params;
    res.json({ mapVersion: await services.mapVersions.activate(actorOf(res), siteId, versionId) });
  });

  return router;
}
