import { createHash } from 'node:crypto';
import { PNG } from 'pngjs';
import { Not, type DataSource } from 'typeorm';
import { diffAreasM2, diffCounts, diffRows, emptyGridDiff, type GridDiff } from '../../shared/grid/diff.js';
import { distanceTransform, type DistanceField } from '../../shared/grid/distance-transform.js';
import { formatCount, GridFormatError } from '../../shared/grid/errors.js';
import { RESOLUTION_BOUNDS } from '../../shared/grid/map-kinds.js';
import { imageToGrid, type GreyImage } from '../../shared/grid/image-to-grid.js';
import { checkImageName, parseMapMetadata } from '../../shared/grid/map-metadata.js';
import { parsePgm, PGM_MAX_PIXELS, PGM_MAX_SIDE } from '../../shared/grid/pgm.js';
import { renderDiffTile } from '../../shared/render/diff-tiles.js';
import { renderGridImage } from '../../shared/render/grid-image.js';
import { TILE_STYLE } from '../../shared/render/palette.js';
import { renderTile, tileCount, tilePyramid } from '../../shared/render/tiles.js';
import { CellState, type MapMetadata, type OccupancyGrid } from '../../shared/types/grid.js';
import type { Actor } from '../auth/actor.js';
import { MapVersion } from '../entities/index.js';
import type { MapKind } from '../entities/map-version.entity.js';
import { badRequest, conflict, HttpError, notFound } from '../http-error.js';
import { AnswerCache } from './answer-cache.js';
import type { AuditService } from './audit.service.js';
import { decodeGrid, encodeGrid, encodePng } from './grid-codec.js';
import { newId } from './ids.js';
import type { SitesService } from './sites.service.js';

/** An uploaded file as the route hands it over. */
export interface UploadedFile {
  originalname: string;
  buffer: Buffer;
}

/** Metadata typed into the form for a PNG (or a PGM without YAML). */
export type FormMetadata = Omit<MapMetadata, 'image'>;


const PNG_MAGIC = Buffer.from([0x89, 0x50, 0x4e, 0x47]);
const GRID_CACHE_SIZE = 6;
/** Rendered tiles kept in memory (about 2 KB each: a few MB in all). */
const TILE_CACHE_SIZE = 2048;
// A map's diff tiles are fetched a screenful at a time, so each pair's difference is kept: 1 byte
// per base cell (about 1 MB for a 1240 × 840-cell demo map, 16 MB for 4000 × 4000), a few pairs.
const DIFF_CACHE_SIZE = 4;
/** Longest stretch of diff work between two yields to the event loop, in milliseconds. */
const DIFF_SLICE_MS = 50;

function readImage(file: UploadedFile): GreyImage {
  const bytes = file.buffer;
  if (bytes.subarray(0, 4).equals(PNG_MAGIC)) {
    // The header's size is checked before decoding: a small, highly compressed PNG could
    // otherwise unpack to gigabytes. Same limits as a PGM.
    if (bytes.length >= 24) {
      const width = bytes.readUInt32BE(16);
      const height = bytes.readUInt32BE(20);
      if (width > PGM_MAX_SIDE || height > PGM_MAX_SIDE || width * height > PGM_MAX_PIXELS) {
        throw new GridFormatError(`The PNG header says ${formatCount(width)} × ${formatCount(height)} pixels; Driftline accepts at most ${formatCount(PGM_MAX_SIDE)} pixels per side and ${formatCount(PGM_MAX_PIXELS)} in all.`);
      }
    }
    let png: PNG;
    try {
      png = PNG.sync.read(bytes);
    } catch (e) {
      throw new GridFormatError(`The PNG image could not be read (${e instanceof Error ? e.message : 'damaged file'}).`);
    }
    // Maps are grey; a coloured PNG is read by its luminance (ITU-R BT.601 weights).
    const pixels = new Uint8Array(png.width * png.height);
    for (let k = 0; k < pixels.length; k++) {
      const o = k * 4;
      pixels[k] = Math.round(0.299 * png.data[o] + 0.587 * png.data[o + 1] + 0.114 * png.data[o + 2]);
    }
    return { width: png.width, height: png.height, maxval: 255, pixels };
  }
  if (bytes[0] === 0x50 && (bytes[1] === 0x35 || bytes[1] === 0x32)) return parsePgm(bytes);
  throw new GridFormatError(`The image "${file.originalname}" is neither a PGM (P2/P5) nor a PNG file.`);
}

