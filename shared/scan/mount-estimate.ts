/**
 * Estimates a scanner's mount error from its returns and the map: the correction δ = (dx, dy, dyaw),
 * expressed in the scanner's configured frame, such that the endpoints seen through the corrected
 * mount land on mapped structure. Robust Gauss–Newton (iteratively reweighted least squares) on the
 * map's distance field: each return's residual is the interpolated distance from its corrected
 * endpoint to the nearest mapped occupied cell, its Jacobian the field's gradient times ∂p/∂δ
 * (the same linearization as chamfer / distance-field scan matching, common practice).
 * Robust weights keep returns off real building changes (a new rack face) from pulling the fit.
 * ml-matrix solves the 3 × 3 normal equations.
 *
 * The corrected mount is `configured ∘ δ`: a point q seen by the scanner lies at
 * scannerPose ∘ δ ∘ q in the map frame.
 */
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { sampleDistanceGradient, type DistanceField } from '../grid/distance-transform.js';
import { frameU, frameV, makeGridFrame } from '../grid/transform.js';
import { huberWeight, median, tukeyWeight } from '../stats/robust.js';
import type { GridGeometry } from '../types/grid.js';

/**
 * Returns to fit, as flat typed arrays (no per-point objects). Memory: 20 bytes per point + 24 per scan.
 */
export interface MountSamples {
  /** Reported scanner poses in the map frame, [x, y, yaw] per scan: metres, metres, radians. */
  poses: Float64Array;
  /** Scan number (index into `poses` / 3) of each point. */
  scanOf: Uint32Array;
  /** Return endpoints in the scanner frame, [x, y] per point, metres. */
  points: Float64Array;
}

/** Options of `estimateMountError`; distances in metres. */
export interface MountEstimateOptions {
  /** Returns farther than this from mapped structure at the current estimate are ignored (default 0.5 m, a product choice). */
  maxDistance?: number;
  /** 'tukey' (default; starts with Huber iterations, then redescends), 'huber', or 'squared' (no robustness). */
  loss?: 'tukey' | 'huber' | 'squared';
  /** Floor of the residual scale, metres (default: a fifth of a cell), so weights stay sane on noise-free data. */
  minScale?: number;
  /** Most Gauss–Newton iterations in all (default 100). */
  maxIterations?: number;
  /** Converged when a step moves less than this, metres (default 1e-6) … */
  translationTolerance?: number;
  /** … and less than this, radians (default 1e-7). */
  rotationTolerance?: number;
}

/** Estimated mount correction with its uncertainty; translation in metres, rotation in radians. */
export interface MountEstimate {
  /** Correction along the scanner's configured x axis, metres. */
  dx: number;
  /** Correction along the scanner's configured y axis, metres. */
  dy: number;
  /** Correction of the scanner's yaw, radians (counter-clockwise positive). */
  dyaw: number;
  /** One standard deviation of each parameter from σ̂² (JᵀWJ)⁻¹: metres, metres, radians. */
  sigma: { dx: number; dy: number; dyaw: number };
  /** Robust residual scale σ̂ at the solution, metres. */
  residualScale: number;
  iterations: number;
  /** Returns that carried weight in the final fit. */
  inliers: number;
  converged: boolean;
}

/** Scratch buffers reused by every iteration, so the loop allocates nothing per point. */
interface Workspace {
  residual: Float64Array;
  jacobian: Float64Array;
  valid: Uint8Array;
  absResiduals: Float64Array;
}

type Loss = 'tukey' | 'huber' | 'squared';

