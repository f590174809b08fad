import { deflateSync, inflateSync } from 'node:zlib';
import { PNG } from 'pngjs';
import type { OccupancyGrid } from '../../shared/types/grid.js';
import type { RgbaImage } from '../../shared/render/grid-image.js';
import type { MapVersion } from '../entities/index.js';

/** Deflates a grid's states and probabilities into one blob (grids compress 20–100×: long runs). */
export function encodeGrid(grid: OccupancyGrid): Buffer {
  const raw = Buffer.alloc(grid.cells.length * 2);
  raw.set(grid.cells, 0);
  raw.set(grid.probability, grid.cells.length);
  return deflateSync(raw, { level: 6 });
}

/** Rebuilds the grid of a stored map version from its blob. */
export function decodeGrid(version: Pick<MapVersion, 'width' | 'height' | 'resolution' | 'originX' | 'originY' | 'originYaw'>, blob: Buffer): OccupancyGrid {
  const raw = inflateSync(blob);
  const n = version.width * version.height;
  if (raw.length !== n * 2) throw new Error(`Stored grid holds ${raw.length} bytes, expected ${n * 2}.`);
  return {
    width: version.width,
    height: version.height,
    resolution: version.resolution,
    origin: { x: version.originX, y: version.originY, yaw: version.originYaw },
    cells: new Uint8Array(raw.buffer, raw.byteOffset, n),
    probability: new Uint8Array(raw.buffer, raw.byteOffset + n, n),
  };
}

/** Encodes an RGBA image as PNG bytes. */
export function encodePng(img: RgbaImage): Buffer {
  const png = new PNG({ width: img.width, height: img.height });
  png.data = Buffer.from(img.data.buffer, img.data.byteOffset, img.data.byteLength);
  return PNG.sync.write(png);
}
