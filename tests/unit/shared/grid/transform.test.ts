import { describe, expect, it } from 'vitest';
import {
  cellCentre,
  cellIndex,
  frameU,
  frameV,
  gridFrameToWorld,
  makeGridFrame,
  worldToCell,
  worldToGridFrame,
} from '../../../../shared/grid/transform.js';
import type { GridGeometry } from '../../../../shared/types/grid.js';

const geom = (x: number, y: number, yaw: number, resolution: number): GridGeometry => ({
  width: 400,
  height: 300,
  resolution,
  origin: { x, y, yaw },
});

// All expected values below are worked by hand from the rule of DESIGN §4.1: rotate by −yaw about
// the origin, x' = cos·dx + sin·dy, y' = −sin·dx + cos·dy, then i = floor(x'/res), j = floor(y'/res).
describe('worldToCell / worldToGridFrame', () => {
  it('when yaw is 0 and the origin is (−10, −5), then (0.01, 0.01) m lies in cell (200, 100)', () => {
    // Arrange: u = 10.01 / 0.05 = 200.2, v = 5.01 / 0.05 = 100.2
    const g = geom(-10, -5, 0, 0.05);

    // Act
    const p = worldToGridFrame(g, 0.01, 0.01);
    const c = worldToCell(g, 0.01, 0.01);

    // Assert
    expect(p.u).toBeCloseTo(200.2, 9);
    expect(p.v).toBeCloseTo(100.2, 9);
    expect(c).toEqual({ i: 200, j: 100 });
  });

  it('when a point lies left of and below the origin, then its cell indices are negative (floor, not truncation)', () => {
    // Arrange: u = −0.03 / 0.05 = −0.6 → i = −1; v = −0.12 / 0.05 = −2.4 → j = −3
    const g = geom(0, 0, 0, 0.05);

    // Act
    const c = worldToCell(g, -0.03, -0.12);

    // Assert
    expect(c).toEqual({ i: -1, j: -3 });
  });

  it('when yaw is π/2 and the origin is (2, 3), then (1.85, 3.32) m lies in cell (3, 1)', () => {
    // Arrange: dx = −0.15, dy = 0.32; x' = 0·dx + 1·dy = 0.32, y' = −1·dx + 0·dy = 0.15;
    // at 0.1 m/cell u = 3.2, v = 1.5.
    const g = geom(2, 3, Math.PI / 2, 0.1);

    // Act
    const p = worldToGridFrame(g, 1.85, 3.32);
    const c = worldToCell(g, 1.85, 3.32);

    // Assert
    expect(p.u).toBeCloseTo(3.2, 9);
    expect(p.v).toBeCloseTo(1.5, 9);
    expect(c).toEqual({ i: 3, j: 1 });
  });

  it('when yaw is π/6, then a point built by hand at grid (2.3, 4.6) maps back to it', () => {
    // Arrange: origin (1, 1), 0.5 m/cell; grid (2.3, 4.6) cells = (1.15, 2.3) m in the grid frame;
    // x = 1 + (√3/2)·1.15 − (1/2)·2.3 = 0.845929, y = 1 + (1/2)·1.15 + (√3/2)·2.3 = 3.566858.
    const g = geom(1, 1, Math.PI / 6, 0.5);

    // Act
    const p = worldToGridFrame(g, 0.845929, 3.566858);

    // Assert
    expect(p.u).toBeCloseTo(2.3, 5);
    expect(p.v).toBeCloseTo(4.6, 5);
    expect(worldToCell(g, 0.845929, 3.566858)).toEqual({ i: 2, j: 4 });
  });

  it('when using the precomputed frame, then frameU/frameV equal worldToGridFrame', () => {
    // Arrange
    const g = geom(-4.2, 7.5, -2.1, 0.05);
    const f = makeGridFrame(g);

    // Act
    const p = worldToGridFrame(g, 3.3, -1.7);

    // Assert
    expect(frameU(f, 3.3, -1.7)).toBe(p.u);
    expect(frameV(f, 3.3, -1.7)).toBe(p.v);
  });
});

describe('cellCentre / gridFrameToWorld', () => {
  it('when yaw is 0, then the centre of cell (3, 1) at 0.1 m/cell from origin (2, 3) is (2.35, 3.15) m', () => {
    // Act
    const c = cellCentre(geom(2, 3, 0, 0.1), 3, 1);

    // Assert
    expect(c.x).toBeCloseTo(2.35, 12);
    expect(c.y).toBeCloseTo(3.15, 12);
  });

  it('when yaw is π/2 and the origin is (2, 3), then the centre of cell (3, 1) is (1.85, 3.35) m', () => {
    // Arrange: grid-frame (0.35, 0.15) m rotated by +π/2 is (−0.15, 0.35) m; plus the origin.
    const g = geom(2, 3, Math.PI / 2, 0.1);

    // Act
    const c = cellCentre(g, 3, 1);

    // Assert
    expect(c.x).toBeCloseTo(1.85, 12);
    expect(c.y).toBeCloseTo(3.35, 12);
    expect(worldToCell(g, c.x, c.y)).toEqual({ i: 3, j: 1 });
  });

  it('when going grid → world → grid for many points and yaws, then the point comes back', () => {
    for (const yaw of [0, 0.3, Math.PI / 2, Math.PI, -2.5]) {
      const g = geom(-3.1, 12.4, yaw, 0.05);
      for (const [u, v] of [[0, 0], [17.25, 3.5], [-4.75, 299.9]]) {
        // Act
        const w = gridFrameToWorld(g, u, v);
        const back = worldToGridFrame(g, w.x, w.y);

        // Assert
        expect(back.u).toBeCloseTo(u, 9);
        expect(back.v).toBeCloseTo(v, 9);
      }
    }
  });
});

describe('cellIndex', () => {
  it('when the cell is inside, then the index is j·width + i; when outside, −1', () => {
    const g = geom(0, 0, 0, 0.05);
    expect(cellIndex(g, 5, 2)).toBe(2 * 400 + 5);
    expect(cellIndex(g, 399, 299)).toBe(300 * 400 - 1);
    expect(cellIndex(g, 400, 0)).toBe(-1);
    expect(cellIndex(g, 0, 300)).toBe(-1);
    expect(cellIndex(g, -1, 0)).toBe(-1);
  });
});
