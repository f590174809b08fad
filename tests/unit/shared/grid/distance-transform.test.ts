import { beforeAll, describe, expect, it } from 'vitest';
import {
  distanceTransform,
  distancesInMetres,
  sampleDistance,
  sampleDistanceGradient,
  squaredDistanceTransform,
} from '../../../../shared/grid/distance-transform.js';
import { loadOpenCv } from '../detect/opencv.js';
import { randomMask } from '../detect/random-mask.js';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
let cv: any;

/** Brute force of the definition D(p) = min over features q of |p − q|² (Felzenszwalb & Huttenlocher 2012, §1). */
function bruteSquared(mask: Uint8Array, width: number, height: number): Float64Array {
  const out = new Float64Array(width * height).fill(Infinity);
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      let best = Infinity;
      for (let q = 0; q < mask.length; q++) {
        if (mask[q] === 0) continue;
        const di = (q % width) - i;
        const dj = Math.floor(q / width) - j;
        best = Math.min(best, di * di + dj * dj);
      }
      out[j * width + i] = best;
    }
  }
  return out;
}

describe('distance transform', () => {
  beforeAll(async () => {
    ({ cv } = await loadOpenCv());
  });

  it('when two features sit in opposite corners of a 4 × 3 grid, then squared distances match the hand-computed table', () => {
    // Arrange: hand-computed from the definition D(p) = min_q (|p − q|² + f(q)), f = 0 on features, ∞ elsewhere
    // (Felzenszwalb & Huttenlocher, "Distance Transforms of Sampled Functions", 2012). Features at (0,0) and (3,2).
    const mask = new Uint8Array(12);
    mask[0] = 1;
    mask[2 * 4 + 3] = 1;
    // Act
    const squared = squaredDistanceTransform(mask, 4, 3);
    // Assert: rows from j = 0 (bottom).
    expect(Array.from(squared)).toEqual([0, 1, 4, 4, 1, 2, 2, 1, 4, 4, 1, 0]);
    const field = distanceTransform(mask, 4, 3);
    expect(field.values[5]).toBeCloseTo(Math.SQRT2, 6);
  });

  it('when the mask has no feature, then every distance is Infinity', () => {
    // Arrange
    const mask = new Uint8Array(6 * 5);
    // Act
    const field = distanceTransform(mask, 6, 5);
    // Assert
    expect(field.values.every((d) => d === Infinity)).toBe(true);
  });

  it('when random masks are transformed, then squared distances equal the brute-force minimum exactly', () => {
    for (const [width, height, density, seed] of [
      [17, 13, 0.05, 1],
      [31, 7, 0.2, 2],
      [1, 23, 0.1, 3],
      [23, 1, 0.1, 4],
      [40, 40, 0.01, 5],
      [12, 19, 0.6, 6],
    ] as const) {
      // Arrange
      const mask = randomMask(width, height, density, seed);
      // Act
      const squared = squaredDistanceTransform(mask, width, height);
      // Assert: integer arithmetic, so the exact transform must match to the last bit.
      expect(Array.from(squared)).toEqual(Array.from(bruteSquared(mask, width, height)));
    }
  });

  it('when compared with OpenCV on random masks, then distances agree within 1e-4 cells', () => {
    for (const [width, height, density, seed] of [
      [64, 48, 0.02, 11],
      [120, 90, 0.005, 12],
      [33, 77, 0.3, 13],
    ] as const) {
      // Arrange: OpenCV measures the distance to the nearest zero pixel, so features become 0.
      const mask = randomMask(width, height, density, seed);
      mask[0] = 1;
      const inverted = Array.from(mask, (m) => (m !== 0 ? 0 : 1));
      const src = cv.matFromArray(height, width, cv.CV_8UC1, inverted);
      const dst = new cv.Mat();
      // Reference: @techstark/opencv-js@4.5.2, cv.distanceTransform(src, dst, DIST_L2, DIST_MASK_PRECISE).
      cv.distanceTransform(src, dst, cv.DIST_L2, cv.DIST_MASK_PRECISE);
      const reference = Float32Array.from(dst.data32F as Float32Array);
      src.delete();
      dst.delete();
      // Act
      const field = distanceTransform(mask, width, height);
      // Assert: OpenCV rows run top-down in memory, ours bottom-up; a row flip does not change distances,
      // so rows are compared in the same memory order as the mask we gave it.
      let worst = 0;
      for (let k = 0; k < reference.length; k++) worst = Math.max(worst, Math.abs(reference[k] - field.values[k]));
      expect(worst).toBeLessThan(1e-4);
    }
  });

  it('when converting to metres at 0.05 m per cell, then each distance is scaled by the resolution', () => {
    // Arrange
    const mask = new Uint8Array(5);
    mask[0] = 1;
    const field = distanceTransform(mask, 5, 1);
    // Act
    const metres = distancesInMetres(field, 0.05);
    // Assert
    expect(Array.from(metres, (d) => Number(d.toFixed(6)))).toEqual([0, 0.05, 0.1, 0.15, 0.2]);
    expect(() => distancesInMetres(field, 0)).toThrow(RangeError);
  });

  it('when sampling beside a straight wall, then the bilinear value is the exact offset and the gradient points away', () => {
    // Arrange: a wall along column 5; between cell centres the true distance |x − 5.5| is linear, so
    // bilinear interpolation reproduces it exactly.
    const width = 12;
    const height = 8;
    const mask = new Uint8Array(width * height);
    for (let j = 0; j < height; j++) mask[j * width + 5] = 1;
    const field = distanceTransform(mask, width, height);
    const out = new Float64Array(3);
    // Act
    const right = sampleDistanceGradient(field, 7.3, 3.7, out);
    const [value, gx, gy] = out;
    const left = sampleDistance(field, 4.1, 2.2);
    // Assert
    expect(right).toBe(true);
    expect(value).toBeCloseTo(1.8, 12);
    expect(gx).toBeCloseTo(1, 12);
    expect(gy).toBeCloseTo(0, 12);
    expect(left).toBeCloseTo(1.4, 12);
  });

  it('when sampling at random points, then the gradient matches central finite differences of the interpolant', () => {
    // Arrange
    const width = 30;
    const height = 25;
    const mask = randomMask(width, height, 0.03, 21);
    mask[0] = 1;
    const field = distanceTransform(mask, width, height);
    const out = new Float64Array(3);
    const h = 1e-6;
    for (const [x, y] of [
      [3.21, 4.77],
      [10.4, 20.13],
      [25.9, 1.3],
      [14.62, 12.38],
    ]) {
      // Act
      expect(sampleDistanceGradient(field, x, y, out)).toBe(true);
      const numericX = (sampleDistance(field, x + h, y) - sampleDistance(field, x - h, y)) / (2 * h);
      const numericY = (sampleDistance(field, x, y + h) - sampleDistance(field, x, y - h)) / (2 * h);
      // Assert
      expect(out[1]).toBeCloseTo(numericX, 5);
      expect(out[2]).toBeCloseTo(numericY, 5);
      // At a cell centre the interpolant equals the stored sample.
      expect(sampleDistance(field, 7.5, 9.5)).toBeCloseTo(field.values[9 * width + 7], 6);
    }
  });

  it('when sampling outside the lattice of cell centres or beside Infinity, then no value is given', () => {
    // Arrange
    const empty = distanceTransform(new Uint8Array(9), 3, 3);
    const mask = new Uint8Array(9);
    mask[4] = 1;
    const field = distanceTransform(mask, 3, 3);
    const out = new Float64Array(3);
    // Act + Assert
    expect(sampleDistanceGradient(field, 0.2, 1.5, out)).toBe(false);
    expect(sampleDistanceGradient(field, 1.5, 2.8, out)).toBe(false);
    expect(Number.isNaN(sampleDistance(empty, 1.5, 1.5))).toBe(true);
    expect(sampleDistance(field, 2.5, 2.5)).toBeCloseTo(Math.SQRT2, 6);
  });

  it('when the mask length does not match the size, then a RangeError says so', () => {
    expect(() => distanceTransform(new Uint8Array(5), 2, 3)).toThrow(/needs 6/);
  });
});
