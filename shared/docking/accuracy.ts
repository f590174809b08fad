/**
 * Docking accuracy against a station's tolerance: per docking the radial position error
 * √(dx² + dy²) and the heading error |dyaw|; per group of dockings (a day, the last week) the
 * mean offset vector, the 95th percentile of the radial error and the share of dockings within
 * both tolerances.
 */
import { quantile } from '../stats/quantile.js';

/** One docking's final offset: time (ms since the epoch), dx and dy in metres, dyaw in radians. */
export interface DockingSample {
  tMs: number;
  dx: number;
  dy: number;
  dyaw: number;
}

/** A station's tolerance: radial position in metres, heading in radians. */
export interface DockingTolerance {
  positionM: number;
  yawRad: number;
}

/** Accuracy of a group of dockings; lengths in metres, angles in radians. */
export interface AccuracySummary {
  count: number;
  /** Mean dx and dy, metres. */
  meanDx: number;
  meanDy: number;
  /** Length of the mean offset vector, metres: how far off the dockings sit on average. */
  meanOffset: number;
  /** 95th percentile of the radial error √(dx² + dy²), metres (Hyndman & Fan definition 7). */
  p95Radial: number;
  /** Mean dyaw, radians. */
  meanYaw: number;
  /** 95th percentile of |dyaw|, radians. */
  p95AbsYaw: number;
  /** Share of dockings within both the position and the heading tolerance, in [0, 1]. */
  withinShare: number;
}

/** Radial position error of a docking, metres. */
export const radialError = (s: Pick<DockingSample, 'dx' | 'dy'>): number => Math.hypot(s.dx, s.dy);

/** True when a docking lies within both tolerances (inclusive). */
export const withinTolerance = (s: DockingSample, tol: DockingTolerance): boolean => radialError(s) <= tol.positionM && Math.abs(s.dyaw) <= tol.yawRad;

/** Summarises a group of dockings against the tolerance; null for an empty group. */
export function summarizeAccuracy(samples: readonly DockingSample[], tol: DockingTolerance): AccuracySummary | null {
  const n = samples.length;
  if (n === 0) return null;
  let sx = 0;
  let sy = 0;
  let syaw = 0;
  let within = 0;
  const radial = new Float64Array(n);
  const absYaw = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const s = samples[k];
    sx += s.dx;
    sy += s.dy;
    syaw += s.dyaw;
    radial[k] = radialError(s);
    absYaw[k] = Math.abs(s.dyaw);
    if (withinTolerance(s, tol)) within++;
  }
  const meanDx = sx / n;
  const meanDy = sy / n;
  return { count: n, meanDx, meanDy, meanOffset: Math.hypot(meanDx, meanDy), p95Radial: quantile(radial, 0.95), meanYaw: syaw / n, p95AbsYaw: quantile(absYaw, 0.95), withinShare: within / n };
}

/** Per day (as `dayOf` names it, e.g. the site-local date), the accuracy of that day's dockings, oldest day first. */
export function dailyAccuracy(samples: readonly DockingSample[], tol: DockingTolerance, dayOf: (tMs: number) => string): Array<{ day: string } & AccuracySummary> {
  const byDay = new Map<string, DockingSample[]>();
  for (const s of samples) {
    const day = dayOf(s.tMs);
    let group = byDay.get(day);
    if (!group) byDay.set(day, (group = []));
    group.push(s);
  }
  return [...byDay.entries()].sort(([a], [b]) => a.localeCompare(b)).map(([day, group]) => ({ day, ...summarizeAccuracy(group, tol)! }));
}