/** Map versions of a site: upload as draft, preview, activate. */
export class MapVersionsService {
  private readonly grids = new Map<string, OccupancyGrid>();
  private readonly fields = new Map<string, DistanceField>();
  // Rendered grid tiles (1–3 KB each as PNG): a map's first zoom levels for every user of the site.
  private readonly tiles = new AnswerCache<Buffer>(TILE_CACHE_SIZE);
  /** Differences by "baseId/otherId", least recently used first; a pending one is shared by the tiles that wait for it. */
  private readonly diffs = new Map<string, Promise<GridDiff>>();

  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly audit: AuditService,
  ) {}

  /** Parses and validates an uploaded map and stores it as a draft; nothing is stored when any part is bad. */
  async upload(actor: Actor, siteId: string, input: { kind: MapKind; label: string; image: UploadedFile; metadataFile?: UploadedFile; form?: FormMetadata }) {
    const site = await this.sites.getVisible(actor, siteId);
    let meta: MapMetadata;
    let grid: OccupancyGrid;
    try {
      if (input.metadataFile) {
        meta = parseMapMetadata(input.metadataFile.buffer.toString('utf8'));
        checkImageName(meta, input.image.originalname);
      } else if (input.form) {
        meta = { image: input.image.originalname, ...input.form };
      } else {
        throw new GridFormatError('Give the map metadata: a YAML file, or resolution and origin typed into the form.');
      }
      const [lo, hi] = RESOLUTION_BOUNDS[input.kind];
      if (meta.resolution < lo || meta.resolution > hi) {
        throw new GridFormatError(`A ${input.kind === 'floor' ? 'floor map' : 'station model'} needs a resolution between ${lo} and ${hi} m per cell; this one says ${meta.resolution}.`);
      }
      grid = imageToGrid(readImage(input.image), meta);
    } catch (e) {
      if (e instanceof GridFormatError) throw new HttpError(422, 'invalid_map', e.message);
      throw e;
    }
    let occupied = 0;
    let free = 0;
    for (let k = 0; k < grid.cells.length; k++) {
      if (grid.cells[k] === CellState.Occupied) occupied++;
      else if (grid.cells[k] === CellState.Free) free++;
    }
    if (occupied === 0) throw new HttpError(422, 'invalid_map', 'The map holds no occupied cell: check negate and the thresholds.');
    const blob = encodeGrid(grid);
    const id = newId();
    await this.db.transaction(async (m) => {
      const last = await m.getRepository(MapVersion).findOne({ where: { siteId: site.id, kind: input.kind }, order: { version: 'DESC' }, select: { id: true, version: true } });
      const version = (last?.version ?? 0) + 1;
      await m.insert(MapVersion, {
        id,
        siteId: site.id,
        version,
        kind: input.kind,
        label: input.label,
        resolution: meta.resolution,
        originX: meta.origin[0],
        originY: meta.origin[1],
        originYaw: meta.origin[2],
        width: grid.width,
        height: grid.height,
        grid: blob,
        occupiedCells: occupied,
        freeCells: free,
        unknownCells: grid.cells.length - occupied - free,
        interpretation: { negate: meta.negate, occupiedThresh: meta.occupiedThresh, freeThresh: meta.freeThresh, mode: meta.mode },
        sourceFileName: input.image.originalname,
        sourceChecksum: createHash('sha256').update(input.image.buffer).digest('hex'),
        status: 'draft',
        uploadedById: actor.id,
      });
      await this.audit.record(actor, { action: 'map.upload', targetType: 'map_version', targetId: id, organizationId: site.organizationId, summary: `${actor.name} uploaded ${input.kind} map version ${version} of ${site.name} (${grid.width} × ${grid.height} cells at ${meta.resolution} m).` }, m);
    });
    return this.get(actor, site.id, id);
  }

  /** Map versions of a visible site, newest first. */
  async list(actor: Actor, siteId: string, kind?: MapKind) {
    const site = await this.sites.getVisible(actor, siteId);
    const rows = await this.db.getRepository(MapVersion).find({ where: { siteId: site.id, ...(kind ? { kind } : {}) }, relations: { uploadedBy: true }, order: { kind: 'ASC', version: 'DESC' } });
    return rows.map(view);
  }

  /** One map version of a visible site. */
  async get(actor: Actor, siteId: string, id: string) {
    return view(await this.find(actor, siteId, id));
  }

  private async find(actor: Actor, siteId: string, id: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const row = await this.db.getRepository(MapVersion).findOne({ where: { id, siteId: site.id }, relations: { uploadedBy: true } });
    if (!row) throw notFound('The map version');
    return row;
  }

  /** The decoded grid of a map version (cached: a few recent versions stay in memory). */
  async grid(version: MapVersion): Promise<OccupancyGrid> {
    const cached = this.grids.get(version.id);
    if (cached) return cached;
    const { grid: blob } = await this.db.getRepository(MapVersion).findOneOrFail({ where: { id: version.id }, select: { id: true, grid: true } });
    const grid = decodeGrid(version, blob);
    if (this.grids.size >= GRID_CACHE_SIZE) this.grids.delete(this.grids.keys().next().value!);
    this.grids.set(version.id, grid);
    return grid;
  }

  /** Distance from each cell to the nearest mapped occupied cell, in cells (exact EDT; cached per version). */
  async distanceField(version: MapVersion): Promise<DistanceField> {
    const cached = this.fields.get(version.id);
    if (cached) return cached;
    const grid = await this.grid(version);
    const mask = new Uint8Array(grid.cells.length);
    for (let k = 0; k < mask.length; k++) mask[k] = grid.cells[k] === CellState.Occupied ? 1 : 0;
    const field = distanceTransform(mask, grid.width, grid.height);
    if (this.fields.size >= GRID_CACHE_SIZE) this.fields.delete(this.fields.keys().next().value!);
    this.fields.set(version.id, field);
    return field;
  }

  /** A PNG preview of a map version in the map palette, longer side at most `maxSide` pixels. */
  async preview(actor: Actor, siteId: string, id: string, maxSide: number): Promise<Buffer> {
    const version = await this.find(actor, siteId, id);
    return encodePng(renderGridImage(await this.grid(version), maxSide));
  }

  /**
   * One 256 × 256 tile of a map version's grid in the map palette (tiles.ts): its ETag, fixed per
   * version and tile because a version's grid never changes, and a renderer run only when the
   * client's copy is stale; the tile style (palette.ts) is part of it. Tiles outside the version's pyramid are refused with a 400.
   */
  async tile(actor: Actor, siteId: string, id: string, z: number, x: number, y: number): Promise<{ etag: string; render: () => Promise<Buffer> }> {
    // Visibility first: another organization's version answers 404 before any cache talk.
    const version = await this.find(actor, siteId, id);
    checkTile(version, z, x, y);
    const etag = `"${version.id}-s${TILE_STYLE}-${z}-${x}-${y}"`;
    // A version's grid never changes, so a rendered tile stays right: it is remembered under its ETag.
    return { etag, render: () => this.tiles.get(etag, '', async () => encodePng(renderTile(await this.grid(version), z, x, y))) };
  }

  /**
   * The cell-level difference of version `otherId` against the base `id`, counted on the base's
   * cells (shared/grid/diff.ts): cells and m² (base resolution²) of structure added and removed,
   * unknown → known (revealed) and known → unknown (hidden). Both must be floor versions of the site.
   */
  async diff(actor: Actor, siteId: string, id: string, otherId: string) {
    const { base, other } = await this.pair(actor, siteId, id, otherId);
    const cells = diffCounts(await this.cachedDiff(base, other));
    return {
      base: { id: base.id, version: base.version },
      other: { id: other.id, version: other.version },
      cells,
      areasM2: diffAreasM2(cells, base.resolution),
      resolution: base.resolution,
      comparedOn: 'base' as const,
    };
  }

  /**
   * One 256 × 256 overlay tile of the difference of `otherId` against `id`, in the base's tile
   * pyramid (transparent where nothing changed): its ETag, fixed per pair, style and tile because
   * both grids never change, and a renderer run only when the client's copy is stale.
   */
  async diffTile(actor: Actor, siteId: string, id: string, otherId: string, z: number, x: number, y: number): Promise<{ etag: string; render: () => Promise<Buffer> }> {
    const { base, other } = await this.pair(actor, siteId, id, otherId);
    checkTile(base, z, x, y);
    return {
      etag: `"diff-${base.id}-${other.id}-s${TILE_STYLE}-${z}-${x}-${y}"`,
      render: async () => encodePng(renderDiffTile(base, await this.cachedDiff(base, other), z, x, y)),
    };
  }

  /** The two floor versions of one visible site that a difference compares; 404 for either unknown, 400 for the same one twice or a station model. */
  private async pair(actor: Actor, siteId: string, id: string, otherId: string) {
    // Visibility first: another organization's base answers 404 before anything else is said about it.
    const base = await this.find(actor, siteId, id);
    if (otherId === id) throw badRequest(`Compare version ${base.version} with another version of the site, not with itself.`);
    const other = await this.find(actor, siteId, otherId);
    for (const v of [base, other]) {
      if (v.kind !== 'floor') throw badRequest(`Station model version ${v.version} is not a floor map; differences are shown between floor maps only.`);
    }
    return { base, other };
  }

  /** The difference of `other` against `base`, computed once per pair and kept in a small LRU. */
  private cachedDiff(base: MapVersion, other: MapVersion): Promise<GridDiff> {
    const key = `${base.id}/${other.id}`;
    const cached = this.diffs.get(key);
    if (cached) {
      // Re-inserted: a Map iterates in insertion order, so the first key is the least recently used.
      this.diffs.delete(key);
      this.diffs.set(key, cached);
      return cached;
    }
    const pending = this.computeDiff(base, other);
    if (this.diffs.size >= DIFF_CACHE_SIZE) this.diffs.delete(this.diffs.keys().next().value!);
    this.diffs.set(key, pending);
    // A failed computation is not kept, so the next request tries again.
    pending.catch(() => {
      if (this.diffs.get(key) === pending) this.diffs.delete(key);
    });
    return pending;
  }

  private async computeDiff(base: MapVersion, other: MapVersion): Promise<GridDiff> {
    const a = await this.grid(base);
    const b = await this.grid(other);
    const diff = emptyGridDiff(a);
    // Bands of rows with a yield between slices, so a large map never holds the event loop for long.
    const band = Math.max(1, Math.floor(262_144 / a.width));
    let sliceStart = performance.now();
    for (let j = 0; j < a.height; j += band) {
      diffRows(a, b, diff, j, j + band);
      if (performance.now() - sliceStart > DIFF_SLICE_MS) {
        await new Promise((resolve) => setImmediate(resolve));
        sliceStart = performance.now();
      }
    }
    return diff;
  }

  /** The site's active floor map version, or null. */
  async activeFloor(siteId: string): Promise<MapVersion | null> {
    return this.db.getRepository(MapVersion).findOneBy({ siteId, kind: 'floor', status: 'active' });
  }

  /** Makes a floor version the site's active one; the previous active one is archived. Evidence counts against it from now on. */
  async activate(actor: Actor, siteId: string, id: string) {
    const version = await this.find(actor, siteId, id);
    if (version.kind !== 'floor') throw badRequest('Only floor maps are activated; station models are used as uploaded.');
    if (version.status === 'active') throw conflict(`Version ${version.version} is already the active map.`);
    const site = await this.sites.getVisible(actor, siteId);
    await this.db.transaction(async (m) => {
      const previous = await m.getRepository(MapVersion).findOne({ where: { siteId: site.id, kind: 'floor', status: 'active' }, select: { id: true, version: true } });
      await m.update(MapVersion, { siteId: site.id, kind: 'floor', status: 'active', id: Not(version.id) }, { status: 'archived' });
      await m.update(MapVersion, version.id, { status: 'active', activatedAt: new Date(), activatedById: actor.id });
      // An archived version made active again is a roll back; the audit says so and from which version.
      const how = version.status === 'archived' ? ' again (roll back' + (previous ? ` from version ${previous.version})` : ')') : previous ? ` in place of version ${previous.version}` : '';
      await this.audit.record(actor, { action: 'map.activate', targetType: 'map_version', targetId: version.id, organizationId: site.organizationId, summary: `${actor.name} activated floor map version ${version.version} of ${site.name}${how}.` }, m);
    });
    return this.get(actor, siteId, id);
  }
}

