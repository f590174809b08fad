/**
 * Wilson score interval for a binomial proportion (Wilson, "Probable inference, the law of
 * succession, and statistical inference", JASA 22, 1927): the set of p for which the observed
 * rate is within z standard errors, |p̂ − p| ≤ z·√(p(1 − p)/n), solved as a quadratic in p.
 * Unlike the Wald interval it stays inside [0, 1] and does not collapse to zero width at 0 or n
 * hits, which matters for map cells that beams mostly pass through.
 */

/** Two-sided standard normal quantile for 95 % confidence, Φ⁻¹(0.975) (dimensionless). */
export const Z_95 = 1.959963984540054;

/** A confidence interval for a proportion: both bounds are rates in [0, 1]. */
export interface ProportionInterval {
  lower: number;
  upper: number;
}

/** Lower Wilson score bound of the hit rate h / n, a rate in [0, 1]; 0 when n = 0. */
export function wilsonLower(h: number, n: number, z: number = Z_95): number {
  return wilsonBound(h, n, z, -1);
}

/** Upper Wilson score bound of the hit rate h / n, a rate in [0, 1]; 1 when n = 0. */
export function wilsonUpper(h: number, n: number, z: number = Z_95): number {
  return wilsonBound(h, n, z, 1);
}

/** Wilson score interval of the hit rate h / n (rates in [0, 1]); [0, 1] when n = 0 (nothing observed). */
export function wilsonInterval(h: number, n: number, z: number = Z_95): ProportionInterval {
  return { lower: wilsonBound(h, n, z, -1), upper: wilsonBound(h, n, z, 1) };
}

function wilsonBound(h: number, n: number, z: number, sign: -1 | 1): number {
  if (!Number.isFinite(h) || !Number.isFinite(n) || h < 0 || n < 0 || h > n) {
    throw new RangeError(`Hits must lie between 0 and the number of trials, got ${h} of ${n}.`);
  }
  if (!(z > 0) || !Number.isFinite(z)) throw new RangeError(`z must be a positive number, got ${z}.`);
  // No trials: the data say nothing, so every rate is plausible.
  if (n === 0) return sign < 0 ? 0 : 1;
  const p = h / n;
  const z2 = z * z;
  const denominator = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denominator;
  const half = (z / denominator) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // Clamp only the last rounding bit: at h = 0 or h = n the exact bound is 0 or 1.
  return Math.min(1, Math.max(0, centre + sign * half));
}
