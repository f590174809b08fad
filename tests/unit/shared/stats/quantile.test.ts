import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { quantile } from '../../../../shared/stats/quantile.js';
import { createRng } from '../../../../shared/sim/random.js';

describe('sample quantile', () => {
  it('when quantiles of small lists are taken, then they equal the hand values of Hyndman & Fan definition 7', () => {
    // h = (n − 1)p: [1,2,3,4] at 0.5 → h 1.5 → 2.5; 1…20 at 0.95 → h 18.05 → 19.05 (hand-computed).
    expect(quantile([4, 1, 3, 2], 0.5)).toBe(2.5);
    expect(quantile(Array.from({ length: 20 }, (_, k) => k + 1), 0.95)).toBeCloseTo(19.05, 12);
    expect(quantile([7], 0.95)).toBe(7);
    expect(quantile([3, 9], 0)).toBe(3);
    expect(quantile([3, 9], 1)).toBe(9);
  });

  it('when random lists are summarised, then every quantile equals jstat’s quantiles with α = β = 1', () => {
    const rng = createRng(41);
    for (const n of [2, 5, 17, 250]) {
      const values = Array.from({ length: n }, () => rng.gaussian(4));
      for (const p of [0.05, 0.25, 0.5, 0.9, 0.95, 0.99]) {
        // Reference: jstat@1.9.6, jStat.quantiles(values, [p], 1, 1): plotting positions α = β = 1 are definition 7.
        // (jStat.percentile stops interpolating in its top interval, so it is not used as the reference.)
        expect(quantile(values, p)).toBeCloseTo(jStat.quantiles(values, [p], 1, 1)[0], 10);
      }
    }
  });

  it('when the list is empty, holds a NaN or p is outside [0, 1], then it refuses with a RangeError', () => {
    expect(() => quantile([], 0.5)).toThrow(RangeError);
    expect(() => quantile([1, NaN], 0.5)).toThrow(RangeError);
    expect(() => quantile([1, 2], 1.5)).toThrow(RangeError);
  });
});
