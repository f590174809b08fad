import { describe, expect, it } from 'vitest';
import { boundingBox, boxesOverlap, boxPolygon, rayBoxDistance, rayCircleDistance } from '../../../../shared/sim/shapes.js';

// Expected distances are worked by hand with elementary plane geometry.
const S = Math.SQRT1_2;

describe('rayBoxDistance', () => {
  it('when a ray along +x meets the box [2, 3] × [−1, 1], then it enters at distance 2', () => {
    expect(rayBoxDistance(0, 0, 1, 0, 2, -1, 3, 1)).toBe(2);
  });

  it('when a 45° ray meets the box [2, 3] × [2, 3], then it enters at its corner, 2·√2 away', () => {
    expect(rayBoxDistance(0, 0, S, S, 2, 2, 3, 3)).toBeCloseTo(2 * Math.SQRT2, 12);
  });

  it('when the ray points away, passes beside, or runs parallel outside the box, then it misses', () => {
    expect(rayBoxDistance(0, 0, -1, 0, 2, -1, 3, 1)).toBe(Infinity);
    expect(rayBoxDistance(0, 0, 0, 1, 2, -1, 3, 1)).toBe(Infinity);
    expect(rayBoxDistance(0, 2, 1, 0, 2, -1, 3, 1)).toBe(Infinity);
  });

  it('when the ray runs along the box face (origin on a slab plane), then it still enters at the near face', () => {
    // The face y = 1 contains the ray: 0 · ∞ must not turn into NaN.
    expect(rayBoxDistance(0, 1, 1, 0, 2, -1, 3, 1)).toBe(2);
  });

  it('when the origin lies inside the box, then the distance is 0', () => {
    expect(rayBoxDistance(2.5, 0, 1, 0, 2, -1, 3, 1)).toBe(0);
  });
});

describe('rayCircleDistance', () => {
  it('when a ray along +x meets a disc of radius 1 at (5, 0), then it enters at 4', () => {
    expect(rayCircleDistance(0, 0, 1, 0, 5, 0, 1)).toBe(4);
  });

  it('when the ray passes at offset 0.6 from the centre of a unit disc at (5, 0.6), then it enters at 5 − 0.8', () => {
    // Chord half-length √(1 − 0.6²) = 0.8.
    expect(rayCircleDistance(0, 0, 1, 0, 5, 0.6, 1)).toBeCloseTo(4.2, 12);
  });

  it('when the disc lies behind or beside the ray, then it misses; when the origin is inside, then 0', () => {
    expect(rayCircleDistance(0, 0, 1, 0, -5, 0, 1)).toBe(Infinity);
    expect(rayCircleDistance(0, 0, 1, 0, 5, 1.5, 1)).toBe(Infinity);
    expect(rayCircleDistance(5, 0.5, 1, 0, 5, 0, 1)).toBe(0);
  });
});

describe('box helpers', () => {
  it('when asking for a polygon, a bounding box and overlaps, then they follow the box corners', () => {
    // Arrange
    const a = { minX: 0, minY: 0, maxX: 2, maxY: 1 };
    const b = { minX: 2, minY: 0, maxX: 3, maxY: 4 };

    // Act, Assert
    expect(boxPolygon(a)).toEqual([[0, 0], [2, 0], [2, 1], [0, 1]]);
    expect(boundingBox([a, b])).toEqual({ minX: 0, minY: 0, maxX: 3, maxY: 4 });
    expect(boxesOverlap(a, b)).toBe(false);
    expect(boxesOverlap(a, { minX: 1, minY: 0.5, maxX: 5, maxY: 5 })).toBe(true);
    expect(() => boundingBox([])).toThrow(/at least one box/);
  });
});
