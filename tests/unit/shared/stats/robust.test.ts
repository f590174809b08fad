import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { huberWeight, mad, median, robustZScore, robustZScores, tukeyWeight } from '../../../../shared/stats/robust.js';
import { createRng } from '../../../../shared/sim/random.js';

describe('robust statistics', () => {
  it('when taking medians of odd, even and random lists, then they equal jstat’s median', () => {
    // Arrange
    const rng = createRng(7);
    const lists = [[5], [3, 1, 2], [4, 1, 3, 2], [10, -2, 7.5, 7.5, 0, 1e6], Array.from({ length: 501 }, () => rng.normal())];
    for (const list of lists) {
      // Act + Assert. Reference: jstat@1.9.6, jStat.median.
      expect(median(list)).toBeCloseTo(jStat.median(list), 12);
    }
  });

  it('when the list is 1…9 with one wild value, then the MAD is the hand value 1.4826 × 2', () => {
    // Arrange: median 5; absolute deviations 4,3,2,1,0,1,2,3,995 → median 2 (hand-computed).
    const values = [1, 2, 3, 4, 5, 6, 7, 8, 1000];
    // Act + Assert. Scale 1.4826: Rousseeuw & Croux, "Alternatives to the median absolute deviation", JASA 1993.
    expect(median(values)).toBe(5);
    expect(mad(values)).toBeCloseTo(2 * 1.4826, 12);
  });

  it('when data are normal, then the scaled MAD estimates the standard deviation', () => {
    // Arrange: σ = 3; the 1.4826 factor makes the MAD consistent for σ (Rousseeuw & Croux 1993).
    const rng = createRng(99);
    const values = Array.from({ length: 20000 }, () => 3 * rng.normal() + 10);
    // Act
    const scale = mad(values);
    // Assert: sampling error of the MAD at n = 20 000 is about 1.1 % of σ.
    expect(scale).toBeGreaterThan(2.9);
    expect(scale).toBeLessThan(3.1);
    // And it agrees with jstat's sample standard deviation on the same normal data.
    expect(scale / jStat.stdev(values, true)).toBeCloseTo(1, 1);
  });

  it('when one robot agrees far less than its fleet, then its robust z-score is strongly negative and the others are small', () => {
    // Arrange: agreement shares per robot on the same days (invented demo values).
    const fleet = [0.981, 0.978, 0.984, 0.979, 0.983, 0.98, 0.902];
    // Act
    const scores = robustZScores(fleet);
    const single = robustZScore(0.902, fleet);
    // Assert: sorted 0.902 … 0.984 → median 0.980; deviations 0.078, 0.002, 0.001, 0, 0.001, 0.003, 0.004
    // → median deviation 0.002, MAD = 1.4826 × 0.002 (hand-computed).
    expect(single).toBeCloseTo((0.902 - 0.98) / (1.4826 * 0.002), 6);
    expect(scores[6]).toBeCloseTo(single, 12);
    for (let k = 0; k < 6; k++) expect(Math.abs(scores[k])).toBeLessThan(1.5);
  });

  it('when the fleet agrees perfectly, then the floor keeps scores finite and an exact match scores 0', () => {
    // Arrange
    const fleet = [0.98, 0.98, 0.98, 0.98];
    // Act + Assert
    expect(robustZScore(0.98, fleet)).toBe(0);
    expect(robustZScore(0.97, fleet)).toBe(-Infinity);
    expect(robustZScore(0.97, fleet, 0.005)).toBeCloseTo(-2, 12);
  });

  it('when the list is empty or holds NaN, then a RangeError says so', () => {
    expect(() => median([])).toThrow(/empty/);
    expect(() => mad([1, Number.NaN])).toThrow(/finite/);
  });

  it('when weighting residuals, then Huber and Tukey weights follow their defining formulas', () => {
    // Sources: Huber 1964 (ψ(u) = clip(u, ±k), so w = min(1, k/|u|)); Beaton & Tukey 1974 biweight
    // w = (1 − (u/c)²)² for |u| < c, else 0. Constants 1.345 and 4.685 from memory (95 % efficiency).
    expect(huberWeight(0.5)).toBe(1);
    expect(huberWeight(-2.69)).toBeCloseTo(0.5, 12);
    expect(tukeyWeight(0)).toBe(1);
    expect(tukeyWeight(4.685 / 2)).toBeCloseTo(0.5625, 12);
    expect(tukeyWeight(-4.685)).toBe(0);
    expect(tukeyWeight(10)).toBe(0);
  });
});
