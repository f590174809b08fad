import { describe, expect, it } from 'vitest';
import { theilSen } from '../../../../shared/stats/theil-sen.js';
import { createRng } from '../../../../shared/sim/random.js';

describe('Theil–Sen line', () => {
  it('when four points are fitted, then slope and intercept are the hand-computed medians', () => {
    // Pair slopes of (1,1) (2,2) (3,3) (4,10): 1, 1, 3, 1, 4, 7 → sorted 1, 1, 1, 3, 4, 7, median 2;
    // y − 2x: −1, −2, −3, 2 → median (−2 − 1)/2 = −1.5 (Sen 1968; Conover 1980; by hand).
    const fit = theilSen([1, 2, 3, 4], [1, 2, 3, 10]);
    expect(fit.slope).toBeCloseTo(2, 12);
    expect(fit.intercept).toBeCloseTo(-1.5, 12);
  });

  it('when a fifth of the points are wild, then the line stays near the true one', () => {
    const rng = createRng(21);
    const x = Array.from({ length: 50 }, (_, k) => k);
    const y = x.map((v) => 3 - 0.4 * v + rng.gaussian(0.1));
    for (let k = 0; k < 10; k++) y[k * 5] += 50;
    const fit = theilSen(x, y);
    expect(fit.slope).toBeCloseTo(-0.4, 1);
    expect(fit.intercept).toBeCloseTo(3, 0);
  });

  it('when every point shares one x or the lengths differ, then it refuses', () => {
    expect(() => theilSen([2, 2, 2], [1, 2, 3])).toThrow(RangeError);
    expect(() => theilSen([1, 2], [1])).toThrow(RangeError);
  });
});
