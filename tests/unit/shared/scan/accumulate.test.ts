import { describe, expect, it } from 'vitest';
import { accumulateScan, addFigures, createCounters, emptyFigures } from '../../../../shared/scan/accumulate.js';
import type { ScanRecord } from '../../../../shared/scan/scan-record.js';
import type { GridGeometry } from '../../../../shared/types/grid.js';

const GEOM: GridGeometry = { width: 20, height: 20, resolution: 0.5, origin: { x: 0, y: 0, yaw: 0 } };

function scan(pose: [number, number, number], angleMin: number, angleIncrement: number, ranges: (number | null)[]): ScanRecord {
  return {
    t: '2026-11-03T08:15:02.120Z',
    timeMs: Date.UTC(2026, 10, 3, 8, 15, 2, 120),
    robot: 'AMR-07',
    scanner: 'front',
    pose,
    angleMin,
    angleIncrement,
    rangeMin: 0.05,
    rangeMax: 30,
    ranges: Float64Array.from(ranges, (r) => (r === null ? NaN : r)),
  };
}

const at = (a: Uint32Array, i: number, j: number, w = GEOM.width) => a[j * w + i];
const sum = (a: Uint32Array) => a.reduce((s, v) => s + v, 0);

describe('accumulateScan', () => {
  it('when a mount is given, then the scanner pose is base ∘ mount, worked by hand', () => {
    // Arrange: base (2, 3, π/2), mount (0.4, 0.1, −π/2) in the base frame:
    // scanner x = 2 + cos(π/2)·0.4 − sin(π/2)·0.1 = 1.9, y = 3 + sin(π/2)·0.4 + cos(π/2)·0.1 = 3.4,
    // θs = π/2 − π/2 = 0. One beam at bearing 0, range 2 m → endpoint (3.9, 3.4) m.
    // At 0.5 m/cell: scanner in cell (3, 6), endpoint in cell (7, 6).
    const c = createCounters(GEOM);
    const ends: [number, number, boolean][] = [];

    // Act
    const fig = accumulateScan(GEOM, c, scan([2, 3, Math.PI / 2], 0, 0.01, [2]), { x: 0.4, y: 0.1, yaw: -Math.PI / 2 }, {
      onReturn: (x, y, inMap) => ends.push([x, y, inMap]),
    });

    // Assert
    expect(fig).toEqual({ beams: 1, returns: 1, outOfMap: 0, traced: 1 });
    expect(ends).toHaveLength(1);
    expect(ends[0][0]).toBeCloseTo(3.9, 12);
    expect(ends[0][1]).toBeCloseTo(3.4, 12);
    expect(ends[0][2]).toBe(true);
    expect(at(c.hits, 7, 6)).toBe(1);
    expect([3, 4, 5, 6].map((i) => at(c.passes, i, 6))).toEqual([1, 1, 1, 1]);
    expect([sum(c.hits), sum(c.passes)]).toEqual([1, 4]);
  });

  it('when beams are spread by angleMin and angleIncrement, then beam k points at θs + angleMin + k·increment', () => {
    // Arrange: same scanner pose (1.9, 3.4, 0) via the mount; bearings −π/2, 0, π/2 with 2 m ranges →
    // endpoints (1.9, 1.4), (3.9, 3.4), (1.9, 5.4) m → cells (3, 2), (7, 6), (3, 10).
    const c = createCounters(GEOM);
    const ends: number[] = [];

    // Act
    accumulateScan(GEOM, c, scan([2, 3, Math.PI / 2], -Math.PI / 2, Math.PI / 2, [2, 2, 2]), { x: 0.4, y: 0.1, yaw: -Math.PI / 2 }, {
      onReturn: (x, y) => ends.push(x, y),
    });

    // Assert
    expect(ends.map((v) => Math.round(v * 1e9) / 1e9)).toEqual([1.9, 1.4, 3.9, 3.4, 1.9, 5.4]);
    expect([at(c.hits, 3, 2), at(c.hits, 7, 6), at(c.hits, 3, 10)]).toEqual([1, 1, 1]);
    expect(sum(c.hits)).toBe(3);
  });

  it('when there is no mount, then the base pose is the scanner pose', () => {
    // Arrange: scanner (2.1, 3.1, π/2); one beam at bearing 0 relative → world bearing π/2, 1.8 m →
    // endpoint (2.1, 4.9) m → cell (4, 9); start cell (4, 6).
    const c = createCounters(GEOM);

    // Act
    accumulateScan(GEOM, c, scan([2.1, 3.1, Math.PI / 2], 0, 0.01, [1.8]), null);

    // Assert
    expect(at(c.hits, 4, 9)).toBe(1);
    expect([6, 7, 8].map((j) => at(c.passes, 4, j))).toEqual([1, 1, 1]);
  });

  it('when the grid is rotated by π/2 with a non-zero origin, then the beam lands in the hand-computed cell', () => {
    // Arrange: grid origin (10, 0, π/2) at 0.5 m/cell: grid u = (y − 0)/0.5, v = −(x − 10)/0.5.
    // Scanner (9.1, 2.1, 0) → (u, v) = (4.2, 1.8), cell (4, 1); beam bearing π/2, 2 m → (9.1, 4.1) →
    // (8.2, 1.8), cell (8, 1).
    const geom: GridGeometry = { width: 20, height: 20, resolution: 0.5, origin: { x: 10, y: 0, yaw: Math.PI / 2 } };
    const c = createCounters(geom);

    // Act
    const fig = accumulateScan(geom, c, scan([9.1, 2.1, 0], Math.PI / 2, 0.01, [2]), null);

    // Assert
    expect(fig.returns).toBe(1);
    expect(at(c.hits, 8, 1)).toBe(1);
    expect([4, 5, 6, 7].map((i) => at(c.passes, i, 1))).toEqual([1, 1, 1, 1]);
  });

  it('when ranges hold no-returns, then by default they add nothing, and returns leaving the grid count as out of map', () => {
    // Arrange: from (1.1, 1.1, 0): 8 m east stays in the 10 m grid; 12 m east ends outside; null, 30 (= rangeMax)
    // and 0.01 (< rangeMin) are not returns.
    const c = createCounters(GEOM);
    const ends: boolean[] = [];

    // Act
    const fig = accumulateScan(GEOM, c, scan([1.1, 1.1, 0], 0, 0, [8, 12, null, 30, 0.01]), null, {
      onReturn: (_x, _y, inMap) => ends.push(inMap),
    });

    // Assert
    expect(fig).toEqual({ beams: 5, returns: 2, outOfMap: 1, traced: 2 });
    expect(ends).toEqual([true, false]);
    expect(sum(c.hits)).toBe(1);
    // 8 m: cells 2..18 on row 2 (hit at 18); 12 m: cells 2..19 passes.
    expect(at(c.hits, 18, 2)).toBe(1);
    expect(sum(c.passes)).toBe(16 + 18);
  });

  it('when no-returns are counted as passes, then null and ≥ rangeMax beams are traced to the maximum length and below-rangeMin ones are not', () => {
    // Arrange: from (1.1, 1.1, 0), max trace 1.0 m: (1.1 → 2.1) m covers cells 2, 3, 4 on row 2.
    const c = createCounters(GEOM);

    // Act
    const fig = accumulateScan(GEOM, c, scan([1.1, 1.1, 0], 0, 0, [null, 31, 0.01]), null, {
      countNoReturnAsPass: true,
      maxNoReturnTraceM: 1,
    });

    // Assert
    expect(fig).toEqual({ beams: 3, returns: 0, outOfMap: 0, traced: 2 });
    expect(sum(c.hits)).toBe(0);
    expect([2, 3, 4].map((i) => at(c.passes, i, 2))).toEqual([2, 2, 2]);
    expect(sum(c.passes)).toBe(6);
  });

  it('when the scanner is outside the grid, then beams entering it still count and misses are out of map', () => {
    // Arrange: scanner at (−2.1, 1.1) facing east; 4 m reaches (1.9, 1.1) → cell (3, 2); west beam misses.
    const c = createCounters(GEOM);

    // Act
    const fig = accumulateScan(GEOM, c, scan([-2.1, 1.1, 0], 0, Math.PI, [4, 4]), null);

    // Assert
    expect(fig).toEqual({ beams: 2, returns: 2, outOfMap: 1, traced: 1 });
    expect(at(c.hits, 3, 2)).toBe(1);
    expect([0, 1, 2].map((i) => at(c.passes, i, 2))).toEqual([1, 1, 1]);
  });

  it('when counters do not match the grid size, then it refuses to run', () => {
    expect(() =>
      accumulateScan(GEOM, { hits: new Uint32Array(3), passes: new Uint32Array(400) }, scan([1, 1, 0], 0, 0.1, [1]), null),
    ).toThrow(RangeError);
  });
});

describe('addFigures', () => {
  it('when adding figures, then each count is summed into the first', () => {
    const a = addFigures(emptyFigures(), { beams: 3, returns: 2, outOfMap: 1, traced: 2 });
    expect(addFigures(a, { beams: 1, returns: 1, outOfMap: 0, traced: 1 })).toEqual({ beams: 4, returns: 3, outOfMap: 1, traced: 3 });
  });
});
