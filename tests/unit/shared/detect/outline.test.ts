import { describe, expect, it } from 'vitest';
import { labelComponents, type Connectivity, type Labelling } from '../../../../shared/detect/labelling.js';
import { outlineToMetres, polygonArea, traceOutline } from '../../../../shared/detect/outline.js';
import { randomMask } from './random-mask.js';

function maskFromRows(rows: string[]): { mask: Uint8Array; width: number; height: number } {
  // Rows listed from j = 0 (bottom) upwards.
  return { mask: new Uint8Array(rows.join('').split('').map(Number)), width: rows[0].length, height: rows.length };
}

/**
 * Cells of component `label` plus its holes: everything that background flood fill from outside the
 * grid cannot reach. Background connectivity is the complement of the component's (8 ↔ 4), the usual
 * pairing in digital topology (Rosenfeld 1970, "Connectivity in digital pictures"; from memory).
 */
function filledCellCount(labelling: Labelling, label: number): number {
  const { width, height, labels, connectivity } = labelling;
  // Pad by one cell so that "outside" is one connected ring.
  const w = width + 2;
  const h = height + 2;
  const reached = new Uint8Array(w * h);
  const queue = new Int32Array(w * h);
  const blocked = (i: number, j: number) => i >= 1 && j >= 1 && i <= width && j <= height && labels[(j - 1) * width + (i - 1)] === label;
  const background: Connectivity = connectivity === 8 ? 4 : 8;
  const offsets =
    background === 8
      ? [[1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [1, -1], [-1, 1], [-1, -1]]
      : [[1, 0], [-1, 0], [0, 1], [0, -1]];
  let head = 0;
  let tail = 0;
  queue[tail++] = 0;
  reached[0] = 1;
  while (head < tail) {
    const k = queue[head++];
    const i = k % w;
    const j = (k - i) / w;
    for (const [di, dj] of offsets) {
      const ni = i + di;
      const nj = j + dj;
      if (ni < 0 || nj < 0 || ni >= w || nj >= h || reached[nj * w + ni] || blocked(ni, nj)) continue;
      reached[nj * w + ni] = 1;
      queue[tail++] = nj * w + ni;
    }
  }
  let unreached = 0;
  for (let k = 0; k < reached.length; k++) if (!reached[k]) unreached++;
  return unreached;
}

describe('component outline', () => {
  it('when the component is one cell, then the outline is its four corners counter-clockwise', () => {
    // Arrange
    const { mask, width, height } = maskFromRows(['000', '010', '000']);
    const labelling = labelComponents(mask, width, height);
    // Act
    const outline = traceOutline(labelling, 1);
    // Assert: hand-traced from the bottom edge of cell (1,1), heading east.
    expect(Array.from(outline)).toEqual([2, 1, 2, 2, 1, 2, 1, 1]);
    expect(polygonArea(outline)).toBe(1);
  });

  it('when the component is an L, then the simplified outline has its six corners and area 4 cells', () => {
    // Arrange: cells (0,0), (1,0), (2,0), (0,1).
    const { mask, width, height } = maskFromRows(['111', '100']);
    const labelling = labelComponents(mask, width, height);
    // Act
    const simplified = traceOutline(labelling, 1);
    const full = traceOutline(labelling, 1, { simplify: false });
    // Assert: hand-traced corners; the unsimplified outline has one vertex per unit edge (perimeter 10).
    expect(Array.from(simplified)).toEqual([3, 0, 3, 1, 1, 1, 1, 2, 0, 2, 0, 0]);
    expect(full.length / 2).toBe(10);
    expect(polygonArea(full)).toBe(4);
  });

  it('when two cells touch only at a corner, then 8-connectivity traces one outline through the shared corner', () => {
    // Arrange
    const { mask, width, height } = maskFromRows(['10', '01']);
    // Act
    const eight = labelComponents(mask, width, height, 8);
    const four = labelComponents(mask, width, height, 4);
    // Assert: corner (1,1) is visited twice by the 8-connected outline; 4-connectivity gives two squares.
    const outline = traceOutline(eight, 1);
    expect(eight.count).toBe(1);
    expect(polygonArea(outline)).toBe(2);
    expect(Array.from(outline).filter((_, k) => k % 2 === 0 && outline[k] === 1 && outline[k + 1] === 1).length).toBe(2);
    expect(four.count).toBe(2);
    expect(polygonArea(traceOutline(four, 1))).toBe(1);
    expect(polygonArea(traceOutline(four, 2))).toBe(1);
  });

  it('when a ring encloses a hole, then the outer outline encloses cells plus hole', () => {
    // Arrange: 3 × 3 ring of 8 cells around one empty cell.
    const { mask, width, height } = maskFromRows(['00000', '01110', '01010', '01110', '00000']);
    const labelling = labelComponents(mask, width, height);
    // Act
    const outline = traceOutline(labelling, 1);
    // Assert
    expect(labelling.stats.cellCount[1]).toBe(8);
    expect(polygonArea(outline)).toBe(9);
    expect(Array.from(outline)).toEqual([4, 1, 4, 4, 1, 4, 1, 1]);
  });

  it('when random masks are traced, then every shoelace area equals cell count plus holes and edges are unit, axis-aligned and closed', () => {
    let holeFree = 0;
    let withHoles = 0;
    for (const [width, height, density, seed] of [
      [30, 24, 0.35, 1],
      [40, 40, 0.55, 2],
      [25, 31, 0.65, 3],
    ] as const) {
      for (const connectivity of [4, 8] as const) {
        // Arrange
        const labelling = labelComponents(randomMask(width, height, density, seed), width, height, connectivity);
        for (let c = 1; c <= labelling.count; c++) {
          // Act
          const simplified = traceOutline(labelling, c);
          const full = traceOutline(labelling, c, { simplify: false });
          // Assert: shoelace formula (Meister 1769 / Gauss; common practice) on an exact cell-edge polygon.
          const filled = filledCellCount(labelling, c);
          expect(polygonArea(simplified)).toBe(filled);
          expect(polygonArea(full)).toBe(filled);
          if (filled === labelling.stats.cellCount[c]) holeFree++;
          else withHoles++;
          const n = full.length / 2;
          for (let a = 0; a < n; a++) {
            const b = (a + 1) % n;
            expect(Math.abs(full[2 * b] - full[2 * a]) + Math.abs(full[2 * b + 1] - full[2 * a + 1])).toBe(1);
          }
          // Simplified: consecutive edges always turn (no collinear vertex left).
          const m = simplified.length / 2;
          for (let a = 0; a < m; a++) {
            const p = (a + m - 1) % m;
            const q = (a + 1) % m;
            const cross =
              (simplified[2 * a] - simplified[2 * p]) * (simplified[2 * q + 1] - simplified[2 * a + 1]) -
              (simplified[2 * a + 1] - simplified[2 * p + 1]) * (simplified[2 * q] - simplified[2 * a]);
            expect(cross).not.toBe(0);
          }
        }
      }
    }
    // The random cases must include many hole-free components (area = cell count) and some with holes.
    expect(holeFree).toBeGreaterThan(50);
    expect(withHoles).toBeGreaterThan(3);
  });

  it('when converting to metres on a grid turned by 90°, then vertices rotate about the origin and the area scales by resolution²', () => {
    // Arrange: cells (0,0) and (1,0); origin (1, 2) metres, yaw 90°, 0.05 m per cell.
    const { mask, width, height } = maskFromRows(['110']);
    const labelling = labelComponents(mask, width, height);
    const geometry = { width, height, resolution: 0.05, origin: { x: 1, y: 2, yaw: Math.PI / 2 } };
    // Act
    const metres = outlineToMetres(traceOutline(labelling, 1), geometry);
    // Assert: hand rotation by +90°, (u, v) cells → (x0 − 0.05 v, y0 + 0.05 u).
    const expected = [
      [2, 0],
      [2, 1],
      [0, 1],
      [0, 0],
    ].flatMap(([u, v]) => [1 - 0.05 * v, 2 + 0.05 * u]);
    metres.forEach((value, k) => expect(value).toBeCloseTo(expected[k], 12));
    expect(polygonArea(metres)).toBeCloseTo(2 * 0.05 * 0.05, 12);
  });

  it('when the label does not exist, then a RangeError names the valid range', () => {
    const { mask, width, height } = maskFromRows(['10']);
    expect(() => traceOutline(labelComponents(mask, width, height), 2)).toThrow(/from 1 to 1/);
  });
});
