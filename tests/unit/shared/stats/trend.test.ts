import { describe, expect, it } from 'vitest';
import { fitTrend, thresholdCrossing, trendValue } from '../../../../shared/stats/trend.js';
import { createRng } from '../../../../shared/sim/random.js';

/** Ordinary least squares by the closed form b = Sxy / Sxx, a = ȳ − b x̄, SE(b) = √(s² / Sxx),
 *  SE(a) = √(s² (1/n + x̄² / Sxx)) (Draper & Smith, "Applied Regression Analysis", 3rd ed. 1998, ch. 1; from memory). */
function closedFormOls(x: number[], y: number[]) {
  const n = x.length;
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (x[i] - mx) ** 2;
    sxy += (x[i] - mx) * (y[i] - my);
  }
  const b = sxy / sxx;
  const a = my - b * mx;
  let sse = 0;
  for (let i = 0; i < n; i++) sse += (y[i] - a - b * x[i]) ** 2;
  const s2 = sse / (n - 2);
  return { a, b, seB: Math.sqrt(s2 / sxx), seA: Math.sqrt(s2 * (1 / n + (mx * mx) / sxx)) };
}

/** Six weeks of a synthetic daily health score: 98 − 0.12 per day plus N(0, σ) noise (invented demo data). */
function syntheticSeries(seed: number, sigma: number, firstDay = 0) {
  const rng = createRng(seed);
  const days: number[] = [];
  const values: number[] = [];
  for (let d = 0; d < 42; d++) {
    days.push(firstDay + d);
    values.push(98 - 0.12 * d + sigma * rng.normal());
  }
  return { days, values };
}

describe('robust daily trend', () => {
  it('when the loss is squared, then slope, intercept and their standard errors equal the closed-form OLS', () => {
    // Arrange: day numbers like days since 1970 test the centring.
    const { days, values } = syntheticSeries(3, 0.4, 20_400);
    const reference = closedFormOls(days, values);
    // Act
    const fit = fitTrend(days, values, { loss: 'squared' });
    // Assert
    expect(fit.slope).toBeCloseTo(reference.b, 10);
    expect(fit.intercept).toBeCloseTo(reference.a, 6);
    expect(fit.slopeSE).toBeCloseTo(reference.seB, 10);
    expect(fit.interceptSE / reference.seA).toBeCloseTo(1, 8);
    expect(trendValue(fit, 20_410)).toBeCloseTo(reference.a + reference.b * 20_410, 8);
  });

  it('when the series is clean, then the Huber fit stays within a fraction of a standard error of OLS', () => {
    // Arrange
    const { days, values } = syntheticSeries(5, 0.3);
    const ols = closedFormOls(days, values);
    // Act
    const fit = fitTrend(days, values);
    // Assert
    expect(fit.converged).toBe(true);
    expect(Math.abs(fit.slope - ols.b)).toBeLessThan(0.5 * ols.seB);
  });

  it('when four days are wild outliers, then the robust slope stays near the true −0.12 while OLS is pulled off', () => {
    // Arrange: four late days drop by 8 points (e.g. aisles blocked by a stock count; invented demo data).
    const { days, values } = syntheticSeries(11, 0.3);
    for (const d of [30, 33, 37, 40]) values[d] -= 8;
    // Act
    const robust = fitTrend(days, values);
    const ols = closedFormOls(days, values);
    // Assert: the known slope is −0.12 per day.
    expect(Math.abs(robust.slope + 0.12)).toBeLessThan(0.015);
    expect(Math.abs(ols.b + 0.12)).toBeGreaterThan(0.05);
    // The outlier days carry the lowest weights.
    const lowest = Array.from(robust.weights.keys()).sort((p, q) => robust.weights[p] - robust.weights[q]).slice(0, 4);
    expect(lowest.sort((p, q) => p - q)).toEqual([30, 33, 37, 40]);
  });

  it('when a declining trend is projected to a threshold, then the day and its Fieller range bracket the true crossing', () => {
    // Arrange: 98 − 0.12 d reaches 90 on day 66.67.
    const { days, values } = syntheticSeries(17, 0.3);
    const fit = fitTrend(days, values);
    // Act
    const crossing = thresholdCrossing(fit, 90);
    // Assert
    expect(crossing).not.toBeNull();
    expect(crossing!.day).toBeCloseTo((90 - fit.intercept) / fit.slope, 12);
    expect(crossing!.earliest).toBeLessThan(crossing!.day);
    expect(crossing!.latest).toBeGreaterThan(crossing!.day);
    expect(crossing!.earliest).toBeLessThan(200 / 3);
    expect(crossing!.latest).toBeGreaterThan(200 / 3);
    // At both ends the line's z-band just touches the threshold (Fieller 1954, the defining equation).
    for (const t of [crossing!.earliest, crossing!.latest]) {
      const se = Math.sqrt(fit.interceptSE ** 2 + 2 * t * fit.covariance + t * t * fit.slopeSE ** 2);
      expect(Math.abs(trendValue(fit, t) - 90)).toBeCloseTo(1.959963984540054 * se, 8);
    }
  });

  it('when many clean series are simulated, then the 95 % crossing range covers the true day about 95 % of the time', () => {
    // Arrange: coverage is the defining property of a confidence interval (Fieller 1954); with
    // n = 42 and z instead of Student t the nominal level is about 94 %.
    let covered = 0;
    const runs = 400;
    for (let seed = 1; seed <= runs; seed++) {
      const { days, values } = syntheticSeries(1000 + seed, 0.5);
      // Act
      const crossing = thresholdCrossing(fitTrend(days, values, { loss: 'squared' }), 90);
      if (crossing && crossing.earliest <= 200 / 3 && 200 / 3 <= crossing.latest) covered++;
    }
    // Assert: ±3.5 binomial standard errors around 0.945.
    expect(covered / runs).toBeGreaterThan(0.905);
    expect(covered / runs).toBeLessThan(0.985);
  });

  it('when the series is flat noise, then the crossing range is unbounded', () => {
    // Arrange
    const rng = createRng(23);
    const days = Array.from({ length: 30 }, (_, d) => d);
    const values = days.map(() => 96 + 0.5 * rng.normal());
    // Act
    const crossing = thresholdCrossing(fitTrend(days, values), 90);
    // Assert
    expect(crossing === null || (crossing.earliest === -Infinity && crossing.latest === Infinity)).toBe(true);
  });

  it('when there are too few or mismatched days, then a RangeError says so', () => {
    expect(() => fitTrend([1, 2], [3, 4])).toThrow(/at least 3/);
    expect(() => fitTrend([1, 2, 3], [3, 4])).toThrow(/pair up/);
    expect(() => fitTrend([5, 5, 5], [1, 2, 3])).toThrow(/same/);
  });
});
