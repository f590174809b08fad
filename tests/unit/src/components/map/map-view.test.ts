import { describe, expect, it } from 'vitest';
import { cellAt, fitView, mapPointLabel, pathLength } from '../../../../../src/components/map/map-view.js';

const demo = { width: 1240, height: 840, resolution: 0.05, origin: { x: -1, y: -1, yaw: 0 } };
const options = { padding: 16, snap: 0.25, minZoom: 0, maxZoom: 4 };

describe('fitView', () => {
  it('when the viewport is 1000 × 600 px, then the zoom is the largest quarter step at which 1240 × 840 cells fit, centred on the grid', () => {
    // Hand-computed: zoom 0 is 1/4 px per cell (310 × 210 px); free 968 × 568 px → scale min(3.12, 2.70) = 2.70,
    // log2 2.70 = 1.43 → 1.25 in quarter steps. Centre: (−1 + 31, −1 + 21) m.
    const view = fitView(demo, { width: 1000, height: 600 }, options);
    expect(view.zoom).toBe(1.25);
    expect(view.centre.x).toBeCloseTo(30, 9);
    expect(view.centre.y).toBeCloseTo(20, 9);
  });

  it('when only whole zoom steps are allowed, then the fit takes the whole step below', () => {
    // Same figures as above: log2 2.70 = 1.43 → 1.
    expect(fitView(demo, { width: 1000, height: 600 }, { ...options, snap: 1 }).zoom).toBe(1);
  });

  it('when the viewport is huge, then the zoom stops at the deepest zoom of the pyramid', () => {
    expect(fitView(demo, { width: 100_000, height: 100_000 }, options).zoom).toBe(4);
  });

  it('when the map is turned by π/2, then the centre is still the grid’s centre in metres', () => {
    // Hand-computed: grid centre (620, 420) cells = (31, 21) m along u and v; u points along +y, v along −x.
    const view = fitView({ ...demo, origin: { x: 0, y: 0, yaw: Math.PI / 2 } }, { width: 1000, height: 600 }, options);
    expect(view.centre.x).toBeCloseTo(-21, 9);
    expect(view.centre.y).toBeCloseTo(31, 9);
  });
});

describe('pathLength', () => {
  it('when the points form a 3–4–5 triangle’s legs, then the length is 7 m; fewer than two points measure 0', () => {
    expect(pathLength([{ x: 0, y: 0 }, { x: 3, y: 0 }, { x: 3, y: 4 }])).toBe(7);
    expect(pathLength([{ x: 0, y: 0 }, { x: 3, y: 4 }])).toBe(5);
    expect(pathLength([{ x: 1, y: 1 }])).toBe(0);
  });
});

describe('mapPointLabel', () => {
  it('when a point is shown, then both coordinates have two decimals, a unit and a typographic minus', () => {
    expect(mapPointLabel(12.344, -5.666)).toBe('x 12.34 m · y −5.67 m');
  });
});

describe('cellAt', () => {
  it('when the point is inside the grid, then it gives the cell counted from the origin', () => {
    // (12, 7) m is 13 m right and 8 m up of (−1, −1): cells (260, 160).
    expect(cellAt(demo, 12.01, 7.01)).toEqual({ i: 260, j: 160 });
  });

  it('when the point is outside the grid, then there is no cell', () => {
    expect(cellAt(demo, -2, 0)).toBeNull();
  });
});
