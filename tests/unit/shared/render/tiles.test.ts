import { describe, expect, it } from 'vitest';
import { renderTile, tileBounds, tileCount, tilePyramid, TILE_SIZE } from '../../../../shared/render/tiles.js';
import { CellState, type OccupancyGrid } from '../../../../shared/types/grid.js';

function grid(width: number, height: number, fill: number): OccupancyGrid {
  return { width, height, resolution: 0.05, origin: { x: 0, y: 0, yaw: 0 }, cells: new Uint8Array(width * height).fill(fill), probability: new Uint8Array(width * height) };
}
const rgba = (img: { width: number; data: Uint8Array }, x: number, y: number) => Array.from(img.data.slice((y * img.width + x) * 4, (y * img.width + x) * 4 + 4));
// Map colours as written in DESIGN.md §5 (free #f6f3ea, structure #1e2a3f, unknown #d5dae3), opaque.
const FREE = [0xf6, 0xf3, 0xea, 255];
const STRUCTURE = [0x1e, 0x2a, 0x3f, 255];
const UNKNOWN = [0xd5, 0xda, 0xe3, 255];
const TRANSPARENT = [0, 0, 0, 0];

describe('tilePyramid', () => {
  it('when the map is 1000 × 600 cells, then zoom 0 is 2 cells per pixel and the deepest zoom 4 pixels per cell', () => {
    // Hand-computed: 1000 > 512 but ≤ 1024, so k = 1; max zoom = k + 2 = 3 (2^(3−1) = 4 px per cell).
    expect(tilePyramid({ width: 1000, height: 600 })).toEqual({ zoom0Shift: 1, minZoom: 0, maxZoom: 3 });
  });

  it('when the map fits in 512 pixels, then zoom 0 is one pixel per cell', () => {
    expect(tilePyramid({ width: 100, height: 512 })).toEqual({ zoom0Shift: 0, minZoom: 0, maxZoom: 2 });
  });
});

describe('tileCount', () => {
  it('when the map is 1000 × 600 cells, then zoom 0 takes 2 × 2 tiles and zoom 3 takes 16 × 10', () => {
    // Hand-computed: zoom 0 → 500 × 300 px → ⌈500/256⌉ × ⌈300/256⌉; zoom 3 → 4000 × 2400 px → 16 × 10.
    expect(tileCount({ width: 1000, height: 600 }, 0)).toEqual({ columns: 2, rows: 2 });
    expect(tileCount({ width: 1000, height: 600 }, 3)).toEqual({ columns: 16, rows: 10 });
  });
});

describe('tileBounds', () => {
  it('when a tile is asked at zoom 0, then it covers 512 cells a side counted from the map’s top', () => {
    // Hand-computed: 256 px · 2 cells = 512 cells; tile row 1 spans rows from the top 512 … 1023,
    // i.e. j from 600 − 1024 = −424 up to 600 − 512 = 88.
    expect(tileBounds({ width: 1000, height: 600 }, 0, 1, 1)).toEqual({ iMin: 512, iMax: 1024, jMin: -424, jMax: 88 });
  });

  it('when a tile is asked at the deepest zoom, then it covers 64 cells a side', () => {
    // Hand-computed: 256 px / 4 px per cell = 64 cells; column 2 → i 128 … 191; row 1 → j 472 … 535.
    expect(tileBounds({ width: 1000, height: 600 }, 3, 2, 1)).toEqual({ iMin: 128, iMax: 192, jMin: 472, jMax: 536 });
  });
});

describe('renderTile', () => {
  it('when the tile lies wholly outside the map, then every pixel is transparent', () => {
    const g = grid(1000, 600, CellState.Occupied);
    for (const [x, y] of [[20, 0], [-1, 0], [0, 10]]) {
      const img = renderTile(g, 3, x, y);
      expect([img.width, img.height]).toEqual([TILE_SIZE, TILE_SIZE]);
      expect(img.data.every((b) => b === 0)).toBe(true);
    }
  });

  it('when a one-cell wall lies in free space, then it shows at the coarsest zoom and the part past the map is transparent', () => {
    const g = grid(1000, 600, CellState.Free);
    g.cells[100 * 1000 + 777] = CellState.Occupied;
    const img = renderTile(g, 0, 1, 0);
    // Hand-computed: 2 cells per pixel; column 777 → tile 1, pixel (777 − 512) / 2 → 132;
    // row from the top 599 − 100 = 499 → tile 0, pixel 499 / 2 → 249.
    expect(rgba(img, 132, 249)).toEqual(STRUCTURE);
    expect(rgba(img, 133, 249)).toEqual(FREE);
    expect(rgba(img, 132, 250)).toEqual(FREE);
    // The map ends at column 1000 → pixel (1000 − 512) / 2 = 244 of this tile.
    expect(rgba(img, 243, 10)).toEqual(FREE);
    expect(rgba(img, 244, 10)).toEqual(TRANSPARENT);
  });

  it('when free and unknown cells share a pixel, then free space wins over unknown', () => {
    const g = grid(1000, 600, CellState.Unknown);
    g.cells[599 * 1000 + 1] = CellState.Free; // top row, second column: pixel (0, 0) at zoom 0
    const img = renderTile(g, 0, 0, 0);
    expect(rgba(img, 0, 0)).toEqual(FREE);
    expect(rgba(img, 1, 0)).toEqual(UNKNOWN);
  });

  it('when drawn at the deepest zoom, then pixel (0, 0) of tile (0, 0) is the top-left cell and each cell is 4 pixels wide', () => {
    const g = grid(100, 50, CellState.Free);
    g.cells[49 * 100 + 0] = CellState.Occupied; // cell (0, 49): the top-left cell
    g.cells[49 * 100 + 1] = CellState.Unknown;
    const img = renderTile(g, tilePyramid(g).maxZoom, 0, 0);
    expect(rgba(img, 0, 0)).toEqual(STRUCTURE);
    expect(rgba(img, 3, 3)).toEqual(STRUCTURE);
    expect(rgba(img, 4, 0)).toEqual(UNKNOWN);
    expect(rgba(img, 0, 4)).toEqual(FREE);
    // 50 cells · 4 px = 200 px tall, so row 200 is past the map's bottom edge.
    expect(rgba(img, 0, 199)).toEqual(FREE);
    expect(rgba(img, 0, 200)).toEqual(TRANSPARENT);
  });
});
