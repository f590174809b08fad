/**
 * Drift of a docking station: has the mean offset of its dockings moved, by a step (the station
 * was knocked) or a trend (a guide wears, a floor anchor works loose), far enough to matter
 * against the tolerance? Two rank tests, each robust to the odd bad docking:
 * - step: Pettitt's change-point test (Pettitt 1979) on each offset component of the dockings in
 *   time order; the step's size is the distance between the component medians before and after;
 * - trend: the Mann–Kendall test (Mann 1945; Kendall 1975) on the daily medians of each
 *   component, with the Theil–Sen line (Theil 1950; Sen 1968) projected forward.
 * Position (dx, dy) and heading (dyaw) are judged apart, each against its own tolerance; the
 * components of a channel share the significance level (Bonferroni).
 */
import { mannKendall } from '../stats/mann-kendall.js';
import { pettittTest } from '../stats/pettitt.js';
import { median } from '../stats/robust.js';
import { theilSen } from '../stats/theil-sen.js';
import type { DockingSample, DockingTolerance } from './accuracy.js';

/** Milliseconds per day. */
export const DAY_MS = 86_400_000;

/** Tuning of the drift check; every default is a product choice. */
export interface DriftOptions {
  /** Significance level of each test per channel, after the Bonferroni split over its components (default 0.01). */
  alpha: number;
  /** Fewest dockings for any verdict (default 20). */
  minResults: number;
  /** Fewest days with dockings for the trend test (default 5). */
  minDays: number;
  /** Fewest dockings on each side of a step (default 5). */
  minSegment: number;
  /** A step, or a trend's movement over the window, matters from this share of the tolerance on (default 0.5). */
  relevantShare: number;
  /** A trend matters when its projection passes the tolerance within this many days (default 14). */
  horizonDays: number;
  /** Days counted as "recent" for the present offset (default 7). */
  recentDays: number;
}

/** Product defaults of the drift check. */
export const DRIFT_DEFAULTS: DriftOptions = { alpha: 0.01, minResults: 20, minDays: 5, minSegment: 5, relevantShare: 0.5, horizonDays: 14, recentDays: 7 };

/** What is judged: the position offset (dx, dy; metres) or the heading offset (dyaw; radians). */
export type DriftChannel = 'position' | 'heading';

/** A step in a channel's mean offset; lengths in the channel's unit (metres or radians). */
export interface StepFinding {
  /** Pettitt p-value of the strongest component, times the channel's component count (capped at 1). */
  pValue: number;
  /** Time of the first docking after the step, ms since the epoch. */
  atMs: number;
  /** Dockings before the step. */
  splitAfter: number;
  /** Component medians before and after the step. */
  before: number[];
  after: number[];
  /** Length of after − before. */
  shift: number;
  /** Length of the medians after the step: how far off the dockings sit since. */
  offsetAfter: number;
  significant: boolean;
  /** Significant and at least relevantShare × tolerance. */
  relevant: boolean;
  /** Mean distance of the dockings from their segment's medians (the two-level model's misfit). */
  residual: number;
}

/** A trend in a channel's daily median offset; lengths in the channel's unit, rates per day. */
export interface TrendFinding {
  /** Mann–Kendall p-value of the strongest component, times the component count (capped at 1). */
  pValue: number;
  /** Theil–Sen slope per component, unit per day. */
  slopes: number[];
  /** Length of the slope vector: how fast the mean offset moves, unit per day. */
  speedPerDay: number;
  /** Length of the fitted mean offset now. */
  offsetNow: number;
  /** Length of the fitted mean offset `horizonDays` from now. */
  projected: number;
  /** When the fitted mean offset reaches the tolerance (ms; at or before now when it already has); null when it never does. */
  crossingMs: number | null;
  /** Days with dockings, and the days between the first and the last. */
  days: number;
  spanDays: number;
  significant: boolean;
  /** Significant, moved at least relevantShare × tolerance over the span, and projected beyond the tolerance within the horizon. */
  relevant: boolean;
  /** Mean distance of the dockings from the fitted line. */
  residual: number;
}

