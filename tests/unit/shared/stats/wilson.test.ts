import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { wilsonInterval, wilsonLower, wilsonUpper, Z_95 } from '../../../../shared/stats/wilson.js';

describe('Wilson score interval', () => {
  it('when z is the default, then it equals the normal 97.5 % quantile from jstat', () => {
    // Reference: jstat@1.9.6, jStat.normal.inv(0.975, 0, 1).
    expect(Z_95).toBeCloseTo(jStat.normal.inv(0.975, 0, 1), 9);
  });

  it("when given Newcombe's worked examples, then the intervals match the published 4-decimal values", () => {
    // Source: Newcombe, "Two-sided confidence intervals for the single proportion: comparison of seven
    // methods", Statistics in Medicine 17 (1998), table of example intervals, method 3 (Wilson score
    // without continuity correction). Values quoted from memory: 81/263 → 0.2553–0.3662,
    // 15/148 → 0.0624–0.1605, 0/20 → 0.0000–0.1611, 1/29 → 0.0061–0.1718.
    const cases: Array<[number, number, number, number]> = [
      [81, 263, 0.2553, 0.3662],
      [15, 148, 0.0624, 0.1605],
      [0, 20, 0, 0.1611],
      [1, 29, 0.0061, 0.1718],
    ];
    for (const [h, n, lower, upper] of cases) {
      // Act
      const interval = wilsonInterval(h, n);
      // Assert: published to 4 decimals, so agreement within half a unit of the last place.
      expect(Math.abs(interval.lower - lower)).toBeLessThanOrEqual(0.00005);
      expect(Math.abs(interval.upper - upper)).toBeLessThanOrEqual(0.00005);
    }
  });

  it('when bounds are computed for many counts, then each solves the defining quadratic |p̂ − p| = z √(p(1 − p)/n)', () => {
    // Source: Wilson, "Probable inference, the law of succession, and statistical inference", JASA 22 (1927):
    // the bounds are the roots of (p̂ − p)² = z² p (1 − p) / n.
    for (const z of [1, Z_95, 2.575829]) {
      for (const n of [1, 2, 7, 30, 311, 5000]) {
        for (let h = 0; h <= n; h += Math.max(1, Math.floor(n / 9))) {
          const p = h / n;
          for (const bound of [wilsonLower(h, n, z), wilsonUpper(h, n, z)]) {
            const lhs = (p - bound) ** 2;
            const rhs = (z * z * bound * (1 - bound)) / n;
            expect(Math.abs(lhs - rhs)).toBeLessThan(1e-12);
          }
          // The observed rate always lies inside its own interval.
          expect(wilsonLower(h, n, z)).toBeLessThanOrEqual(p + 1e-15);
          expect(wilsonUpper(h, n, z)).toBeGreaterThanOrEqual(p - 1e-15);
        }
      }
    }
  });

  it('when nothing was observed, then the interval is the whole range [0, 1]', () => {
    expect(wilsonInterval(0, 0)).toEqual({ lower: 0, upper: 1 });
  });

  it('when all trials hit, then the upper bound is exactly 1 and the interval mirrors the all-miss case', () => {
    // Arrange + Act
    const all = wilsonInterval(20, 20);
    const none = wilsonInterval(0, 20);
    // Assert: symmetry p ↔ 1 − p follows from the quadratic.
    expect(all.upper).toBe(1);
    expect(all.lower).toBeCloseTo(1 - none.upper, 12);
  });

  it('when counts are impossible, then a RangeError explains it', () => {
    expect(() => wilsonInterval(5, 3)).toThrow(/between 0 and the number of trials/);
    expect(() => wilsonInterval(-1, 3)).toThrow(RangeError);
    expect(() => wilsonInterval(1, 3, 0)).toThrow(/z must be/);
  });
});
