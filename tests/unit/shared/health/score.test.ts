import { describe, expect, it } from 'vitest';
import { forecastHealth, healthBand, healthScore } from '../../../../shared/health/score.js';

const limits = { goodMin: 97, watchMin: 90 }; // DESIGN.md §4.3 product defaults

describe('health score', () => {
  it('when 931 of 1000 returns are explained, then the score is 93.1 and the band "watch"', () => {
    const score = healthScore(931, 1000)!;
    expect(score).toBeCloseTo(93.1, 10);
    expect(healthBand(score, limits)).toBe('watch');
    expect(healthBand(97, limits)).toBe('good');
    expect(healthBand(89.99, limits)).toBe('remap_advised');
    expect(healthScore(0, 0)).toBeNull();
  });

  it('when a series falls 0.25 points a day from 97, then it reaches 90 about 17 days after day 11, with a range around it', () => {
    // Hand-computed: 97 − 0.25·t = 90 ⇒ t = 28; the last day is 11, so 17 days on; a small wobble moves it a little.
    const days = Array.from({ length: 12 }, (_, k) => k);
    const scores = days.map((t) => 97 - 0.25 * t + (t % 2 === 0 ? 0.05 : -0.05));
    const f = forecastHealth(days, scores, 90)!;
    expect(f.slopePerDay).toBeCloseTo(-0.25, 1);
    expect(f.daysToThreshold!).toBeGreaterThan(15);
    expect(f.daysToThreshold!).toBeLessThan(19);
    expect(f.earliestDays!).toBeLessThan(f.daysToThreshold!);
    expect(f.latestDays!).toBeGreaterThan(f.daysToThreshold!);
  });

  it('when the series is flat or rising, then no crossing is forecast; with too few days, no forecast at all', () => {
    const days = Array.from({ length: 10 }, (_, k) => k);
    expect(forecastHealth(days, days.map((t) => 95 + 0.1 * t), 90)!.daysToThreshold).toBeNull();
    expect(forecastHealth([0, 1, 2], [95, 94, 93], 90)).toBeNull();
  });

  it('when the score is already below the threshold, then the crossing is now', () => {
    const days = Array.from({ length: 8 }, (_, k) => k);
    expect(forecastHealth(days, days.map((t) => 92 - t), 90)!.daysToThreshold).toBe(0);
  });
});
