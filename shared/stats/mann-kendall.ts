/**
 * The Mann–Kendall test for a monotonic trend (Mann, "Nonparametric tests against trend",
 * Econometrica 13, 1945; Kendall, "Rank Correlation Methods", 4th ed. 1975): S = Σ_{i<j}
 * sgn(x_j − x_i) over the series in time order; under "no trend" S has mean 0 and variance
 * [n(n − 1)(2n + 5) − Σ_g t_g(t_g − 1)(2t_g + 5)] / 18 for tie groups of sizes t_g, and
 * (S ∓ 1)/√Var(S) is close to standard normal from about n = 10 on.
 */
import { twoSidedNormalP } from './normal.js';

/** Result of the Mann–Kendall test. */
export interface MannKendallResult {
  /** S: pairs rising minus pairs falling (dimensionless count). */
  s: number;
  /** Var(S) under no trend, with the tie correction (count²). */
  variance: number;
  /** Continuity-corrected normal score: (S − 1)/√Var for S > 0, (S + 1)/√Var for S < 0, else 0. */
  z: number;
  /** Two-sided p-value from the normal approximation, in [0, 1]. */
  pValue: number;
  /** Kendall's tau-a between time and value, S / (n(n − 1)/2), in [−1, 1]. */
  tau: number;
}

/** Mann–Kendall trend test of values in time order (at least 3 finite values). O(n²) time, O(n) memory. */
export function mannKendall(values: ArrayLike<number>): MannKendallResult {
  const n = values.length;
  if (n < 3) throw new RangeError(`The Mann–Kendall test needs at least 3 values, got ${n}.`);
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(values[k])) throw new RangeError(`Values must be finite numbers, got ${values[k]} at ${k}.`);
  }
  let s = 0;
  for (let i = 0; i < n - 1; i++) {
    const xi = values[i];
    for (let j = i + 1; j < n; j++) s += Math.sign(values[j] - xi);
  }
  // Tie groups from the sorted values.
  const sorted = Float64Array.from(values).sort();
  let tieTerm = 0;
  for (let start = 0; start < n; ) {
    let end = start + 1;
    while (end < n && sorted[end] === sorted[start]) end++;
    const t = end - start;
    tieTerm += t * (t - 1) * (2 * t + 5);
    start = end;
  }
  const variance = (n * (n - 1) * (2 * n + 5) - tieTerm) / 18;
  const z = variance > 0 ? (s > 0 ? (s - 1) / Math.sqrt(variance) : s < 0 ? (s + 1) / Math.sqrt(variance) : 0) : 0;
  return { s, variance, z, pValue: variance > 0 ? twoSidedNormalP(z) : 1, tau: s / ((n * (n - 1)) / 2) };
}
