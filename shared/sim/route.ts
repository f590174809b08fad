/**
 * Closed waypoint loops that simulated robots drive at constant speed, and the pose along
 * them. Heading follows the current leg; corners are taken as sharp turns because scans are
 * snapshots and nothing here integrates motion.
 */

/** A closed loop of waypoints in metres (the last waypoint connects back to the first). */
export interface Route {
  /** Waypoints as x, y pairs, metres. */
  points: Float64Array;
  /** Distance from the first waypoint to waypoint k along the loop, metres (length = count + 1; last = loop length). */
  cumulative: Float64Array;
  /** Loop length in metres. */
  length: number;
}

/** Builds a closed route from waypoints given as [x, y] pairs in metres; throws on fewer than two distinct points. */
export function createRoute(waypoints: readonly (readonly [number, number])[]): Route {
  const n = waypoints.length;
  const points = new Float64Array(n * 2);
  const cumulative = new Float64Array(n + 1);
  waypoints.forEach(([x, y], k) => {
    points[2 * k] = x;
    points[2 * k + 1] = y;
  });
  for (let k = 0; k < n; k++) {
    const k1 = (k + 1) % n;
    cumulative[k + 1] = cumulative[k] + Math.hypot(points[2 * k1] - points[2 * k], points[2 * k1 + 1] - points[2 * k + 1]);
  }
  const length = cumulative[n];
  if (n < 2 || !(length > 0)) throw new RangeError('A route needs at least two distinct waypoints.');
  return { points, cumulative, length };
}

/** Pose [x, y, theta] (metres, radians in (−π, π]) at distance `s` metres along the loop; `s` wraps around. */
export function poseOnRoute(route: Route, s: number): [number, number, number] {
  const { points, cumulative, length } = route;
  let d = s % length;
  if (d < 0) d += length;
  const n = cumulative.length - 1;
  // Binary search for the leg: routes are short, but poses are asked for at every scan.
  let lo = 0;
  let hi = n - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (cumulative[mid] <= d) lo = mid;
    else hi = mid - 1;
  }
  const k = lo;
  const k1 = (k + 1) % n;
  const legLength = cumulative[k + 1] - cumulative[k];
  const ax = points[2 * k];
  const ay = points[2 * k + 1];
  const bx = points[2 * k1];
  const by = points[2 * k1 + 1];
  const f = legLength > 0 ? (d - cumulative[k]) / legLength : 0;
  return [ax + f * (bx - ax), ay + f * (by - ay), Math.atan2(by - ay, bx - ax)];
}
