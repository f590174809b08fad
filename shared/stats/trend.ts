/**
 * Robust straight-line trend of a daily series (e.g. a site's health score per day), fitted by
 * iteratively reweighted least squares with Huber's loss (Huber, "Robust estimation of a location
 * parameter", Ann. Math. Statist. 35, 1964), so that a few odd days (an inventory count blocking the
 * aisles, a day with one robot's scanner fogged) do not tilt the forecast. The weighted normal
 * equations are solved with ml-matrix. The day a trend reaches a threshold comes with a Fieller
 * interval (Fieller, "Some problems in interval estimation", JRSS B 16, 1954).
 */
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { HUBER_K, huberWeight, mad } from './robust.js';
import { Z_95 } from './wilson.js';

/** Options of `fitTrend`: `loss` 'huber' (default) or 'squared' (ordinary least squares). */
export interface TrendOptions {
  loss?: 'huber' | 'squared';
  /** Huber tuning constant in residual-scale units (default 1.345). */
  huberK?: number;
  /** Most reweighting rounds (default 50). */
  maxIterations?: number;
  /** Stop when no coefficient moves by more than this relative amount (default 1e-10). */
  tolerance?: number;
}

/** A fitted line value ≈ intercept + slope · day; values' unit per day for the slope. */
export interface TrendFit {
  /** Change per day, in the series' unit per day. */
  slope: number;
  /** Fitted value at day 0, in the series' unit. */
  intercept: number;
  /** Standard error of the slope, series unit per day. */
  slopeSE: number;
  /** Standard error of the intercept, series unit. */
  interceptSE: number;
  /** Covariance of intercept and slope, series unit² per day. */
  covariance: number;
  /** Residual standard deviation estimate σ̂, series unit. */
  residualScale: number;
  /** Final weight of each day in [0, 1]; low weights mark the days treated as outliers. */
  weights: Float64Array;
  iterations: number;
  converged: boolean;
}

/** Day on which a fitted trend reaches a threshold, with its confidence range in days. */
export interface ThresholdCrossing {
  /** Point estimate, in the same day numbering as the fit's input (may be fractional). */
  day: number;
  /** Earliest plausible day; −Infinity when the fit cannot bound it. */
  earliest: number;
  /** Latest plausible day; Infinity when the fit cannot bound it (slope not clearly non-zero). */
  latest: number;
}

/**
 * Fits value ≈ intercept + slope · day to a series (days in any numbering, e.g. days since an epoch;
 * values in any unit), robustly by default. Needs at least three points on two or more distinct days.
 */
export function fitTrend(days: ArrayLike<number>, values: ArrayLike<number>, options: TrendOptions = {}): TrendFit {
  const n = days.length;
  if (n !== values.length) throw new RangeError(`Got ${n} days but ${values.length} values; they must pair up.`);
  if (n < 3) throw new RangeError(`A trend with an uncertainty needs at least 3 days, got ${n}.`);
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(days[k]) || !Number.isFinite(values[k])) {
      throw new RangeError(`Day ${k} has a non-finite day or value (${days[k]}, ${values[k]}).`);
    }
  }
  const loss = options.loss ?? 'huber';
  const k = options.huberK ?? HUBER_K;
  const maxIterations = options.maxIterations ?? 50;
  const tolerance = options.tolerance ?? 1e-10;

  // Centre the days: epoch-style day numbers (~20 000) would otherwise make the normal equations
  // badly conditioned; the coefficients are mapped back at the end.
  let meanDay = 0;
  for (let i = 0; i < n; i++) meanDay += days[i];
  meanDay /= n;
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = days[i] - meanDay;

  const weights = new Float64Array(n).fill(1);
  const residuals = new Float64Array(n);
  let solution = solveWeighted(t, values, weights);
  let iterations = 0;
  let converged = loss === 'squared';
  while (loss === 'huber' && iterations < maxIterations) {
    iterations++;
    for (let i = 0; i < n; i++) residuals[i] = values[i] - (solution.a + solution.b * t[i]);
    const scale = mad(residuals);
    if (scale === 0) {
      // Most days lie exactly on the line: it is the fit, and the few others are outliers.
      converged = true;
      break;
    }
    for (let i = 0; i < n; i++) weights[i] = huberWeight(residuals[i] / scale, k);
    const next = solveWeighted(t, values, weights);
    const moved = Math.max(
      Math.abs(next.a - solution.a) / (1 + Math.abs(solution.a)),
      Math.abs(next.b - solution.b) / (1 + Math.abs(solution.b)),
    );
    solution = next;
    if (moved < tolerance) {
      converged = true;
      break;
    }
  }

  // σ̂² = Σ w r² / (n − 2): the weighted residual variance, which is the textbook s² when all w = 1.
  let weightedSquares = 0;
  for (let i = 0; i < n; i++) {
    const r = values[i] - (solution.a + solution.b * t[i]);
    weightedSquares += weights[i] * r * r;
  }
  const variance = weightedSquares / (n - 2);
  const { inverse } = solution;
  const varA = variance * inverse.get(0, 0);
  const varB = variance * inverse.get(1, 1);
  const covAB = variance * inverse.get(0, 1);
  // Back from centred days: intercept = a − b·t̄, so Var and Cov pick up t̄ terms.
  const intercept = solution.a - solution.b * meanDay;
  const varIntercept = varA + meanDay * meanDay * varB - 2 * meanDay * covAB;
  return {
    slope: solution.b,
    intercept,
    slopeSE: Math.sqrt(varB),
    interceptSE: Math.sqrt(Math.max(varIntercept, 0)),
    covariance: covAB - meanDay * varB,
    residualScale: Math.sqrt(variance),
    weights,
    iterations,
    converged,
  };
}

