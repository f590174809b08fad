import { frameU, frameV, makeGridFrame } from '../grid/transform.js';
import type { GridGeometry } from '../types/grid.js';
import { isReturn, type ScanRecord } from './scan-record.js';
import { tracePass, traceBeam, TraceStatus } from './traverse.js';

/** Pose of a scanner in the robot base frame: x, y in metres, yaw in radians. */
export interface ScannerMount {
  x: number;
  y: number;
  yaw: number;
}

/** Hit and pass counters of a grid, one per cell, indexed j·width + i. Memory: 8 bytes per cell. */
export interface EvidenceCounters {
  hits: Uint32Array;
  passes: Uint32Array;
}

/** Options of accumulateScan. */
export interface AccumulateOptions {
  /** Count beams that went out without a return (null/NaN or ≥ rangeMax) as passes (default false). */
  countNoReturnAsPass?: boolean;
  /** Length in metres up to which a no-return beam is traced (default and cap: the scan's rangeMax). */
  maxNoReturnTraceM?: number;
  /**
   * Called for every return with its endpoint in map-frame metres and whether it fell in the grid;
   * lets the caller gather endpoints (e.g. for agreement) without this function allocating.
   */
  onReturn?: (xWorld: number, yWorld: number, inMap: boolean) => void;
}

/** Counts of one scan's beams. */
export interface ScanFigures {
  /** Beams in the scan. */
  beams: number;
  /** Beams with a return (rangeMin ≤ r < rangeMax). */
  returns: number;
  /** Returns whose endpoint lay outside the grid. */
  outOfMap: number;
  /** Beams traced through at least one grid cell (returns, plus no-return beams when counted). */
  traced: number;
}

/**
 * Adds one scan to the grid's hit/pass counters (exact traversal per beam, DESIGN §4.2): scanner
 * pose = base pose ∘ mount (identity when null); beam k's bearing θs + angleMin + k·angleIncrement
 * (radians). Returns the scan's beam counts. Allocates nothing per beam.
 */
export function accumulateScan(
  geom: GridGeometry,
  counters: EvidenceCounters,
  scan: ScanRecord,
  mount: ScannerMount | null,
  opts: AccumulateOptions = {},
): ScanFigures {
  const { width, height } = geom;
  if (counters.hits.length !== width * height || counters.passes.length !== width * height) {
    throw new RangeError(`Counters must hold ${width * height} cells (width × height) each.`);
  }
  const frame = makeGridFrame(geom);
  const [bx, by, bth] = scan.pose;
  // Compose base ∘ mount: the mount offset is expressed in the base frame, so rotate it by θ.
  const cb = Math.cos(bth);
  const sb = Math.sin(bth);
  const mx = mount ? mount.x : 0;
  const my = mount ? mount.y : 0;
  const sx = bx + cb * mx - sb * my;
  const sy = by + sb * mx + cb * my;
  const sth = bth + (mount ? mount.yaw : 0);

  const u0 = frameU(frame, sx, sy);
  const v0 = frameV(frame, sx, sy);
  const noReturnLength = Math.min(opts.maxNoReturnTraceM ?? scan.rangeMax, scan.rangeMax);
  const countNoReturn = opts.countNoReturnAsPass === true && noReturnLength > 0;
  const onReturn = opts.onReturn;
  const { hits, passes } = counters;
  const ranges = scan.ranges;
  const n = ranges.length;

  let returns = 0;
  let outOfMap = 0;
  let traced = 0;
  for (let k = 0; k < n; k++) {
    const r = ranges[k];
    const hasReturn = isReturn(scan, r);
    // Readings below rangeMin are invalid, not "open space": they never count as passes.
    const wentOut = !hasReturn && !(r < scan.rangeMin);
    if (!hasReturn && !(wentOut && countNoReturn)) continue;
    const bearing = sth + scan.angleMin + k * scan.angleIncrement;
    const length = hasReturn ? r : noReturnLength;
    const ex = sx + length * Math.cos(bearing);
    const ey = sy + length * Math.sin(bearing);
    const u1 = frameU(frame, ex, ey);
    const v1 = frameV(frame, ex, ey);
    if (hasReturn) {
      returns++;
      const status = traceBeam(u0, v0, u1, v1, width, height, hits, passes);
      if (status !== TraceStatus.OutsideMap) traced++;
      const inMap = status === TraceStatus.EndpointInMap;
      if (!inMap) outOfMap++;
      if (onReturn) onReturn(ex, ey, inMap);
    } else if (tracePass(u0, v0, u1, v1, width, height, passes) !== TraceStatus.OutsideMap) {
      traced++;
    }
  }
  return { beams: n, returns, outOfMap, traced };
}

/** Returns zeroed hit/pass counters for a grid (8 bytes per cell). */
export function createCounters(geom: GridGeometry): EvidenceCounters {
  return { hits: new Uint32Array(geom.width * geom.height), passes: new Uint32Array(geom.width * geom.height) };
}

/** Returns empty figures, the neutral element of addFigures. */
export function emptyFigures(): ScanFigures {
  return { beams: 0, returns: 0, outOfMap: 0, traced: 0 };
}

/** Adds figures b into a (in place) and returns a. */
export function addFigures(a: ScanFigures, b: ScanFigures): ScanFigures {
  a.beams += b.beams;
  a.returns += b.returns;
  a.outOfMap += b.outOfMap;
  a.traced += b.traced;
  return a;
}
