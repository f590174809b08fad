/**
 * The Theil–Sen line (Theil, "A rank-invariant method of linear and polynomial regression
 * analysis", Proc. KNAW 53, 1950; Sen, "Estimates of the regression coefficient based on
 * Kendall's tau", JASA 63, 1968): the slope is the median of the slopes of all pairs of points
 * with distinct x, the intercept the median of y − slope·x (Conover, "Practical Nonparametric
 * Statistics", 1980). Up to 29 % of the points may be wild without moving it far.
 */
import { median } from './robust.js';

/** A fitted line y ≈ intercept + slope·x; slope in y's unit per x unit. */
export interface TheilSenFit {
  slope: number;
  intercept: number;
}

/** Theil–Sen line through the points (at least two distinct x). Memory: 8 bytes per pair, n(n − 1)/2 pairs. */
export function theilSen(x: ArrayLike<number>, y: ArrayLike<number>): TheilSenFit {
  const n = x.length;
  if (n !== y.length) throw new RangeError(`Got ${n} x values but ${y.length} y values; they must pair up.`);
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(x[k]) || !Number.isFinite(y[k])) throw new RangeError(`Point ${k} is not finite (${x[k]}, ${y[k]}).`);
  }
  const slopes = new Float64Array((n * (n - 1)) / 2);
  let count = 0;
  for (let i = 0; i < n - 1; i++) {
    for (let j = i + 1; j < n; j++) {
      const dx = x[j] - x[i];
      if (dx !== 0) slopes[count++] = (y[j] - y[i]) / dx;
    }
  }
  if (count === 0) throw new RangeError('All points share one x, so no slope can be fitted.');
  const slope = median(slopes.subarray(0, count));
  const residuals = new Float64Array(n);
  for (let k = 0; k < n; k++) residuals[k] = y[k] - slope * x[k];
  return { slope, intercept: median(residuals) };
}
