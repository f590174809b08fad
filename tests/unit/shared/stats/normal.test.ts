import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { erfc, normalCdf, twoSidedNormalP } from '../../../../shared/stats/normal.js';
import { Z_95 } from '../../../../shared/stats/wilson.js';

describe('standard normal tail', () => {
  it('when Φ is evaluated from −8 to 8, then it matches jstat’s normal cdf to the fit’s 1.2e-7 relative error', () => {
    for (let z = -8; z <= 8; z += 0.25) {
      // Reference: jstat@1.9.6, jStat.normal.cdf. Error bound: Press et al., "Numerical Recipes", 2nd ed. 1992, §6.2.
      const reference = jStat.normal.cdf(z, 0, 1);
      expect(Math.abs(normalCdf(z) - reference)).toBeLessThanOrEqual(1.2e-7 * reference + 1e-15);
    }
  });

  it('when erfc is taken at 0 and at negative arguments, then erfc(0) = 1 and erfc(−x) = 2 − erfc(x)', () => {
    // erfc(0) = 1 exactly by definition; the reflection is the identity erf(−x) = −erf(x).
    expect(erfc(0)).toBeCloseTo(1, 7);
    for (const x of [0.1, 0.7, 1.5, 3]) expect(erfc(-x)).toBeCloseTo(2 - erfc(x), 12);
    expect(Number.isNaN(erfc(NaN))).toBe(true);
  });

  it('when z is the two-sided 95 % quantile, then the two-sided p-value is 0.05', () => {
    // Φ⁻¹(0.975) = 1.959963985 (jstat@1.9.6, jStat.normal.inv(0.975, 0, 1)).
    expect(twoSidedNormalP(Z_95)).toBeCloseTo(0.05, 7);
    expect(twoSidedNormalP(-Z_95)).toBeCloseTo(0.05, 7);
    expect(twoSidedNormalP(0)).toBe(1);
    expect(twoSidedNormalP(6)).toBeCloseTo(2 * (1 - jStat.normal.cdf(6, 0, 1)), 12);
  });
});
