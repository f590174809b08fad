/**
 * The standard normal distribution's tail, for the p-values of rank tests whose statistic is
 * approximately normal for moderate n (Mann–Kendall). The complementary error function uses the
 * Chebyshev fit of Press, Teukolsky, Vetterling & Flannery, "Numerical Recipes", 2nd ed. 1992,
 * §6.2 (erfcc), whose fractional error is below 1.2 × 10⁻⁷ everywhere, also far in the tails.
 */

/** Complementary error function erfc(x) = 1 − erf(x) (dimensionless), fractional error < 1.2e-7. */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return NaN;
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? r : 2 - r;
}

/** Standard normal cumulative distribution Φ(z) = P(Z ≤ z), a probability in [0, 1]. */
export function normalCdf(z: number): number {
  return 0.5 * erfc(-z / Math.SQRT2);
}

/** Two-sided p-value of a standard normal statistic, P(|Z| ≥ |z|), a probability in [0, 1]. */
export function twoSidedNormalP(z: number): number {
  // erfc of the absolute value keeps the small tail exact instead of 1 − (almost 1).
  return Math.min(1, erfc(Math.abs(z) / Math.SQRT2));
}
