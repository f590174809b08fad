import type { GridGeometry, OccupancyGrid } from '../types/grid.js';
import { blockState, writeStatePixel, type RgbaImage } from './grid-image.js';

/**
 * Tile pyramid of a map version.
 *
 * Scale: at zoom 0 one pixel is 2^k cells, with k the smallest whole number ≥ 0 that fits the
 * map's longer side into two tiles (512 px), so the whole site shows in at most 2 × 2 tiles.
 * Each zoom step doubles the scale: at zoom z one cell is 2^(z − k) pixels. The deepest zoom is
 * k + 2, where one cell is 4 pixels.
 *
 * Placement: pixel (0, 0) of the pyramid is the top-left corner of the grid as stored (the
 * corner of cell (0, height − 1)); pixel x grows to the right along the grid's rows and pixel y
 * grows downwards, so tile rows count from the map's TOP as Leaflet's tile rows do. Tiles are
 * in the grid frame; the map's yaw is handled by the CRS (crs.ts).
 */

/** Side of a tile in pixels. */
export const TILE_SIZE = 256;
/** Longest side in pixels that the whole map may take at zoom 0 (two tiles). */
const ZOOM0_MAX_SIDE = 2 * TILE_SIZE;
/** Zoom steps past one pixel per cell: 2 steps give 4 pixels per cell at the deepest zoom. */
const ZOOM_PAST_CELL = 2;

/** Scale constants of a map's tile pyramid: k (log2 of cells per pixel at zoom 0) and the zoom range. */
export interface TilePyramid {
  /** log2 of the cells per pixel at zoom 0. */
  zoom0Shift: number;
  minZoom: number;
  maxZoom: number;
}

/** Half-open range of cells a tile covers: columns iMin ≤ i < iMax, rows jMin ≤ j < jMax (from the bottom); may reach outside the grid. */
export interface TileCells {
  iMin: number;
  iMax: number;
  jMin: number;
  jMax: number;
}

/** Returns the scale constants of a map's tile pyramid (zoom-0 shift k and zoom range, both whole numbers). */
export function tilePyramid(geom: Pick<GridGeometry, 'width' | 'height'>): TilePyramid {
  const longer = Math.max(geom.width, geom.height);
  let k = 0;
  // Doubling until it fits avoids floating-point log2 at exact powers of two.
  while (longer > ZOOM0_MAX_SIDE * 2 ** k) k++;
  return { zoom0Shift: k, minZoom: 0, maxZoom: k + ZOOM_PAST_CELL };
}

/** Returns the pixels per cell at zoom z (a power of two; below 1 when one pixel covers several cells). */
export function pixelsPerCell(geom: Pick<GridGeometry, 'width' | 'height'>, z: number): number {
  return 2 ** (z - tilePyramid(geom).zoom0Shift);
}

/** Returns how many tile columns and rows cover the map at zoom z. */
export function tileCount(geom: Pick<GridGeometry, 'width' | 'height'>, z: number): { columns: number; rows: number } {
  const scale = pixelsPerCell(geom, z);
  return { columns: Math.ceil((geom.width * scale) / TILE_SIZE), rows: Math.ceil((geom.height * scale) / TILE_SIZE) };
}

/** Returns the cells (half-open column and row ranges) that tile (x, y) at zoom z covers; rows count from the map's top. */
export function tileBounds(geom: Pick<GridGeometry, 'width' | 'height'>, z: number, x: number, y: number): TileCells {
  // Whole cells per tile: 256 · 2^(k − z), at least 64 because z ≤ k + 2.
  const cells = TILE_SIZE / pixelsPerCell(geom, z);
  return { iMin: x * cells, iMax: (x + 1) * cells, jMin: geom.height - (y + 1) * cells, jMax: geom.height - y * cells };
}

/**
 * Returns tile (x, y) at zoom z as a 256 × 256 RGBA image in the map palette: transparent where
 * it lies outside the grid; when one pixel covers several cells, structure wins over free space
 * and free space over unknown.
 */
export function renderTile(grid: OccupancyGrid, z: number, x: number, y: number): RgbaImage {
  const data = new Uint8Array(TILE_SIZE * TILE_SIZE * 4);
  const bounds = tileBounds(grid, z, x, y);
  const scale = pixelsPerCell(grid, z);
  // Cells per pixel side when scaled down (a block), else 1 cell shown by `scale` pixels.
  const block = Math.max(1, 1 / scale);
  const pxPerCell = Math.max(1, scale);
  for (let py = 0; py < TILE_SIZE; py++) {
    const jTop = bounds.jMax - 1 - Math.floor(py / pxPerCell) * block;
    for (let px = 0; px < TILE_SIZE; px++) {
      const i0 = bounds.iMin + Math.floor(px / pxPerCell) * block;
      writeStatePixel(data, (py * TILE_SIZE + px) * 4, blockState(grid, i0, jTop, block, block));
    }
  }
  return { width: TILE_SIZE, height: TILE_SIZE, data };
}