/** Estimates the mount error (dx, dy metres; dyaw radians) that best lays the returns onto the map's distance field. */
export function estimateMountError(
  field: DistanceField,
  geometry: GridGeometry,
  samples: MountSamples,
  options: MountEstimateOptions = {},
): MountEstimate {
  validateSamples(field, geometry, samples);
  const maxDistance = options.maxDistance ?? 0.5;
  const loss = options.loss ?? 'tukey';
  const minScale = options.minScale ?? geometry.resolution / 5;
  const maxIterations = options.maxIterations ?? 100;
  const translationTolerance = options.translationTolerance ?? 1e-6;
  const rotationTolerance = options.rotationTolerance ?? 1e-7;

  const n = samples.scanOf.length;
  const work: Workspace = {
    residual: new Float64Array(n),
    jacobian: new Float64Array(3 * n),
    valid: new Uint8Array(n),
    absResiduals: new Float64Array(n),
  };
  const delta = new Float64Array(3);
  // A redescending loss from a poor start can lock onto the wrong structure; Huber's convex loss
  // first finds the basin, then Tukey's biweight drops the returns that do not fit at all.
  const phases: Loss[] = loss === 'tukey' ? ['huber', 'tukey'] : [loss];
  let iterations = 0;
  let converged = false;
  for (const phase of phases) {
    converged = false;
    while (iterations < maxIterations) {
      iterations++;
      const system = buildSystem(field, geometry, samples, delta, work, phase, maxDistance, minScale);
      const step = solve3(system.normal, system.gradient).step;
      delta[0] -= step[0];
      delta[1] -= step[1];
      delta[2] -= step[2];
      if (Math.hypot(step[0], step[1]) < translationTolerance && Math.abs(step[2]) < rotationTolerance) {
        converged = true;
        break;
      }
    }
  }

  // Uncertainty at the solution: linearize once more with the final weights.
  const final = buildSystem(field, geometry, samples, delta, work, phases[phases.length - 1], maxDistance, minScale);
  if (final.inliers <= 3) {
    throw new RangeError(`Only ${final.inliers} returns lie near mapped structure; at least 4 are needed to estimate a mount.`);
  }
  const variance = final.weightedSquares / (final.inliers - 3);
  const { inverse } = solve3(final.normal, final.gradient);
  return {
    dx: delta[0],
    dy: delta[1],
    dyaw: delta[2],
    sigma: {
      dx: Math.sqrt(variance * inverse.get(0, 0)),
      dy: Math.sqrt(variance * inverse.get(1, 1)),
      dyaw: Math.sqrt(variance * inverse.get(2, 2)),
    },
    residualScale: Math.sqrt(variance),
    iterations,
    inliers: final.inliers,
    converged,
  };
}

interface NormalSystem {
  /** JᵀWJ, row-major 3 × 3. */
  normal: Float64Array;
  /** JᵀWr. */
  gradient: Float64Array;
  weightedSquares: number;
  inliers: number;
}