/** The verdict on one channel. */
export interface ChannelDrift {
  channel: DriftChannel;
  /** The channel's tolerance, metres or radians. */
  tolerance: number;
  /** Length of the component medians over the recent days, or null without recent dockings. */
  recentOffset: number | null;
  recentCount: number;
  step: StepFinding;
  /** Null with fewer than minDays days of dockings. */
  trend: TrendFinding | null;
  /** The finding behind a "drifting" state: the relevant one, or of two the one that fits better. */
  finding: 'step' | 'trend' | null;
  state: 'drifting' | 'out_of_tolerance' | 'steady';
}

/** drifting: a step or trend beyond the thresholds; out_of_tolerance: no drift, but the recent mean offset is beyond the tolerance. */
export type DriftState = 'drifting' | 'out_of_tolerance' | 'steady' | 'insufficient';

/** The verdict on a station's dockings. */
export interface DriftVerdict {
  state: DriftState;
  /** The time judged at, ms since the epoch. */
  atMs: number;
  results: number;
  days: number;
  /** The channel behind a drifting or out-of-tolerance state (position first), else null. */
  channel: DriftChannel | null;
  kind: 'step' | 'trend' | null;
  /** Null when the state is insufficient. */
  position: ChannelDrift | null;
  heading: ChannelDrift | null;
}

const norm = (v: number[]) => Math.hypot(...v);

function analyseStep(times: Float64Array, comps: Float64Array[], tolerance: number, o: DriftOptions): StepFinding {
  const tests = comps.map((c) => pettittTest(c, o.minSegment));
  let strongest = tests[0];
  for (const t of tests) if (t.pValue < strongest.pValue) strongest = t;
  // Pettitt's K judges whether there is a step; the standardized peak says where, so that a knock
  // two days ago is not placed in the middle of the window (which would blur the medians after it).
  const split = strongest.standardizedSplitAfter;
  const before = comps.map((c) => median(c.subarray(0, split)));
  const after = comps.map((c) => median(c.subarray(split)));
  const shift = norm(after.map((a, k) => a - before[k]));
  let residual = 0;
  for (let i = 0; i < times.length; i++) {
    const level = i < split ? before : after;
    residual += norm(comps.map((c, k) => c[i] - level[k]));
  }
  const pValue = Math.min(1, comps.length * strongest.pValue);
  const significant = pValue < o.alpha;
  return { pValue, atMs: times[split], splitAfter: split, before, after, shift, offsetAfter: norm(after), significant, relevant: significant && shift >= o.relevantShare * tolerance, residual: residual / times.length };
}

/** Smallest t ≥ 0 (days) with |v + s·t| = r, 0 when |v| ≥ r already, null when s = 0 and |v| < r. */
function crossingDays(v: number[], s: number[], r: number): number | null {
  const vv = v.reduce((a, x) => a + x * x, 0);
  if (vv >= r * r) return 0;
  const ss = s.reduce((a, x) => a + x * x, 0);
  if (ss === 0) return null;
  const vs = v.reduce((a, x, k) => a + x * s[k], 0);
  // |v + s t|² = r² ⇔ ss t² + 2 vs t + (vv − r²) = 0; with vv < r² the roots have opposite signs.
  return (-vs + Math.sqrt(vs * vs - ss * (vv - r * r))) / ss;
}

function analyseTrend(times: Float64Array, comps: Float64Array[], dayKeys: string[], tolerance: number, nowMs: number, o: DriftOptions): TrendFinding | null {
  const groups = new Map<string, number[]>();
  for (let i = 0; i < times.length; i++) {
    let g = groups.get(dayKeys[i]);
    if (!g) groups.set(dayKeys[i], (g = []));
    g.push(i);
  }
  if (groups.size < o.minDays) return null;
  const days = [...groups.values()].map((idx) => ({ x: median(idx.map((i) => times[i])) / DAY_MS, medians: comps.map((c) => median(idx.map((i) => c[i]))) })).sort((a, b) => a.x - b.x);
  const x = days.map((d) => d.x);
  const tests = comps.map((_, k) => mannKendall(days.map((d) => d.medians[k])));
  const lines = comps.map((_, k) => theilSen(x, days.map((d) => d.medians[k])));
  const slopes = lines.map((l) => l.slope);
  const at = (dayX: number) => lines.map((l) => l.intercept + l.slope * dayX);
  const nowX = nowMs / DAY_MS;
  const fittedNow = at(nowX);
  const pValue = Math.min(1, comps.length * Math.min(...tests.map((t) => t.pValue)));
  const significant = pValue < o.alpha;
  const spanDays = x[x.length - 1] - x[0];
  const speedPerDay = norm(slopes);
  const projected = norm(at(nowX + o.horizonDays));
  const cross = crossingDays(fittedNow, slopes, tolerance);
  let residual = 0;
  for (let i = 0; i < times.length; i++) {
    const fit = at(times[i] / DAY_MS);
    residual += norm(comps.map((c, k) => c[i] - fit[k]));
  }
  return {
    pValue,
    slopes,
    speedPerDay,
    offsetNow: norm(fittedNow),
    projected,
    crossingMs: cross === null ? null : cross === 0 ? Math.min(nowMs, firstCrossing(lines, tolerance, x[0], nowX) * DAY_MS) : nowMs + cross * DAY_MS,
    days: days.length,
    spanDays,
    significant,
    relevant: significant && speedPerDay * spanDays >= o.relevantShare * tolerance && projected >= tolerance,
    residual: residual / times.length,
  };
}

