import { describe, expect, it } from 'vitest';
import { DAY_MS, detectDrift } from '../../../../shared/docking/drift.js';
import { simulateDockings } from '../../../../shared/sim/docking.js';

const robots = ['AMR-01', 'AMR-02', 'AMR-03', 'AMR-04'];
const TOL = { positionM: 0.01, yawRad: Math.PI / 180 };

describe('simulated dockings', () => {
  it('when simulated twice with one seed, then the dockings are the same, in time order, within the working hours', () => {
    const a = simulateDockings({ seed: 5 }, robots, '2026-11-01', 28, 'Europe/London');
    const b = simulateDockings({ seed: 5 }, robots, '2026-11-01', 28, 'Europe/London');
    expect(a).toEqual(b);
    expect(a.length).toBeGreaterThan(28 * 4);
    for (let k = 1; k < a.length; k++) expect(a[k].tMs).toBeGreaterThanOrEqual(a[k - 1].tMs);
    // 06:00–22:00 London time is 06:00–22:00 UTC in November.
    for (const d of a) expect(new Date(d.tMs).getUTCHours()).toBeGreaterThanOrEqual(6);
    for (const d of a) expect(new Date(d.tMs).getUTCHours()).toBeLessThan(22);
  });

  it('when the station is knocked on day 23, then the dockings after it sit off by the step and the drift check flags it', () => {
    // Arrange
    const dockings = simulateDockings({ seed: 6, step: { day: 23, hour: 14.5, dx: 0.018, dy: -0.004 } }, robots, '2026-11-01', 28, 'Europe/London');
    const knock = Date.UTC(2026, 10, 24, 14, 30);
    const after = dockings.filter((d) => d.tMs >= knock);
    // Act
    const verdict = detectDrift(dockings, TOL, Date.UTC(2026, 10, 29), (t) => new Date(t).toISOString().slice(0, 10));
    // Assert
    expect(after.reduce((s, d) => s + d.dx, 0) / after.length).toBeGreaterThan(0.015);
    expect(verdict.state).toBe('drifting');
    expect(Math.abs(verdict.position!.step.atMs - knock)).toBeLessThan(DAY_MS);
  });

  it('when the station stays put, then it is not flagged, bursts of poor dockings included', () => {
    const dockings = simulateDockings({ seed: 7, bias: [0.002, 0.001], burstDays: [4, 17] }, robots, '2026-11-01', 28, 'Europe/London');
    expect(detectDrift(dockings, TOL, Date.UTC(2026, 10, 29), (t) => new Date(t).toISOString().slice(0, 10)).state).toBe('steady');
  });
});
