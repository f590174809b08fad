import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { midRanks, pettittTest } from '../../../../shared/stats/pettitt.js';
import { createRng } from '../../../../shared/sim/random.js';

/** U_t by its definition Σ_{i≤t} Σ_{j>t} sgn(x_i − x_j) (Pettitt, "A non-parametric approach to the change-point problem", 1979). */
function uByDefinition(x: number[], t: number): number {
  let u = 0;
  for (let i = 0; i < t; i++) for (let j = t; j < x.length; j++) u += Math.sign(x[i] - x[j]);
  return u;
}

describe('Pettitt change-point test', () => {
  it('when values tie, then mid-ranks equal jstat’s ranks', () => {
    const values = [3, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5];
    // Reference: jstat@1.9.6, jStat.rank (average ranks for ties).
    expect(Array.from(midRanks(values))).toEqual(jStat.rank(values));
  });

  it('when a series with ties is tested, then K and the split equal the double sum of the definition', () => {
    const rng = createRng(5);
    for (let trial = 0; trial < 20; trial++) {
      // Rounded values make ties, which the rank form must count as sgn 0 like the definition.
      const x = Array.from({ length: 25 }, () => Math.round(rng.gaussian(2)));
      let best = { k: -1, t: 0 };
      for (let t = 1; t < x.length; t++) {
        const u = Math.abs(uByDefinition(x, t));
        if (u > best.k) best = { k: u, t };
      }
      const result = pettittTest(x);
      expect(result.statistic).toBe(best.k);
      expect(Math.abs(uByDefinition(x, result.splitAfter))).toBe(best.k);
    }
  });

  it('when the level steps down after value 30 of 60, then the split is at 30 with U = 30·30 and a tiny p', () => {
    // Arrange: two separated levels, so every pair across the split has sign +1 (before larger).
    const rng = createRng(8);
    const x = Array.from({ length: 60 }, (_, k) => (k < 30 ? 10 : 0) + rng.range(-1, 1));
    // Act
    const result = pettittTest(x);
    // Assert: K = t(T − t) = 900; p = 2 exp(−6·900² / (60³ + 60²)) (Pettitt 1979), by hand ≈ 3.9e-10.
    expect(result.splitAfter).toBe(30);
    expect(result.u).toBe(900);
    expect(result.pValue).toBeCloseTo(2 * Math.exp((-6 * 900 * 900) / (60 ** 3 + 60 ** 2)), 15);
    expect(result.pValue).toBeLessThan(1e-9);
  });

  it('when the change lies near the end, then the standardized split finds it where |U_t| alone points elsewhere', () => {
    // Arrange: 300 noise values, then 12 values raised by 3σ; a fixed seed where the plain peak
    // of |U_t| falls well before the change (|U_t|'s spread grows toward the middle).
    const rng = createRng(102);
    const x = Array.from({ length: 312 }, (_, k) => (k >= 300 ? 3 : 0) + rng.normal());
    // Act
    const result = pettittTest(x, 5);
    // Assert: |U_t| / √(t(T − t)) peaks at the change (standardized Mann–Whitney form; Pettitt 1979).
    expect(Math.abs(result.standardizedSplitAfter - 300)).toBeLessThanOrEqual(3);
    expect(result.splitAfter).toBeLessThan(200);
    let bestScore = -1;
    let bestT = 0;
    for (let t = 5; t <= 307; t++) {
      const score = Math.abs(uByDefinition(x, t)) / Math.sqrt(t * (312 - t));
      if (score > bestScore) [bestScore, bestT] = [score, t];
    }
    expect(result.standardizedSplitAfter).toBe(bestT);
  });

  it('when series have no change, then the approximate p-value is conservative: the true tail is below it but not far', () => {
    // Arrange: 20 000 series of 40 i.i.d. normals, a fixed seed.
    const rng = createRng(11);
    const n = 40;
    const ks: number[] = [];
    for (let r = 0; r < 20000; r++) ks.push(pettittTest(Array.from({ length: n }, () => rng.normal())).statistic);
    for (const p of [0.1, 0.05, 0.01]) {
      // The K at which the approximation 2 exp(−6K² / (T³ + T²)) says p (Pettitt 1979).
      const k = Math.sqrt((-Math.log(p / 2) * (n ** 3 + n ** 2)) / 6);
      const tail = ks.filter((x) => x >= k).length / ks.length;
      // Assert: Pettitt notes the approximation errs on the safe side for small samples; measured here
      // the true tail sits at about half the nominal p, so a flag at 1 % is rarer than 1 % under no change.
      expect(tail).toBeLessThanOrEqual(p);
      expect(tail).toBeGreaterThanOrEqual(p / 5);
    }
  });

  it('when a minimum segment is asked, then the split keeps that many values on each side', () => {
    // Arrange: the strongest split of the whole series is after value 1 (one wild first value).
    const x = [100, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0];
    expect(pettittTest(x).splitAfter).toBe(1);
    // Act + Assert
    const result = pettittTest(x, 4);
    expect(result.splitAfter).toBeGreaterThanOrEqual(4);
    expect(result.splitAfter).toBeLessThanOrEqual(8);
    expect(() => pettittTest([1, 2, 3], 2)).toThrow(RangeError);
    expect(() => pettittTest([1, NaN, 3, 4])).toThrow(RangeError);
  });
});