/** The first day (fractional, epoch days) in [from, to] on which the fitted offset reaches the tolerance; `to` if it never does. */
function firstCrossing(lines: Array<{ slope: number; intercept: number }>, tolerance: number, from: number, to: number): number {
  const v = lines.map((l) => l.intercept + l.slope * from);
  const t = crossingDays(v, lines.map((l) => l.slope), tolerance);
  return t === null ? to : Math.min(to, from + t);
}

function analyseChannel(channel: DriftChannel, samples: readonly DockingSample[], dayKeys: string[], tolerance: number, nowMs: number, o: DriftOptions): ChannelDrift {
  const n = samples.length;
  const times = Float64Array.from(samples, (s) => s.tMs);
  const comps = channel === 'position' ? [Float64Array.from(samples, (s) => s.dx), Float64Array.from(samples, (s) => s.dy)] : [Float64Array.from(samples, (s) => s.dyaw)];
  const step = analyseStep(times, comps, tolerance, o);
  const trend = analyseTrend(times, comps, dayKeys, tolerance, nowMs, o);
  let finding: ChannelDrift['finding'] = null;
  if (step.relevant && trend?.relevant) finding = step.residual <= trend.residual ? 'step' : 'trend';
  else if (step.relevant) finding = 'step';
  else if (trend?.relevant) finding = 'trend';
  const recentFrom = nowMs - o.recentDays * DAY_MS;
  const recent: number[] = [];
  for (let i = 0; i < n; i++) if (times[i] >= recentFrom) recent.push(i);
  const recentOffset = recent.length > 0 ? norm(comps.map((c) => median(recent.map((i) => c[i])))) : null;
  const state = finding ? 'drifting' : recentOffset !== null && recentOffset > tolerance ? 'out_of_tolerance' : 'steady';
  return { channel, tolerance, recentOffset, recentCount: recent.length, step, trend, finding, state };
}

/**
 * Judges a station's dockings (any order; metres and radians) against its tolerance at `nowMs`;
 * `dayOf` names the day of a time (the site-local date) for the daily medians of the trend test.
 */
export function detectDrift(samples: readonly DockingSample[], tol: DockingTolerance, nowMs: number, dayOf: (tMs: number) => string, options: Partial<DriftOptions> = {}): DriftVerdict {
  const o = { ...DRIFT_DEFAULTS, ...options };
  const sorted = [...samples].sort((a, b) => a.tMs - b.tMs);
  const dayKeys = sorted.map((s) => dayOf(s.tMs));
  const days = new Set(dayKeys).size;
  if (sorted.length < Math.max(o.minResults, 2 * o.minSegment)) return { state: 'insufficient', atMs: nowMs, results: sorted.length, days, channel: null, kind: null, position: null, heading: null };
  const position = analyseChannel('position', sorted, dayKeys, tol.positionM, nowMs, o);
  const heading = analyseChannel('heading', sorted, dayKeys, tol.yawRad, nowMs, o);
  const lead = [position, heading].find((c) => c.state === 'drifting') ?? [position, heading].find((c) => c.state === 'out_of_tolerance') ?? null;
  return { state: lead?.state ?? 'steady', atMs: nowMs, results: sorted.length, days, channel: lead?.channel ?? null, kind: lead?.finding ?? null, position, heading };
}
