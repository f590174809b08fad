import { formatMapMetadata } from '../../../shared/grid/map-metadata.js';
import { encodePgm } from '../../../shared/grid/pgm.js';

// A hand-made test room, not the demo: 40 × 40 cells at 0.05 m (2 m × 2 m), origin (0, 0),
// walls on the outer ring of cells, everything inside free.
export const ROOM = { width: 40, height: 40, resolution: 0.05 };

/** The room as a P5 PGM (occupied 0, free 254) and its YAML naming it. */
export function roomMap(imageName = 'room.pgm') {
  const { width, height } = ROOM;
  const pixels = new Uint16Array(width * height).fill(254);
  for (let r = 0; r < height; r++) {
    for (let c = 0; c < width; c++) if (r === 0 || c === 0 || r === height - 1 || c === width - 1) pixels[r * width + c] = 0;
  }
  const pgm = Buffer.from(encodePgm({ width, height, maxval: 255, pixels }));
  const yaml = formatMapMetadata({ image: imageName, resolution: ROOM.resolution, origin: [0, 0, 0], negate: 0, occupiedThresh: 0.65, freeThresh: 0.196, mode: 'trinary' });
  return { pgm, yaml: Buffer.from(yaml) };
}

/** One scan line: a single-beam scan from `pose` (scanner "front", identity unless mounted) with the given ranges. */
export function scanLine(opts: { t?: string; robot?: string; scanner?: string; pose?: [number, number, number]; ranges?: Array<number | null>; angleMin?: number; angleIncrement?: number }) {
  return JSON.stringify({
    t: opts.t ?? '2026-11-03T08:15:02.120Z',
    robot: opts.robot ?? 'AMR-01',
    scanner: opts.scanner ?? 'front',
    pose: opts.pose ?? [0.525, 1.025, 0],
    angleMin: opts.angleMin ?? 0,
    angleIncrement: opts.angleIncrement ?? 0.01,
    rangeMin: 0.05,
    rangeMax: 30,
    ranges: opts.ranges ?? [1.0],
  });
}

/** Stores an open zone of the test room directly (as a detection run would), returning its id. */
export async function insertZone(db: import('typeorm').DataSource, siteId: string, mapVersionId: string, number: number) {
  const { Zone } = await import('../../../server/entities/index.js');
  const { deflateRawSync } = await import('node:zlib');
  const id = (await import('node:crypto')).randomUUID();
  await db.getRepository(Zone).insert({
    id, siteId, mapVersionId, number, kind: 'new', status: 'open', persistence: 'persistent',
    outline: [[0.5, 0.5], [1, 0.5], [1, 1], [0.5, 1]], bbox: [0.5, 0.5, 1, 1], centroid: [0.75, 0.75], cellCount: 100, areaM2: 0.25,
    meanHitRate: 0.9, hitRateLow: 0.85, hitRateHigh: 0.94, observations: 400, daysObserved: 5, daysFlagged: 5, trafficPerM2PerDay: 12, severity: 0.5,
    timeline: [], cells: deflateRawSync(Buffer.from(new Int32Array([10 * 40 + 10]).buffer)), firstSeenDay: '2026-11-01', lastSeenDay: '2026-11-05', missedRuns: 0, statusNote: null, statusChangedAt: null,
  });
  return id;
}
