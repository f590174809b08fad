import { describe, expect, it } from 'vitest';
import { mapToPixel, pixelToMap } from '../../../../shared/render/crs.js';
import type { GridGeometry } from '../../../../shared/types/grid.js';

// 200 × 100 cells at 0.05 m fits in 512 px, so zoom 0 is one pixel per cell (tiles.ts).
const geom = (yaw: number): GridGeometry => ({ width: 200, height: 100, resolution: 0.05, origin: { x: 2, y: -1, yaw } });

describe('mapToPixel', () => {
  it('when the map has no yaw, then metres from the origin become cells and y counts down from the top', () => {
    // Hand-computed: (3, 1.5) is 1 m right and 2.5 m up of (2, −1) → cell units (20, 50) → pixel (20, 100 − 50).
    const p = mapToPixel(geom(0), 0, 3, 1.5);
    expect(p.x).toBeCloseTo(20, 9);
    expect(p.y).toBeCloseTo(50, 9);
    const o = mapToPixel(geom(0), 0, 2, -1);
    expect([o.x, o.y]).toEqual([0, 100]);
  });

  it('when zoomed in two steps, then pixels are four times as many', () => {
    const p = mapToPixel(geom(0), 2, 3, 1.5);
    expect(p.x).toBeCloseTo(80, 9);
    expect(p.y).toBeCloseTo(200, 9);
  });

  it('when the map is turned by π/2, then a point 1 m left of and 1 m above the origin lies 20 cells along both grid axes', () => {
    // Hand-computed: with yaw π/2 the grid's u axis points along map +y and its v axis along map −x,
    // so (1, 0) = origin + (−1, +1) m is u = 1 m, v = 1 m → cells (20, 20) → pixel (20, 100 − 20).
    const p = mapToPixel(geom(Math.PI / 2), 0, 1, 0);
    expect(p.x).toBeCloseTo(20, 9);
    expect(p.y).toBeCloseTo(80, 9);
  });
});

describe('pixelToMap', () => {
  it('when the map has no yaw, then the pixel goes back to the hand-computed map point', () => {
    const w = pixelToMap(geom(0), 0, 20, 50);
    expect(w.x).toBeCloseTo(3, 9);
    expect(w.y).toBeCloseTo(1.5, 9);
  });

  it('when the map is turned by π/2, then the top-left pixel is the grid’s top-left corner in metres', () => {
    // Hand-computed: pixel (0, 0) is grid point (u 0, v 100 cells = 5 m); v runs along map −x,
    // so the corner is (2 − 5, −1) = (−3, −1).
    const w = pixelToMap(geom(Math.PI / 2), 0, 0, 0);
    expect(w.x).toBeCloseTo(-3, 9);
    expect(w.y).toBeCloseTo(-1, 9);
    const back = pixelToMap(geom(Math.PI / 2), 0, 20, 80);
    expect(back.x).toBeCloseTo(1, 9);
    expect(back.y).toBeCloseTo(0, 9);
  });
});
