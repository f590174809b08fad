import { CellState, type MapMetadata, type OccupancyGrid } from '../types/grid.js';
import { GridFormatError, formatCount } from './errors.js';
import type { PgmImage } from './pgm.js';

/** A greyscale raster, row-major from the top row, values 0..maxval (a PgmImage or a decoded PNG). */
export interface GreyImage {
  width: number;
  height: number;
  maxval: number;
  pixels: ArrayLike<number>;
}

/** Grey value written for occupied cells (common practice for map images, from memory). */
export const GREY_OCCUPIED = 0;
/** Grey value written for free cells (common practice for map images, from memory). */
export const GREY_FREE = 254;
/** Grey value written for unknown cells (common practice, from memory: p = 50/255 ≈ 0.196 sits between the default thresholds). */
export const GREY_UNKNOWN = 205;

/** Probability byte stored for raw-mode pixels above 100 (no information: p ≈ 0.5). A product choice. */
const RAW_UNKNOWN_PROBABILITY = 128;

/**
 * Builds a per-grey-value lookup (state and probability byte) so the pixel loop is two array
 * reads; maxval ≤ 65,535 bounds it at 192 KB, far below the grid itself.
 */
function buildLookup(maxval: number, meta: MapMetadata): { state: Uint8Array; prob: Uint8Array } {
  const state = new Uint8Array(maxval + 1);
  const prob = new Uint8Array(maxval + 1);
  for (let v = 0; v <= maxval; v++) {
    let p: number;
    if (meta.mode === 'raw') {
      // Raw mode: the grey value is the occupancy in percent, negate does not apply; above 100
      // means "no information" (our reading of the convention, a product choice).
      if (v > 100) {
        state[v] = CellState.Unknown;
        prob[v] = RAW_UNKNOWN_PROBABILITY;
        continue;
      }
      p = v / 100;
    } else {
      // Dark is occupied: p = (maxval − v) / maxval, or v / maxval with negate (DESIGN §4.1).
      p = meta.negate === 1 ? v / maxval : (maxval - v) / maxval;
    }
    // Trinary and scale classify alike; scale differs only in keeping p, which we store always.
    state[v] = p > meta.occupiedThresh ? CellState.Occupied : p < meta.freeThresh ? CellState.Free : CellState.Unknown;
    prob[v] = Math.round(p * 255);
  }
  return { state, prob };
}

/**
 * Converts a map image into an occupancy grid (cell (i, j) at index j·width + i, j counted from
 * the bottom edge; resolution in m/cell and origin in metres/radians from the metadata).
 * Memory: 2 bytes per cell.
 */
export function imageToGrid(img: PgmImage | GreyImage, meta: MapMetadata): OccupancyGrid {
  const { width, height, maxval, pixels } = img;
  if (pixels.length !== width * height) {
    throw new GridFormatError(
      `The image is ${formatCount(width)} × ${formatCount(height)} pixels but holds ${formatCount(pixels.length)} pixel values.`,
    );
  }
  if (!Number.isInteger(maxval) || maxval < 1 || maxval > 65_535) {
    throw new GridFormatError(`The image's maximum grey value ${maxval} must be a whole number between 1 and 65,535.`);
  }
  const lut = buildLookup(maxval, meta);
  const cells = new Uint8Array(width * height);
  const probability = new Uint8Array(width * height);
  for (let j = 0; j < height; j++) {
    // Image row 0 is the map's top edge, our row 0 its bottom edge.
    const src = (height - 1 - j) * width;
    const dst = j * width;
    for (let i = 0; i < width; i++) {
      const v = pixels[src + i];
      if (v > maxval) {
        throw new GridFormatError(
          `Pixel (column ${formatCount(i)}, row ${formatCount(height - 1 - j)}) has grey value ${formatCount(v)}, above the image's maximum of ${formatCount(maxval)}.`,
        );
      }
      cells[dst + i] = lut.state[v];
      probability[dst + i] = lut.prob[v];
    }
  }
  return {
    width,
    height,
    resolution: meta.resolution,
    origin: { x: meta.origin[0], y: meta.origin[1], yaw: meta.origin[2] },
    cells,
    probability,
  };
}

/**
 * Renders a grid's cell states as an 8-bit map image (maxval 255, top row first): occupied 0,
 * free 254, unknown 205, which reads back to the same states with the default thresholds.
 */
export function gridToImage(grid: OccupancyGrid): PgmImage {
  const { width, height, cells } = grid;
  const pixels = new Uint16Array(width * height);
  for (let j = 0; j < height; j++) {
    const src = j * width;
    const dst = (height - 1 - j) * width;
    for (let i = 0; i < width; i++) {
      const s = cells[src + i];
      pixels[dst + i] = s === CellState.Occupied ? GREY_OCCUPIED : s === CellState.Free ? GREY_FREE : GREY_UNKNOWN;
    }
  }
  return { width, height, maxval: 255, pixels };
}
