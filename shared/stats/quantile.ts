/**
 * Sample quantiles by linear interpolation between order statistics, definition 7 of Hyndman &
 * Fan, "Sample quantiles in statistical packages", The American Statistician 50, 1996 (the
 * default of R and of spreadsheet PERCENTILE): position h = (n − 1)·p on the sorted values.
 */

/** The p-quantile (p in [0, 1]) of the values, same unit as the values; Hyndman & Fan definition 7. */
export function quantile(values: ArrayLike<number>, p: number): number {
  if (values.length === 0) throw new RangeError('The quantile of an empty list is undefined.');
  if (!(p >= 0 && p <= 1)) throw new RangeError(`The quantile's probability must lie in [0, 1], got ${p}.`);
  const sorted = Float64Array.from(values);
  for (let k = 0; k < sorted.length; k++) {
    if (!Number.isFinite(sorted[k])) throw new RangeError(`Values must be finite numbers, got ${sorted[k]}.`);
  }
  // Typed-array sort is numeric.
  sorted.sort();
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}
