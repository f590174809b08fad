import { describe, expect, it } from 'vitest';
import { agreementClass, agreementColour, agreementScale, scaleNumber, trafficClass, trafficLimits, trafficScale } from '../../../../../src/components/map/map-scales.js';

describe('agreementClass', () => {
  it('when a block has no returns, then it has no class and no colour (drawn transparent)', () => {
    expect(agreementClass(null)).toBeNull();
    expect(agreementColour(null)).toBeNull();
  });

  it('when agreement falls, then the class darkens step by step at 99, 97, 95, 90 and 80 %', () => {
    // Limits are the product's own (map-scales.ts); each value sits just on or below a limit.
    expect([1, 0.99, 0.989, 0.97, 0.969, 0.95, 0.9, 0.899, 0.8, 0.79, 0].map(agreementClass)).toEqual([0, 0, 1, 1, 2, 2, 3, 4, 4, 5, 5]);
  });

  it('when the legend lists the heat scale, then it names every class with its percentages, best first', () => {
    expect(agreementScale().map((c) => c.label)).toEqual(['≥ 99 %', '97–99 %', '95–97 %', '90–95 %', '80–90 %', '< 80 %']);
    // One colour per class, all different.
    expect(new Set(agreementScale().map((c) => c.colour)).size).toBe(6);
  });
});

describe('trafficLimits', () => {
  it('when the busiest block has 60 returns/m²/day, then the limits are the five 1–2–5 numbers up to 50', () => {
    // 1–2–5 series (common practice for instrument scales), hand-listed: 2, 5, 10, 20, 50 ≤ 60 < 100.
    expect(trafficLimits(60)).toEqual([2, 5, 10, 20, 50]);
  });

  it('when the maximum is itself a series number, then it is the last limit', () => {
    expect(trafficLimits(100)).toEqual([5, 10, 20, 50, 100]);
    expect(trafficLimits(1)).toEqual([0.05, 0.1, 0.2, 0.5, 1]);
  });

  it('when traffic is below one return per m² per day, then the limits are decimals without float noise', () => {
    expect(trafficLimits(0.3)).toEqual([0.01, 0.02, 0.05, 0.1, 0.2]);
    expect(trafficScale(trafficLimits(0.3)).map((c) => c.label)).toEqual(['< 0.01', '0.01–0.02', '0.02–0.05', '0.05–0.1', '0.1–0.2', '≥ 0.2']);
  });

  it('when nothing was counted, then there are no limits and no scale', () => {
    expect(trafficLimits(0)).toEqual([]);
    expect(trafficScale([])).toEqual([]);
  });
});

describe('trafficClass', () => {
  it('when a value sits on a limit, then it belongs to the class that starts there', () => {
    const limits = [2, 5, 10, 20, 50];
    expect([0.5, 2, 4.9, 5, 19, 50, 900].map((v) => trafficClass(v, limits))).toEqual([0, 1, 1, 2, 3, 5, 5]);
  });

  it('when a block has no traffic, then it has no class', () => {
    expect(trafficClass(0, [2, 5, 10, 20, 50])).toBeNull();
  });
});

describe('scaleNumber', () => {
  it('when numbers are large or small, then they read without needless decimals', () => {
    expect([1000, 20, 0.05, 0.2].map(scaleNumber)).toEqual(['1,000', '20', '0.05', '0.2']);
  });
});
