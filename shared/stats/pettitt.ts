/**
 * Pettitt's non-parametric change-point test (Pettitt, "A non-parametric approach to the
 * change-point problem", Applied Statistics 28(2), 1979): for each split t of a series x₁ … x_T,
 * U_t = Σ_{i≤t} Σ_{j>t} sgn(x_i − x_j); the statistic is K = max |U_t| and the change lies after
 * the t that attains it. Being rank-based it needs no in-control reference level and a few wild
 * values cannot make a step, which suits docking offsets with an occasional bad docking.
 * Computed from mid-ranks, U_t = 2 Σ_{i≤t} r_i − t(T + 1), in O(T log T) instead of O(T²).
 * The split where |U_t| peaks is pulled toward the middle of the series (U_t's spread grows with
 * t(T − t)), so for locating a change near either end the result also names the split where
 * |U_t| / √(t(T − t)) peaks, the standardized Mann–Whitney form of the same statistic.
 */

/** Result of Pettitt's test on a series. */
export interface PettittResult {
  /** K = max |U_t| over the splits considered (dimensionless count of pair signs). */
  statistic: number;
  /** Number of values before the change: the change lies between index t − 1 and t (0-based). */
  splitAfter: number;
  /** U at the chosen split: positive when the values before the split are larger than after. */
  u: number;
  /** Number of values before the split where |U_t| / √(t(T − t)) peaks: the better place of a change near an end. */
  standardizedSplitAfter: number;
  /** Approximate two-sided p-value 2 exp(−6K² / (T³ + T²)), capped at 1 (Pettitt 1979; the approximation is good for p ≤ 0.5). */
  pValue: number;
}

/** Mid-ranks (1-based, ties share the mean of their ranks) of the values, in input order. */
export function midRanks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const order = Array.from({ length: n }, (_, k) => k).sort((a, b) => values[a] - values[b]);
  const ranks = new Float64Array(n);
  for (let start = 0; start < n; ) {
    let end = start + 1;
    while (end < n && values[order[end]] === values[order[start]]) end++;
    // Positions start … end − 1 hold equal values: each gets the mean of ranks start + 1 … end.
    const rank = (start + 1 + end) / 2;
    for (let k = start; k < end; k++) ranks[order[k]] = rank;
    start = end;
  }
  return ranks;
}

/**
 * Pettitt's test on a series in time order; `minSegment` (default 1) keeps at least that many
 * values on each side of the split, so that a "change" at the very edge is not reported. Needs at
 * least 2·minSegment values. Restricting the splits can only lower K, so the p-value stays conservative.
 */
export function pettittTest(values: ArrayLike<number>, minSegment = 1): PettittResult {
  const n = values.length;
  const m = Math.max(1, Math.floor(minSegment));
  if (n < 2 * m) throw new RangeError(`Pettitt's test needs at least ${2 * m} values for segments of ${m}, got ${n}.`);
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(values[k])) throw new RangeError(`Values must be finite numbers, got ${values[k]} at ${k}.`);
  }
  const ranks = midRanks(values);
  let rankSum = 0;
  let best = { statistic: -1, splitAfter: m, u: 0 };
  let standardized = { score: -1, splitAfter: m };
  for (let t = 1; t < n; t++) {
    rankSum += ranks[t - 1];
    if (t < m || t > n - m) continue;
    const u = 2 * rankSum - t * (n + 1);
    if (Math.abs(u) > best.statistic) best = { statistic: Math.abs(u), splitAfter: t, u };
    const score = Math.abs(u) / Math.sqrt(t * (n - t));
    if (score > standardized.score) standardized = { score, splitAfter: t };
  }
  const k = best.statistic;
  const pValue = Math.min(1, 2 * Math.exp((-6 * k * k) / (n * n * n + n * n)));
  return { statistic: k, splitAfter: best.splitAfter, u: best.u, pValue, standardizedSplitAfter: standardized.splitAfter };
}
