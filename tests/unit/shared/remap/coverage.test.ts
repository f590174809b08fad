import { describe, expect, it } from 'vitest';
import { coverageEstimate, transitLength } from '../../../../shared/remap/coverage.js';

describe('coverage estimate', () => {
  it('when 1 200 m² in two parts 50 m apart are re-driven at 0.8 m/s with an 8 m sweep and 30 min setup, then the hand-computed figures come out', () => {
    // Worked by hand from the boustrophedon lane rule (Choset, "Coverage path planning: the
    // boustrophedon cellular decomposition", 1997: lanes one sweep width apart):
    // lanes 1200 / 8 = 150 m; with 50 m transit 200 m; 200 / 0.8 = 250 s = 4 1/6 min; + 30 = 34 1/6 min.
    const e = coverageEstimate({ areaM2: 1200, sweepWidthM: 8, driveSpeedMps: 0.8, transitM: 50, setupMinutes: 30 });
    expect(e.laneLengthM).toBe(150);
    expect(e.driveLengthM).toBe(200);
    expect(e.driveMinutes).toBeCloseTo(25 / 6, 12);
    expect(e.overheadMinutes).toBe(30);
    expect(e.totalMinutes).toBeCloseTo(30 + 25 / 6, 12);
  });

  it('when nothing is to be re-driven, then only the setup remains', () => {
    expect(coverageEstimate({ areaM2: 0, sweepWidthM: 8, driveSpeedMps: 0.8, transitM: 0, setupMinutes: 30 }).totalMinutes).toBe(30);
  });

  it('when a figure is not positive or not a number, then it is refused with a sentence', () => {
    expect(() => coverageEstimate({ areaM2: 10, sweepWidthM: 0, driveSpeedMps: 0.8, transitM: 0, setupMinutes: 30 })).toThrow(/sweep width must be a positive number/);
    expect(() => coverageEstimate({ areaM2: 10, sweepWidthM: 8, driveSpeedMps: Number.NaN, transitM: 0, setupMinutes: 30 })).toThrow(/drive speed/);
    expect(() => coverageEstimate({ areaM2: -1, sweepWidthM: 8, driveSpeedMps: 0.8, transitM: 0, setupMinutes: 30 })).toThrow(/area/);
  });

  it('when the parts lie at 0, 10 and 3 m on a line, then the transit visits the nearest next: 3 + 7 = 10 m', () => {
    // Hand-computed: from (0,0) the nearest is (3,0) at 3 m, then (10,0) at 7 m.
    expect(transitLength([[0, 0], [10, 0], [3, 0]])).toBe(10);
    expect(transitLength([[5, 5]])).toBe(0);
    // 3-4-5 triangle (Pythagoras).
    expect(transitLength([[0, 0], [3, 4]])).toBe(5);
  });
});