/** Residuals, Jacobians and robust weights at `delta`, accumulated into the 3 × 3 normal equations. */
function buildSystem(
  field: DistanceField,
  geometry: GridGeometry,
  samples: MountSamples,
  delta: Float64Array,
  work: Workspace,
  loss: Loss,
  maxDistance: number,
  minScale: number,
): NormalSystem {
  const { poses, scanOf, points } = samples;
  const { residual, jacobian, valid, absResiduals } = work;
  const frame = makeGridFrame(geometry);
  const resolution = geometry.resolution;
  const cd = Math.cos(delta[2]);
  const sd = Math.sin(delta[2]);
  const sample = new Float64Array(3);
  let count = 0;
  for (let k = 0; k < scanOf.length; k++) {
    valid[k] = 0;
    const s = scanOf[k];
    const px = poses[3 * s];
    const py = poses[3 * s + 1];
    const ct = Math.cos(poses[3 * s + 2]);
    const st = Math.sin(poses[3 * s + 2]);
    const qx = points[2 * k];
    const qy = points[2 * k + 1];
    // Point in the reported scanner frame after the mount correction: R(dyaw) q + (dx, dy).
    const sx = cd * qx - sd * qy + delta[0];
    const sy = sd * qx + cd * qy + delta[1];
    const wx = px + ct * sx - st * sy;
    const wy = py + st * sx + ct * sy;
    if (!sampleDistanceGradient(field, frameU(frame, wx, wy), frameV(frame, wx, wy), sample)) continue;
    const r = sample[0] * resolution;
    if (r > maxDistance) continue;
    // Field gradient in cells per cell is metres per metre; rotate it from the grid frame to the map frame.
    const gx = frame.cos * sample[1] - frame.sin * sample[2];
    const gy = frame.sin * sample[1] + frame.cos * sample[2];
    // ∂p/∂dx = R(θ) e_x, ∂p/∂dy = R(θ) e_y, ∂p/∂dyaw = R(θ) R'(dyaw) q.
    const ax = -sd * qx - cd * qy;
    const ay = cd * qx - sd * qy;
    jacobian[3 * k] = gx * ct + gy * st;
    jacobian[3 * k + 1] = -gx * st + gy * ct;
    jacobian[3 * k + 2] = gx * (ct * ax - st * ay) + gy * (st * ax + ct * ay);
    residual[k] = r;
    valid[k] = 1;
    absResiduals[count++] = r;
  }
  if (count < 4) {
    throw new RangeError(`Only ${count} returns lie near mapped structure; at least 4 are needed to estimate a mount.`);
  }
  // Residuals are unsigned distances, so the median of |r| / 0.6745 (1.4826 × median) estimates σ directly.
  const scale = Math.max(minScale, 1.4826 * median(absResiduals.subarray(0, count)));
  const normal = new Float64Array(9);
  const gradient = new Float64Array(3);
  let weightedSquares = 0;
  let inliers = 0;
  for (let k = 0; k < scanOf.length; k++) {
    if (valid[k] === 0) continue;
    const r = residual[k];
    const w = robustWeight(r / scale, loss);
    if (w === 0) continue;
    inliers++;
    weightedSquares += w * r * r;
    const j0 = jacobian[3 * k];
    const j1 = jacobian[3 * k + 1];
    const j2 = jacobian[3 * k + 2];
    normal[0] += w * j0 * j0;
    normal[1] += w * j0 * j1;
    normal[2] += w * j0 * j2;
    normal[4] += w * j1 * j1;
    normal[5] += w * j1 * j2;
    normal[8] += w * j2 * j2;
    gradient[0] += w * j0 * r;
    gradient[1] += w * j1 * r;
    gradient[2] += w * j2 * r;
  }
  normal[3] = normal[1];
  normal[6] = normal[2];
  normal[7] = normal[5];
  return { normal, gradient, weightedSquares, inliers };
}

/** IRLS weight of a residual u given in scale units (dimensionless, in [0, 1]). */
function robustWeight(u: number, loss: Loss): number {
  if (loss === 'squared') return 1;
  return loss === 'huber' ? huberWeight(u) : tukeyWeight(u);
}

/** Solves the 3 × 3 normal equations with ml-matrix's Cholesky; returns the step and the inverse. */
function solve3(normal: Float64Array, gradient: Float64Array): { step: Float64Array; inverse: Matrix } {
  const a = new Matrix([
    [normal[0], normal[1], normal[2]],
    [normal[3], normal[4], normal[5]],
    [normal[6], normal[7], normal[8]],
  ]);
  const cholesky = new CholeskyDecomposition(a);
  if (!cholesky.isPositiveDefinite()) {
    // E.g. every return on one straight wall: motion along the wall changes nothing.
    throw new RangeError('The returns do not pin down all of dx, dy and dyaw (too few distinct surfaces in view).');
  }
  const x = cholesky.solve(Matrix.columnVector([gradient[0], gradient[1], gradient[2]]));
  return {
    step: Float64Array.of(x.get(0, 0), x.get(1, 0), x.get(2, 0)),
    inverse: cholesky.solve(Matrix.eye(3)),
  };
}

function validateSamples(field: DistanceField, geometry: GridGeometry, samples: MountSamples): void {
  if (field.width !== geometry.width || field.height !== geometry.height) {
    throw new RangeError(
      `The distance field is ${field.width} × ${field.height} cells but the grid is ${geometry.width} × ${geometry.height}.`,
    );
  }
  const { poses, scanOf, points } = samples;
  if (poses.length % 3 !== 0) throw new RangeError(`Scanner poses need 3 numbers each (x, y, yaw); got ${poses.length} numbers.`);
  if (points.length !== 2 * scanOf.length) {
    throw new RangeError(`Got ${scanOf.length} scan numbers but ${points.length / 2} points; they must pair up.`);
  }
  const scans = poses.length / 3;
  for (let k = 0; k < scanOf.length; k++) {
    if (scanOf[k] >= scans) throw new RangeError(`Point ${k} refers to scan ${scanOf[k]}, but there are only ${scans} scans.`);
  }
}
