/**
 * Robust location and scale: the median and the median absolute deviation (MAD), which a few
 * wild values (a robot with a dirty window, a day of heavy forklift traffic) cannot drag far.
 * The MAD is scaled by 1.4826 ≈ 1 / Φ⁻¹(0.75) so that it estimates the standard deviation of
 * normal data (Rousseeuw & Croux, "Alternatives to the median absolute deviation", JASA 88, 1993).
 */

/** Factor that makes the MAD a consistent estimate of the normal standard deviation (dimensionless). */
export const MAD_NORMAL_CONSISTENCY = 1.4826;

/**
 * Huber's tuning constant for 95 % efficiency at the normal distribution, in units of the residual
 * scale (Holland & Welsch, "Robust regression using iteratively reweighted least-squares", 1977; from memory).
 */
export const HUBER_K = 1.345;

/** Tukey biweight tuning constant for 95 % efficiency at the normal distribution, in residual-scale units (Beaton & Tukey 1974; from memory). */
export const TUKEY_C = 4.685;

/** IRLS weight in [0, 1] of Huber's loss for a residual u in scale units: 1 inside ±k, k / |u| beyond. */
export function huberWeight(u: number, k: number = HUBER_K): number {
  const a = Math.abs(u);
  return a <= k ? 1 : k / a;
}

/** IRLS weight in [0, 1] of Tukey's biweight for a residual u in scale units: (1 − (u/c)²)² inside ±c, 0 beyond. */
export function tukeyWeight(u: number, c: number = TUKEY_C): number {
  const t = u / c;
  // Beyond c the weight is exactly 0: such returns leave the fit entirely.
  return Math.abs(t) >= 1 ? 0 : (1 - t * t) * (1 - t * t);
}

/** Median of the values (same unit as the values); the mean of the two middle values for an even count. */
export function median(values: ArrayLike<number>): number {
  const sorted = sortedCopy(values);
  return sortedMedian(sorted);
}

/** Median absolute deviation from the median, times 1.4826 (same unit as the values). */
export function mad(values: ArrayLike<number>): number {
  const sorted = sortedCopy(values);
  const centre = sortedMedian(sorted);
  for (let k = 0; k < sorted.length; k++) sorted[k] = Math.abs(sorted[k] - centre);
  sorted.sort();
  return MAD_NORMAL_CONSISTENCY * sortedMedian(sorted);
}

/**
 * Robust z-score of `value` against a reference group (dimensionless): (value − median) / MAD.
 * `minScale` (same unit as the values) floors the MAD, because a fleet that agrees perfectly has
 * MAD 0 and would otherwise turn any tiny difference into an infinite score.
 */
export function robustZScore(value: number, reference: ArrayLike<number>, minScale = 0): number {
  if (!Number.isFinite(value)) throw new RangeError(`The value to score must be a finite number, got ${value}.`);
  const centre = median(reference);
  const scale = Math.max(mad(reference), minScale);
  return standardized(value - centre, scale);
}

/** Robust z-score of every value against the group's own median and MAD (dimensionless), one per value. */
export function robustZScores(values: ArrayLike<number>, minScale = 0): Float64Array {
  const centre = median(values);
  const scale = Math.max(mad(values), minScale);
  const out = new Float64Array(values.length);
  for (let k = 0; k < values.length; k++) out[k] = standardized(values[k] - centre, scale);
  return out;
}

function standardized(difference: number, scale: number): number {
  // A zero scale with a real difference is an unbounded outlier, not a division error.
  if (difference === 0) return 0;
  return scale > 0 ? difference / scale : Math.sign(difference) * Infinity;
}

function sortedCopy(values: ArrayLike<number>): Float64Array {
  if (values.length === 0) throw new RangeError('The median of an empty list is undefined.');
  const copy = Float64Array.from(values);
  for (let k = 0; k < copy.length; k++) {
    if (!Number.isFinite(copy[k])) throw new RangeError(`Values must be finite numbers, got ${copy[k]}.`);
  }
  // Typed-array sort is numeric, unlike Array.prototype.sort's string order.
  return copy.sort();
}

function sortedMedian(sorted: Float64Array): number {
  const middle = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}
