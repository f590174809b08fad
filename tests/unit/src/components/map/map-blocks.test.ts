import { describe, expect, it } from 'vitest';
import { blockPixelRect, blocksInTile, trafficPerM2PerDay } from '../../../../../src/components/map/map-blocks.js';

// 1240 × 840 cells (the demo's 62 m × 42 m at 5 cm): k = 2 in shared/render/tiles.ts, so zoom 2 is
// one pixel per cell and zoom 4 four. Blocks of 40 cells (2 m): 31 columns × 21 rows.
const geom = { width: 1240, height: 840 };
const blocks = { blockCells: 40, cols: 31, rows: 21 };

describe('blockPixelRect', () => {
  it('when the block is the bottom-left one, then it lies at the bottom of the pyramid’s pixels', () => {
    // Hand-computed per the agreement contract: block 0 covers cells i 0–39, j 0–39 (j from the bottom);
    // y from the top = (840 − 40) × 1 px.
    expect(blockPixelRect(geom, blocks, 0, 0, 2)).toEqual({ x: 0, y: 800, width: 40, height: 40 });
  });

  it('when zoomed in two steps, then the rectangle is four times as large', () => {
    expect(blockPixelRect(geom, blocks, 3, 5, 4)).toEqual({ x: 480, y: (840 - 240) * 4, width: 160, height: 160 });
  });

  it('when the block is in the last row and column, then it is cut at the grid’s edge', () => {
    // Column 30 covers cells 1200–1239 (40), row 20 covers 800–839 (40): both fit; a 1230-cell grid cuts column 30 to 30 cells.
    expect(blockPixelRect({ width: 1230, height: 830 }, { blockCells: 40, cols: 31, rows: 21 }, 30, 20, 2)).toEqual({ x: 1200, y: 0, width: 30, height: 30 });
  });

  it('when zoomed out, then pixels per cell are a fraction and the rectangle shrinks with them', () => {
    expect(blockPixelRect(geom, blocks, 1, 0, 0)).toEqual({ x: 10, y: 200, width: 10, height: 10 });
  });
});

describe('blocksInTile', () => {
  it('when the tile is the top-left one at one pixel per cell, then it holds the top rows of blocks on the left', () => {
    // Tile (0, 0) at zoom 2 covers cells i 0–255 and the top 256 rows (j 584–839): block columns 0–6, rows 14–20.
    expect(blocksInTile(geom, blocks, 2, 0, 0)).toEqual({ biMin: 0, biMax: 7, bjMin: 14, bjMax: 21 });
  });

  it('when the tile reaches past the grid, then the ranges stop at the last block', () => {
    // Tile (4, 3) at zoom 2: cells i 1024–1279 and j −184–71, clipped to columns 25–30 and rows 0–1.
    expect(blocksInTile(geom, blocks, 2, 4, 3)).toEqual({ biMin: 25, biMax: 31, bjMin: 0, bjMax: 2 });
  });

  it('when the tile lies wholly outside the grid, then no block is in it', () => {
    const r = blocksInTile(geom, blocks, 2, 9, 0);
    expect(r.biMax - r.biMin).toBe(0);
  });
});

describe('trafficPerM2PerDay', () => {
  it('when a 2 m block counted 560 returns over 7 days, then it had 20 returns per m² per day', () => {
    // Per the contract: returns / (blockM² × days) = 560 / (4 × 7).
    expect(trafficPerM2PerDay([560, 0], 2, 7)).toEqual([20, 0]);
  });

  it('when there are no days, then traffic is zero rather than a division by zero', () => {
    expect(trafficPerM2PerDay([5], 2, 0)).toEqual([0]);
  });
});
