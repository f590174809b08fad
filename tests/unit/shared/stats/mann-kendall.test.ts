import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { mannKendall } from '../../../../shared/stats/mann-kendall.js';
import { createRng } from '../../../../shared/sim/random.js';

/** Every ordering of the values (Heap's algorithm), for the exact null distribution of S. */
function* permutations(values: number[]): Generator<number[]> {
  const a = values.slice();
  const c = new Array(a.length).fill(0);
  yield a.slice();
  let i = 0;
  while (i < a.length) {
    if (c[i] < i) {
      const j = i % 2 === 0 ? 0 : c[i];
      [a[j], a[i]] = [a[i], a[j]];
      yield a.slice();
      c[i]++;
      i = 0;
    } else {
      c[i] = 0;
      i++;
    }
  }
}

function exactNullVariance(values: number[]): number {
  let sum = 0;
  let sumSq = 0;
  let count = 0;
  for (const p of permutations(values)) {
    const { s } = mannKendall(p);
    sum += s;
    sumSq += s * s;
    count++;
  }
  expect(sum / count).toBeCloseTo(0, 12);
  return sumSq / count;
}

describe('Mann–Kendall trend test', () => {
  it('when all orderings of 7 distinct values are enumerated, then Var(S) equals n(n − 1)(2n + 5)/18', () => {
    // Kendall, "Rank Correlation Methods", 1975: Var(S) = 7·6·19/18 = 44.33… for n = 7.
    expect(exactNullVariance([1, 2, 3, 4, 5, 6, 7])).toBeCloseTo((7 * 6 * 19) / 18, 10);
    expect(mannKendall([1, 2, 3, 4, 5, 6, 7]).variance).toBeCloseTo((7 * 6 * 19) / 18, 12);
  });

  it('when values tie, then the tie-corrected variance equals the exact null variance over all orderings', () => {
    // Ties of sizes 2 and 3 among 7 values; the correction subtracts Σ t(t − 1)(2t + 5) (Kendall 1975).
    const values = [1, 1, 2, 3, 3, 3, 4];
    expect(mannKendall(values).variance).toBeCloseTo(exactNullVariance(values), 10);
    expect(mannKendall(values).variance).toBeCloseTo((7 * 6 * 19 - 2 * 1 * 9 - 3 * 2 * 11) / 18, 12);
  });

  it('when a series rises strictly, then S = n(n − 1)/2, tau = 1, and the p-value is the normal tail of (S − 1)/√Var', () => {
    const x = Array.from({ length: 12 }, (_, k) => k * 0.3);
    const result = mannKendall(x);
    expect(result.s).toBe(66);
    expect(result.tau).toBe(1);
    const z = (66 - 1) / Math.sqrt((12 * 11 * 29) / 18);
    expect(result.z).toBeCloseTo(z, 12);
    // Reference: jstat@1.9.6, jStat.normal.cdf.
    expect(result.pValue).toBeCloseTo(2 * (1 - jStat.normal.cdf(z, 0, 1)), 7);
    expect(mannKendall(x.slice().reverse()).z).toBeCloseTo(-z, 12);
  });

  it('when the series is noise without trend, then the p-value is large, and with a clear trend it is small', () => {
    const rng = createRng(3);
    const noise = Array.from({ length: 28 }, () => rng.normal());
    expect(mannKendall(noise).pValue).toBeGreaterThan(0.05);
    const trend = Array.from({ length: 28 }, (_, k) => 0.2 * k + rng.normal());
    expect(mannKendall(trend).pValue).toBeLessThan(1e-4);
    expect(mannKendall([2, 2, 2, 2]).pValue).toBe(1);
    expect(() => mannKendall([1, 2])).toThrow(RangeError);
  });
});
