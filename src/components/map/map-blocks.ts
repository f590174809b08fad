// Where the agreement blocks of a map lie on its tile pyramid. Blocks are in the grid frame, like the
// tiles (shared/render/tiles.ts), so a block is an axis-aligned pixel rectangle at every zoom even
// when the map has a yaw: drawing them on canvas tiles is exact, with no resampling.
import { TILE_SIZE, pixelsPerCell } from '../../../shared/render/tiles.js';
import type { GridGeometry } from '../../../shared/types/grid.js';

/** How a map is cut into blocks: side in cells and the block columns and rows (row 0 at the grid's bottom). */
export interface BlockGrid {
  blockCells: number;
  cols: number;
  rows: number;
}

/** A rectangle in the pyramid's pixels at one zoom: x right, y down from the map's top-left corner. */
export interface PixelRect {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** Half-open block ranges: columns biMin ≤ bi < biMax, rows bjMin ≤ bj < bjMax (rows from the bottom). */
export interface BlockRange {
  biMin: number;
  biMax: number;
  bjMin: number;
  bjMax: number;
}

type Size = Pick<GridGeometry, 'width' | 'height'>;

/**
 * Returns the pixel rectangle at zoom z of block (bi, bj), bj counted from the grid's bottom: cells
 * bi·blockCells … (bi + 1)·blockCells across and likewise up, clipped to the grid (the last column
 * and row of blocks may be cut short), with y from the top = (height − j) × pixels per cell.
 */
export function blockPixelRect(geom: Size, blocks: BlockGrid, bi: number, bj: number, z: number): PixelRect {
  const scale = pixelsPerCell(geom, z);
  const i0 = bi * blocks.blockCells;
  const i1 = Math.min(geom.width, (bi + 1) * blocks.blockCells);
  const j0 = bj * blocks.blockCells;
  const j1 = Math.min(geom.height, (bj + 1) * blocks.blockCells);
  return { x: i0 * scale, y: (geom.height - j1) * scale, width: (i1 - i0) * scale, height: (j1 - j0) * scale };
}

/** Returns the blocks that tile (x, y) at zoom z overlaps (possibly none), tile rows counted from the top as Leaflet does. */
export function blocksInTile(geom: Size, blocks: BlockGrid, z: number, x: number, y: number): BlockRange {
  const scale = pixelsPerCell(geom, z);
  const blockPx = blocks.blockCells * scale;
  // The tile's cell rows from the bottom: the grid's top row is height − 1, the tile's top edge is y·256 px down.
  const jTop = geom.height - (y * TILE_SIZE) / scale;
  const jBottom = geom.height - ((y + 1) * TILE_SIZE) / scale;
  const clamp = (v: number, max: number) => Math.max(0, Math.min(max, v));
  return {
    biMin: clamp(Math.floor((x * TILE_SIZE) / blockPx), blocks.cols),
    biMax: clamp(Math.ceil(((x + 1) * TILE_SIZE) / blockPx), blocks.cols),
    bjMin: clamp(Math.floor(jBottom / blocks.blockCells), blocks.rows),
    bjMax: clamp(Math.ceil(jTop / blocks.blockCells), blocks.rows),
  };
}

/**
 * Returns each block's traffic in returns per m² per day: its returns over the block's nominal area
 * (blockM², as the API defines it, also for the clipped blocks at the map's edge) and the number of days.
 */
export function trafficPerM2PerDay(returns: readonly number[], blockM: number, days: number): number[] {
  if (days <= 0 || blockM <= 0) return returns.map(() => 0);
  const perBlock = blockM * blockM * days;
  return returns.map((r) => r / perBlock);
}
