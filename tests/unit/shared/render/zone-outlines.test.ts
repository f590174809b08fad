import { describe, expect, it } from 'vitest';
import { renderGridImage } from '../../../../shared/render/grid-image.js';
import { MAP_COLOURS } from '../../../../shared/render/palette.js';
import { drawLine, drawZoneOutlines, previewPixel, previewStep } from '../../../../shared/render/zone-outlines.js';
import { CellState, type GridGeometry, type OccupancyGrid } from '../../../../shared/types/grid.js';

const geometry: GridGeometry = { width: 40, height: 20, resolution: 0.5, origin: { x: -2, y: 1, yaw: 0 } };
const grid = (): OccupancyGrid => ({ ...geometry, cells: new Uint8Array(40 * 20).fill(CellState.Free), probability: new Uint8Array(40 * 20) });
const pixel = (img: { width: number; data: Uint8Array }, x: number, y: number) => Array.from(img.data.slice((y * img.width + x) * 4, (y * img.width + x) * 4 + 4));
const blank = (w: number, h: number) => ({ width: w, height: h, data: new Uint8Array(w * h * 4) });

describe('zone outlines on the map preview', () => {
  it('places map metres on preview pixels with y counted from the top edge', () => {
    // Hand-computed: (3, 6) is 5 m right, 5 m up of (−2, 1) → cells (10, 10) → with 2 cells per pixel (5, (20 − 10) / 2 = 5).
    expect(previewPixel(geometry, 2, 3, 6)).toEqual([5, 5]);
    expect(previewPixel(geometry, 1, -2, 1)).toEqual([0, 20]);
    expect(previewStep(geometry, 20)).toBe(2);
    expect(previewStep(geometry, 100)).toBe(1);
  });

  it('draws a one-pixel line through exactly the Bresenham cells', () => {
    // Bresenham (1965) from (0, 0) to (5, 2): the ideal line's y 0, 0.4, 0.8, 1.2, 1.6, 2 rounded
    // → (0,0) (1,0) (2,1) (3,1) (4,2) (5,2); worked by hand (no ties, so every variant agrees).
    const img = blank(6, 3);
    drawLine(img, 0, 0, 5, 2, [255, 0, 0], 1);
    const set: string[] = [];
    for (let y = 0; y < 3; y++) for (let x = 0; x < 6; x++) if (img.data[(y * 6 + x) * 4 + 3] === 255) set.push(`${x},${y}`);
    expect(set.sort()).toEqual(['0,0', '1,0', '2,1', '3,1', '4,2', '5,2'].sort());
  });

  it('outlines a zone in its kind colour and leaves the inside and the outside as the map drew them', () => {
    const img = renderGridImage(grid(), 40);
    // A square zone of cells 10–20 × 4–14 (metres 3–8 × 3–8).
    drawZoneOutlines(img, geometry, 1, [{ kind: 'missing', outline: [[3, 3], [8, 3], [8, 8], [3, 8]] }], 1);
    const [x0, y0] = previewPixel(geometry, 1, 3, 8); // top-left corner: (10, 6)
    expect([x0, y0]).toEqual([10, 6]);
    expect(pixel(img, 10, 6)).toEqual([...MAP_COLOURS.missingStructure, 255]);
    expect(pixel(img, 15, 16)).toEqual([...MAP_COLOURS.missingStructure, 255]); // bottom edge y = 16
    expect(pixel(img, 15, 11)).toEqual([...MAP_COLOURS.free, 255]); // inside
    expect(pixel(img, 30, 11)).toEqual([...MAP_COLOURS.free, 255]); // outside
  });

  it('clips outlines that leave the image instead of writing out of bounds', () => {
    const img = blank(10, 10);
    drawZoneOutlines(img, { width: 10, height: 10, resolution: 1, origin: { x: 0, y: 0, yaw: 0 } }, 1, [{ kind: 'new', outline: [[-5, -5], [15, -5], [15, 5], [-5, 5]] }], 3);
    expect(img.data.length).toBe(400);
    expect(pixel(img, 5, 5)).toEqual([...MAP_COLOURS.newStructure, 255]); // the edge at y = 5 m → pixel row 5
    expect(pixel(img, 5, 0)[3]).toBe(0);
  });
});
