import { describe, expect, it } from 'vitest';
import { detectDrift, DAY_MS } from '../../../../shared/docking/drift.js';
import type { DockingSample } from '../../../../shared/docking/accuracy.js';
import { createRng } from '../../../../shared/sim/random.js';

// Synthetic dockings, invented for these tests: 28 days of about 12 dockings a day between 06:00
// and 22:00 UTC, each axis off by N(μ(t), 1.5 mm), heading by N(0, 0.2°). Tolerance 10 mm and 1°.
const START = Date.UTC(2026, 10, 1);
const NOW = START + 28 * DAY_MS;
const TOL = { positionM: 0.01, yawRad: (1 * Math.PI) / 180 };
const dayOf = (t: number) => new Date(t).toISOString().slice(0, 10);
const DEG = Math.PI / 180;

interface Shape {
  /** Mean dx and dy, metres, at a time (ms). */
  mean?: (t: number) => [number, number];
  meanYaw?: (t: number) => number;
  /** Extra noise for some dockings: returns a standard deviation in metres (0 for none). */
  burst?: (t: number, rng: ReturnType<typeof createRng>) => number;
}

function dockings(seed: number, shape: Shape = {}, days = 28, perDay = 12): DockingSample[] {
  const rng = createRng(seed);
  const out: DockingSample[] = [];
  for (let d = 0; d < days; d++) {
    for (let k = 0; k < perDay; k++) {
      const t = START + d * DAY_MS + rng.range(6, 22) * 3_600_000;
      const [mx, my] = shape.mean?.(t) ?? [0, 0];
      const extra = shape.burst?.(t, rng) ?? 0;
      out.push({ tMs: t, dx: mx + rng.gaussian(0.0015) + rng.gaussian(extra), dy: my + rng.gaussian(0.0015) + rng.gaussian(extra), dyaw: (shape.meanYaw?.(t) ?? 0) + rng.gaussian(0.2 * DEG) });
    }
  }
  return out;
}

describe('docking drift', () => {
  it('when stations dock steadily around their nominal pose, then none is flagged', () => {
    for (let seed = 1; seed <= 12; seed++) {
      // Arrange: a small constant offset of 2 mm, well inside the 10 mm tolerance.
      const samples = dockings(seed, { mean: () => [0.002, -0.001] });
      // Act
      const verdict = detectDrift(samples, TOL, NOW, dayOf);
      // Assert
      expect(verdict.state, `seed ${seed}`).toBe('steady');
      expect(verdict.position!.recentOffset!).toBeLessThan(0.004);
    }
  });

  it('when the station is knocked 20 mm (twice the tolerance) on day 21, then a step is flagged within a day of it', () => {
    // Arrange: the knock happens on 22 Nov at 10:00 UTC.
    const knock = START + 21 * DAY_MS + 10 * 3_600_000;
    const samples = dockings(7, { mean: (t) => (t < knock ? [0, 0] : [0.02, 0]) });
    // Act
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    // Assert: Pettitt's test (Pettitt 1979) places the change at the first docking after the knock.
    expect(verdict.state).toBe('drifting');
    expect(verdict.channel).toBe('position');
    expect(verdict.kind).toBe('step');
    const step = verdict.position!.step;
    expect(Math.abs(step.atMs - knock)).toBeLessThan(DAY_MS);
    expect(step.shift).toBeGreaterThan(0.018);
    expect(step.shift).toBeLessThan(0.022);
    expect(step.pValue).toBeLessThan(1e-6);
  });

  it('when the station creeps 12 mm over the four weeks, then a trend is flagged with its rate and the day it passed the tolerance', () => {
    // Arrange: dx grows linearly by 12/28 mm a day from 0; it reaches 10 mm after 23.3 days.
    const rate = 0.012 / 28;
    const samples = dockings(9, { mean: (t) => [rate * ((t - START) / DAY_MS), 0] });
    // Act
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    // Assert: Theil–Sen slope (Sen 1968) of the daily medians; Mann–Kendall test (Mann 1945).
    expect(verdict.state).toBe('drifting');
    expect(verdict.kind).toBe('trend');
    const trend = verdict.position!.trend!;
    expect(trend.speedPerDay).toBeGreaterThan(rate * 0.8);
    expect(trend.speedPerDay).toBeLessThan(rate * 1.2);
    expect(trend.pValue).toBeLessThan(1e-4);
    expect(Math.abs(trend.crossingMs! - (START + 23.33 * DAY_MS))).toBeLessThan(2 * DAY_MS);
  });

  it('when the creep would stay within the tolerance for the next two weeks, then it is reported but not flagged', () => {
    // Arrange: 0 → 5 mm over 28 days; at this rate 7.5 mm two weeks from now.
    const samples = dockings(10, { mean: (t) => [(0.005 / 28) * ((t - START) / DAY_MS), 0] });
    // Act
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    // Assert
    expect(verdict.state).toBe('steady');
    const trend = verdict.position!.trend!;
    expect(trend.significant).toBe(true);
    expect(trend.projected).toBeLessThan(TOL.positionM);
    expect(trend.crossingMs!).toBeGreaterThan(NOW + 14 * DAY_MS);
  });

  it('when a few days bring bursts of wild dockings, then the station is not flagged', () => {
    // Arrange: on days 8, 15 and 24 a third of the dockings are off by an extra N(0, 25 mm) per axis.
    const burstDays = new Set([8, 15, 24]);
    const samples = dockings(11, { burst: (t, rng) => (burstDays.has(Math.floor((t - START) / DAY_MS)) && rng.chance(1 / 3) ? 0.025 : 0) });
    // Act
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    // Assert
    expect(verdict.state).toBe('steady');
    expect(verdict.position!.step.relevant).toBe(false);
  });

  it('when the heading steps by 2° (twice its tolerance), then the heading channel is flagged', () => {
    const turn = START + 18 * DAY_MS;
    const samples = dockings(12, { meanYaw: (t) => (t < turn ? 0 : 2 * DEG) });
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    expect(verdict.state).toBe('drifting');
    expect(verdict.channel).toBe('heading');
    expect(verdict.position!.state).toBe('steady');
    expect(Math.abs(verdict.heading!.step.atMs - turn)).toBeLessThan(DAY_MS);
  });

  it('when the dockings sit 14 mm off throughout, then the station is out of tolerance without a drift', () => {
    const samples = dockings(13, { mean: () => [0.014, 0] });
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    expect(verdict.state).toBe('out_of_tolerance');
    expect(verdict.kind).toBeNull();
    expect(verdict.position!.recentOffset!).toBeCloseTo(0.014, 3);
  });

  it('when there are fewer than 20 dockings, then there is no verdict', () => {
    const samples = dockings(14, {}, 3, 5);
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    expect(verdict).toMatchObject({ state: 'insufficient', results: 15, days: 3, position: null, heading: null });
  });

  it('when fewer than five days have dockings, then the step is still judged but no trend', () => {
    const samples = dockings(15, {}, 4, 10).map((s) => ({ ...s, tMs: s.tMs + 24 * DAY_MS }));
    const verdict = detectDrift(samples, TOL, NOW, dayOf);
    expect(verdict.state).toBe('steady');
    expect(verdict.position!.trend).toBeNull();
  });
});