/** Fitted value of a trend on a day, in the series' unit. */
export function trendValue(fit: TrendFit, day: number): number {
  return fit.intercept + fit.slope * day;
}

/**
 * Day (same numbering as the fit) on which the trend reaches `threshold`, with a Fieller interval:
 * the days t whose fitted value's z-interval contains the threshold. Null when the slope is 0.
 */
export function thresholdCrossing(fit: TrendFit, threshold: number, z: number = Z_95): ThresholdCrossing | null {
  if (fit.slope === 0) return null;
  const day = (threshold - fit.intercept) / fit.slope;
  const varA = fit.interceptSE * fit.interceptSE;
  const varB = fit.slopeSE * fit.slopeSE;
  const d = fit.intercept - threshold;
  const z2 = z * z;
  // (d + b t)² = z² (Var a + 2 t Cov + t² Var b) as A t² + B t + C = 0.
  const A = fit.slope * fit.slope - z2 * varB;
  const B = 2 * (fit.slope * d - z2 * fit.covariance);
  const C = d * d - z2 * varA;
  if (A <= 0) {
    // The slope is not distinguishable from 0 at this z: the threshold may never be reached.
    return { day, earliest: -Infinity, latest: Infinity };
  }
  // A > 0 and the quadratic is ≤ 0 at the point estimate, so both roots are real and bracket it.
  const root = Math.sqrt(Math.max(B * B - 4 * A * C, 0));
  // Citardauq form for the smaller-magnitude root avoids cancellation when B² ≫ 4AC.
  const q = -0.5 * (B + Math.sign(B || 1) * root);
  const r1 = q / A;
  const r2 = q !== 0 ? C / q : r1;
  return { day, earliest: Math.min(r1, r2), latest: Math.max(r1, r2) };
}

interface WeightedSolution {
  a: number;
  b: number;
  /** (Xᵀ W X)⁻¹ for the centred design [1, t]. */
  inverse: Matrix;
}

function solveWeighted(t: Float64Array, values: ArrayLike<number>, weights: Float64Array): WeightedSolution {
  // Accumulate the 2 × 2 normal equations directly: an n × 2 design matrix would cost memory for nothing.
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let y0 = 0;
  let y1 = 0;
  for (let i = 0; i < t.length; i++) {
    const w = weights[i];
    s0 += w;
    s1 += w * t[i];
    s2 += w * t[i] * t[i];
    y0 += w * values[i];
    y1 += w * t[i] * values[i];
  }
  const normal = new Matrix([
    [s0, s1],
    [s1, s2],
  ]);
  const cholesky = new CholeskyDecomposition(normal);
  if (!cholesky.isPositiveDefinite()) {
    throw new RangeError('All days are the same (or carry no weight), so no slope can be fitted.');
  }
  const beta = cholesky.solve(Matrix.columnVector([y0, y1]));
  return { a: beta.get(0, 0), b: beta.get(1, 0), inverse: cholesky.solve(Matrix.eye(2)) };
}
