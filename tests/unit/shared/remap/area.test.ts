import { describe, expect, it } from 'vitest';
import { polygonArea } from '../../../../shared/detect/outline.js';
import { cellsInOutlines, remapArea } from '../../../../shared/remap/area.js';
import type { GridGeometry } from '../../../../shared/types/grid.js';

const grid = (width: number, height: number, resolution = 0.05, origin = { x: 0, y: 0, yaw: 0 }): GridGeometry => ({ width, height, resolution, origin });
const shoelace = (outline: [number, number][]) => polygonArea(Float64Array.from(outline.flat()));

describe('remap area', () => {
  it('when one cell is grown by 0.1 m on a 5 cm grid, then the area is the 13 cells of a disc of radius 2 and the outline encloses them', () => {
    // Hand count of the offsets with dx² + dy² ≤ 4: 5 + 2·3 + 2·1 = 13 (disc element, Serra 1982 from memory).
    const g = grid(20, 20);
    const area = remapArea([Int32Array.of(10 * 20 + 10)], g, 0.1);
    expect(area.cells.length).toBe(13);
    expect(area.areaM2).toBeCloseTo(13 * 0.0025, 12);
    expect(area.parts).toHaveLength(1);
    // Shoelace area of the traced outline equals the cell count (outline.ts: exact polygons along cell edges).
    expect(shoelace(area.parts[0].outline)).toBeCloseTo(13 * 0.0025, 9);
    expect(area.parts[0].centre).toEqual([0.525, 0.525]);
  });

  it('when two zones lie far apart, then there are two parts; grown until they touch, then one', () => {
    const g = grid(60, 20);
    const a = Int32Array.of(10 * 60 + 10);
    const b = Int32Array.of(10 * 60 + 30);
    expect(remapArea([a, b], g, 0.2).parts).toHaveLength(2);
    // 20 cells apart: radii of 10 cells (0.5 m) meet in the middle.
    expect(remapArea([a, b], g, 0.5).parts).toHaveLength(1);
  });

  it('when a ring of cells is taken with no margin, then its hole is filled: 25 cells, not 16', () => {
    const g = grid(20, 20);
    const ring: number[] = [];
    for (let j = 5; j < 10; j++) for (let i = 5; i < 10; i++) if (i === 5 || i === 9 || j === 5 || j === 9) ring.push(j * 20 + i);
    const area = remapArea([Int32Array.from(ring)], g, 0);
    expect(area.cells.length).toBe(25);
    expect(shoelace(area.parts[0].outline)).toBeCloseTo(25 * 0.0025, 9);
  });

  it('when the margin reaches past the map edge, then the area is clipped to the map', () => {
    const g = grid(10, 10);
    const area = remapArea([Int32Array.of(0)], g, 0.1);
    // Quarter of the 13-cell disc that lies inside: offsets (0..2, 0..2) with dx² + dy² ≤ 4 → 6 cells.
    expect(area.cells.length).toBe(6);
    expect([...area.cells].every((c) => c >= 0 && c < 100)).toBe(true);
  });

  it('when no cell is given, then the area is empty; a cell outside the grid or a negative margin is refused', () => {
    expect(remapArea([], grid(5, 5), 1)).toEqual({ parts: [], areaM2: 0, cells: new Int32Array(0) });
    expect(() => remapArea([Int32Array.of(25)], grid(5, 5), 1)).toThrow(/outside the 5 × 5 grid/);
    expect(() => remapArea([Int32Array.of(1)], grid(5, 5), -1)).toThrow(/margin/);
  });

  it('when an area is laid back onto its own grid, then it has exactly its own cells', () => {
    const g = grid(40, 30);
    const zone = Int32Array.from([5 * 40 + 5, 5 * 40 + 6, 6 * 40 + 6, 20 * 40 + 30]);
    const area = remapArea([zone], g, 0.15);
    expect([...cellsInOutlines(area.parts.map((p) => p.outline), g)]).toEqual([...area.cells]);
  });

  it('when a 1 m square is laid onto a 10 cm grid turned by 90°, then 100 cells fall inside it, and their centres do', () => {
    // Grid turned a quarter turn about (3, 0): its u axis runs along the map's y, its v axis along −x.
    const g = grid(40, 40, 0.1, { x: 3, y: 0, yaw: Math.PI / 2 });
    const square: [number, number][] = [[1, 1], [2, 1], [2, 2], [1, 2]];
    const cells = cellsInOutlines([square], g);
    expect(cells.length).toBe(100);
    for (const c of cells) {
      const i = c % 40;
      const j = (c - i) / 40;
      // Cell centre in metres by the rotation x = x0 − v·res, y = y0 + u·res.
      const x = 3 - (j + 0.5) * 0.1;
      const y = (i + 0.5) * 0.1;
      expect(x > 1 && x < 2 && y > 1 && y < 2).toBe(true);
    }
  });
});
