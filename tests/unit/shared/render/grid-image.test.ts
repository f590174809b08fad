import { describe, expect, it } from 'vitest';
import { MAP_COLOURS } from '../../../../shared/render/palette.js';
import { blockState, renderGridImage } from '../../../../shared/render/grid-image.js';
import { CellState, type OccupancyGrid } from '../../../../shared/types/grid.js';

function grid(width: number, height: number, fill: number): OccupancyGrid {
  return { width, height, resolution: 0.05, origin: { x: 0, y: 0, yaw: 0 }, cells: new Uint8Array(width * height).fill(fill), probability: new Uint8Array(width * height) };
}
const pixel = (img: { width: number; data: Uint8Array }, x: number, y: number) => Array.from(img.data.slice((y * img.width + x) * 4, (y * img.width + x) * 4 + 3));

describe('renderGridImage', () => {
  it('when the grid is small, then pixel row 0 shows the grid’s top row (j = height − 1)', () => {
    const g = grid(3, 2, CellState.Free);
    g.cells[1 * 3 + 0] = CellState.Occupied; // (0, 1): top-left
    g.cells[0 * 3 + 2] = CellState.Unknown; // (2, 0): bottom-right
    const img = renderGridImage(g);
    expect([img.width, img.height]).toEqual([3, 2]);
    expect(pixel(img, 0, 0)).toEqual([...MAP_COLOURS.structure]);
    expect(pixel(img, 2, 1)).toEqual([...MAP_COLOURS.unknown]);
    expect(pixel(img, 1, 1)).toEqual([...MAP_COLOURS.free]);
  });

  it('when scaled down, then a one-cell wall still shows and the longer side fits', () => {
    const g = grid(2000, 1000, CellState.Free);
    g.cells[500 * 2000 + 1001] = CellState.Occupied;
    const img = renderGridImage(g, 500);
    expect([img.width, img.height]).toEqual([500, 250]);
    // Cell (1001, 500) lies in block column 250, block row (999 − 500) / 4 → 124.
    expect(pixel(img, 250, 124)).toEqual([...MAP_COLOURS.structure]);
    expect(pixel(img, 10, 10)).toEqual([...MAP_COLOURS.free]);
  });
});

describe('blockState', () => {
  it('when a block holds structure, free and unknown cells, then structure wins; when it lies outside, then −1', () => {
    const g = grid(4, 4, CellState.Unknown);
    g.cells[3 * 4 + 0] = CellState.Free;
    g.cells[2 * 4 + 1] = CellState.Occupied;
    expect(blockState(g, 0, 3, 2, 2)).toBe(CellState.Occupied);
    expect(blockState(g, 0, 3, 1, 1)).toBe(CellState.Free);
    expect(blockState(g, 2, 1, 2, 2)).toBe(CellState.Unknown);
    // Partly outside: only the in-grid cell (0, 3) counts.
    expect(blockState(g, -1, 4, 2, 2)).toBe(CellState.Free);
    expect(blockState(g, 4, 3, 2, 2)).toBe(-1);
    expect(blockState(g, 0, -1, 2, 2)).toBe(-1);
  });
});
