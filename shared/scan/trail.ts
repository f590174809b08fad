// Robot trails for the map's paths layer: the base poses of a robot's scans, thinned as they
// arrive so that a day of driving stays small, and split into tracks where the robot was not seen.

/** Kept poses of one robot: time (ms since the epoch) and map position (metres), in arrival order. */
export interface TrailPoints {
  t: number[];
  x: number[];
  y: number[];
}

/** How the thinning keeps poses (product choices: a path drawn at site scale needs no finer step). */
export interface TrailRule {
  /** A pose is kept once the robot is this far from the last kept one, metres. */
  minStepM: number;
  /** A pose is kept this long after the last kept one even when the robot stands, ms. */
  heartbeatMs: number;
}

export const TRAIL_RULE: TrailRule = { minStepM: 1, heartbeatMs: 30_000 };

/** Thins one robot's poses: keeps the first, then each that moved `minStepM` or came `heartbeatMs` after the last kept one. */
export class TrailThinner {
  readonly points: TrailPoints = { t: [], x: [], y: [] };
  private last: { t: number; x: number; y: number } | null = null;

  constructor(private readonly rule: TrailRule = TRAIL_RULE) {}

  add(t: number, x: number, y: number): void {
    const last = this.last;
    if (last && Math.abs(t - last.t) < this.rule.heartbeatMs && Math.hypot(x - last.x, y - last.y) < this.rule.minStepM) return;
    this.last = { t, x, y };
    this.points.t.push(t);
    this.points.x.push(x);
    this.points.y.push(y);
  }
}

/** Where a track breaks: a gap in time (the robot sent nothing) or a jump in place (relocalized). */
export interface TrackBreaks {
  maxGapMs: number;
  maxJumpM: number;
}

/** Two heartbeats without a pose mean the robot was not scanning; 5 m between kept poses is no drive at 1 m steps. */
export const TRACK_BREAKS: TrackBreaks = { maxGapMs: 2 * TRAIL_RULE.heartbeatMs, maxJumpM: 5 };

/**
 * Sorts poses by time and splits them into tracks of [x, y] at every gap or jump; tracks of a single
 * pose are dropped (nothing to draw). Positions are rounded to centimetres.
 */
export function splitTracks(points: TrailPoints, breaks: TrackBreaks = TRACK_BREAKS): Array<Array<[number, number]>> {
  const order = points.t.map((_, k) => k).sort((a, b) => points.t[a] - points.t[b]);
  const tracks: Array<Array<[number, number]>> = [];
  let track: Array<[number, number]> = [];
  let prev = -1;
  for (const k of order) {
    if (prev >= 0 && (points.t[k] - points.t[prev] > breaks.maxGapMs || Math.hypot(points.x[k] - points.x[prev], points.y[k] - points.y[prev]) > breaks.maxJumpM)) {
      if (track.length > 1) tracks.push(track);
      track = [];
    }
    track.push([Math.round(points.x[k] * 100) / 100, Math.round(points.y[k] * 100) / 100]);
    prev = k;
  }
  if (track.length > 1) tracks.push(track);
  return tracks;
}

/** Packs poses as little-endian float64 time, float32 x, float32 y (16 bytes a pose). */
export function encodeTrail(points: TrailPoints): Uint8Array {
  const n = points.t.length;
  const out = new Uint8Array(16 * n);
  const view = new DataView(out.buffer);
  for (let k = 0; k < n; k++) {
    view.setFloat64(16 * k, points.t[k], true);
    view.setFloat32(16 * k + 8, points.x[k], true);
    view.setFloat32(16 * k + 12, points.y[k], true);
  }
  return out;
}

/** Reads what `encodeTrail` packed; a length that is not a whole number of poses is refused. */
export function decodeTrail(bytes: Uint8Array): TrailPoints {
  if (bytes.length % 16 !== 0) throw new Error(`A packed trail must be a multiple of 16 bytes, not ${bytes.length}.`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const points: TrailPoints = { t: [], x: [], y: [] };
  for (let o = 0; o < bytes.length; o += 16) {
    points.t.push(view.getFloat64(o, true));
    points.x.push(view.getFloat32(o + 8, true));
    points.y.push(view.getFloat32(o + 12, true));
  }
  return points;
}

/**
 * Simplifies a track by the Ramer–Douglas–Peucker rule (Ramer 1972; Douglas & Peucker 1973): keeps
 * the ends and, recursively, the pose farthest from the chord while it lies more than `toleranceM`
 * from it. Straight aisle runs collapse to their ends; corners stay, so no line cuts across racks.
 */
export function simplifyTrack(track: Array<[number, number]>, toleranceM: number): Array<[number, number]> {
  if (track.length <= 2) return track.slice();
  const n = track.length;
  const keep = new Uint8Array(n);
  keep[0] = 1;
  keep[n - 1] = 1;
  // Flat coordinates and squared distances: the inner loop runs millions of times for a day's
  // track, and comparing squares keeps the same poses as comparing distances.
  const xs = new Float64Array(n);
  const ys = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    xs[k] = track[k][0];
    ys[k] = track[k][1];
  }
  // An explicit stack instead of recursion: a day's track can hold tens of thousands of poses.
  const stack: number[] = [0, n - 1];
  while (stack.length > 0) {
    const last = stack.pop()!;
    const first = stack.pop()!;
    const ax = xs[first];
    const ay = ys[first];
    const dx = xs[last] - ax;
    const dy = ys[last] - ay;
    const len2 = dx * dx + dy * dy;
    let worst = -1;
    let worstSquared = toleranceM * toleranceM;
    for (let k = first + 1; k < last; k++) {
      // Squared distance from pose k to the segment first–last (to its nearer end beyond the ends).
      const px = xs[k] - ax;
      const py = ys[k] - ay;
      const u = len2 === 0 ? 0 : Math.max(0, Math.min(1, (px * dx + py * dy) / len2));
      const ex = px - u * dx;
      const ey = py - u * dy;
      const d2 = ex * ex + ey * ey;
      if (d2 > worstSquared) {
        worst = k;
        worstSquared = d2;
      }
    }
    if (worst < 0) continue;
    keep[worst] = 1;
    stack.push(first, worst, worst, last);
  }
  return track.filter((_, k) => keep[k] === 1);
}
