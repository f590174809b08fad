import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { dailyAccuracy, radialError, summarizeAccuracy, withinTolerance } from '../../../../shared/docking/accuracy.js';

const TOL = { positionM: 0.01, yawRad: 0.02 };
const at = (day: number, hour: number) => Date.UTC(2026, 10, day, hour);

describe('docking accuracy', () => {
  it('when four dockings are summarised, then the figures are the hand-computed ones', () => {
    // Arrange: radial errors 5, 10, 13 (5-12-13 triangle) and 0 mm; headings 0, 0.01, −0.03, 0.02 rad.
    const samples = [
      { tMs: at(3, 8), dx: 0.003, dy: 0.004, dyaw: 0 },
      { tMs: at(3, 9), dx: 0.01, dy: 0, dyaw: 0.01 },
      { tMs: at(3, 10), dx: -0.005, dy: 0.012, dyaw: -0.03 },
      { tMs: at(3, 11), dx: 0, dy: 0, dyaw: 0.02 },
    ];
    // Act
    const s = summarizeAccuracy(samples, TOL)!;
    // Assert: mean (0.002, 0.004) → |mean| = √(4e-6 + 16e-6); within: 1st, 2nd (10 mm, inclusive), 4th (0.02 rad, inclusive).
    expect(s.count).toBe(4);
    expect(s.meanDx).toBeCloseTo(0.002, 12);
    expect(s.meanDy).toBeCloseTo(0.004, 12);
    expect(s.meanOffset).toBeCloseTo(Math.sqrt(20e-6), 12);
    expect(s.withinShare).toBe(0.75);
    // p95 of the radial errors: Hyndman & Fan definition 7; reference jstat@1.9.6 jStat.quantiles(…, 1, 1).
    expect(s.p95Radial).toBeCloseTo(jStat.quantiles([0.005, 0.01, 0.013, 0], [0.95], 1, 1)[0], 12);
    expect(s.p95AbsYaw).toBeCloseTo(jStat.quantiles([0, 0.01, 0.03, 0.02], [0.95], 1, 1)[0], 12);
    expect(s.meanYaw).toBeCloseTo(0, 12);
  });

  it('when a docking is checked, then the radial error is Euclidean and both tolerances must hold', () => {
    expect(radialError({ dx: 0.006, dy: -0.008 })).toBeCloseTo(0.01, 12);
    expect(withinTolerance({ tMs: 0, dx: 0.006, dy: -0.008, dyaw: 0 }, TOL)).toBe(true);
    expect(withinTolerance({ tMs: 0, dx: 0.006, dy: -0.0081, dyaw: 0 }, TOL)).toBe(false);
    expect(withinTolerance({ tMs: 0, dx: 0, dy: 0, dyaw: -0.021 }, TOL)).toBe(false);
  });

  it('when dockings span days, then each day is summarised on its own, oldest first; no docking gives null', () => {
    const samples = [
      { tMs: at(4, 8), dx: 0.02, dy: 0, dyaw: 0 },
      { tMs: at(3, 8), dx: 0.001, dy: 0, dyaw: 0 },
      { tMs: at(3, 9), dx: 0.003, dy: 0, dyaw: 0 },
    ];
    const days = dailyAccuracy(samples, TOL, (t) => new Date(t).toISOString().slice(0, 10));
    expect(days.map((d) => [d.day, d.count, d.withinShare])).toEqual([['2026-11-03', 2, 1], ['2026-11-04', 1, 0]]);
    expect(days[0].meanDx).toBeCloseTo(0.002, 12);
    expect(summarizeAccuracy([], TOL)).toBeNull();
  });
});