/** Refuses (400) a tile outside a version's pyramid: past its deepest zoom, or past its columns and rows at that zoom. */
function checkTile(version: MapVersion, z: number, x: number, y: number): void {
  const { maxZoom } = tilePyramid(version);
  if (z > maxZoom) throw badRequest(`Zoom ${z} is past this map version's deepest zoom ${maxZoom} (4 pixels per cell).`);
  const { columns, rows } = tileCount(version, z);
  if (x >= columns || y >= rows) throw badRequest(`Tile (${x}, ${y}) lies outside this map version at zoom ${z}: columns run 0 to ${columns - 1}, rows 0 to ${rows - 1}.`);
}

function view(v: MapVersion) {
  return {
    id: v.id,
    siteId: v.siteId,
    version: v.version,
    kind: v.kind,
    label: v.label,
    status: v.status,
    resolution: v.resolution,
    origin: { x: v.originX, y: v.originY, yaw: v.originYaw },
    width: v.width,
    height: v.height,
    widthM: +(v.width * v.resolution).toFixed(3),
    heightM: +(v.height * v.resolution).toFixed(3),
    cells: { occupied: v.occupiedCells, free: v.freeCells, unknown: v.unknownCells },
    interpretation: v.interpretation,
    sourceFileName: v.sourceFileName,
    sourceChecksum: v.sourceChecksum,
    uploadedBy: v.uploadedBy ? { id: v.uploadedBy.id, name: v.uploadedBy.name } : null,
    uploadedAt: v.uploadedAt.toISOString(),
    activatedAt: v.activatedAt?.toISOString() ?? null,
  };
}
