import { CellState, type OccupancyGrid } from '../types/grid.js';
import { MAP_COLOURS } from './palette.js';

/** An RGBA raster, row-major from the top row. Memory: 4 bytes per pixel. */
export interface RgbaImage {
  width: number;
  height: number;
  data: Uint8Array;
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
      let sawFree = false;
      let sawStructure = false;
      for (let dj = 0; dj < step && !sawStructure; dj++) {
        const j = jTop - dj;
        if (j < 0) break;
        const row = j * grid.width;
        for (let di = 0; di < step; di++) {
          const i = px * step + di;
          if (i >= grid.width) break;
          const c = grid.cells[row + i];
          if (c === CellState.Occupied) {
            sawStructure = true;
            break;
          }
          if (c === CellState.Free) sawFree = true;
        }
      }
      const colour = sawStructure ? MAP_COLOURS.structure : sawFree ? MAP_COLOURS.free : MAP_COLOURS.unknown;
      const o = (py * width + px) * 4;
      data[o] = colour[0];
      data[o + 1] = colour[1];
      data[o + 2] = colour[2];
      data[o + 3] = 255;
    }
  }
  return { width, height, data };
}
