import { CellState, type OccupancyGrid } from '../types/grid.js';
import { MAP_COLOURS } from './palette.js';

/** An RGBA raster, row-major from the top row. Memory: 4 bytes per pixel. */
export interface RgbaImage {
  width: number;
  height: number;
  data: Uint8Array;
}

/**
 * Returns the state a block of cells shows in the map palette, or −1 when no cell of the block lies
 * inside the grid. The block spans columns i0 … i0 + cols − 1 and rows jTop down to jTop − rows + 1
 * (cells; row j counts from the bottom). Structure wins over free space and free space over
 * unknown, so a one-cell wall stays visible however far the grid is scaled down.
 */
export function blockState(grid: OccupancyGrid, i0: number, jTop: number, cols: number, rows: number): number {
  // Clip to the grid first, so the loops below never test bounds per cell.
  const iStart = Math.max(0, i0);
  const iEnd = Math.min(grid.width, i0 + cols);
  const jEnd = Math.min(grid.height - 1, jTop);
  const jStart = Math.max(0, jTop - rows + 1);
  if (iStart >= iEnd || jStart > jEnd) return -1;
  let sawFree = false;
  for (let j = jEnd; j >= jStart; j--) {
    const row = j * grid.width;
    for (let i = iStart; i < iEnd; i++) {
      const c = grid.cells[row + i];
      if (c === CellState.Occupied) return CellState.Occupied;
      if (c === CellState.Free) sawFree = true;
    }
  }
  return sawFree ? CellState.Free : CellState.Unknown;
}

/**
 * Writes the opaque palette colour of a cell state (from `blockState`) into the RGBA bytes at
 * offset `o`; for −1 (outside the grid) it writes a fully transparent pixel.
 */
export function writeStatePixel(data: Uint8Array, o: number, state: number): void {
  if (state < 0) {
    data[o] = 0;
    data[o + 1] = 0;
    data[o + 2] = 0;
    data[o + 3] = 0;
    return;
  }
  const colour = state === CellState.Occupied ? MAP_COLOURS.structure : state === CellState.Free ? MAP_COLOURS.free : MAP_COLOURS.unknown;
  data[o] = colour[0];
  data[o + 1] = colour[1];
  data[o + 2] = colour[2];
  data[o + 3] = 255;
}

/**
 * Renders a grid in the map palette, scaled down so that its longer side is at most `maxSide`
 * pixels (never up). Each pixel covers a block of cells; structure wins over free space and
 * free space over unknown, so a one-cell wall stays visible in a small preview.
 */
export function renderGridImage(grid: OccupancyGrid, maxSide = 1024): RgbaImage {
  const step = Math.max(1, Math.ceil(Math.max(grid.width, grid.height) / maxSide));
  const width = Math.ceil(grid.width / step);
  const height = Math.ceil(grid.height / step);
  const data = new Uint8Array(width * height * 4);
  for (let py = 0; py < height; py++) {
    // Pixel row 0 is the map's top edge; grid row j counts from the bottom.
    const jTop = grid.height - 1 - py * step;
    for (let px = 0; px < width; px++) {
      writeStatePixel(data, (py * width + px) * 4, blockState(grid, px * step, jTop, step, step));
    }
  }
  return { width, height, data };
}
