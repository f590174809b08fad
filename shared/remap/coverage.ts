/**
 * Coverage estimate of a remap run: a mapping robot re-drives the area in parallel lanes one
 * sweep width apart (a boustrophedon, "ox-turning" pattern: Choset, "Coverage path planning: the
 * boustrophedon cellular decomposition", 1997), so the lane length is the area divided by the
 * sweep width; driving between separate parts of the area adds a transit; the run's setup
 * (bringing the robot, starting and closing the mapping session) adds a fixed overhead.
 */

/** What a coverage estimate needs: area in m², sweep width in m, drive speed in m/s, transit in m, setup in minutes. */
export interface CoverageInput {
  areaM2: number;
  sweepWidthM: number;
  driveSpeedMps: number;
  /** Driving between the parts of the area, metres (0 for one part). */
  transitM: number;
  setupMinutes: number;
}

/** A coverage estimate: lane and total drive length in metres, minutes of driving, of setup and in all. */
export interface CoverageEstimate {
  areaM2: number;
  sweepWidthM: number;
  driveSpeedMps: number;
  laneLengthM: number;
  transitM: number;
  driveLengthM: number;
  driveMinutes: number;
  overheadMinutes: number;
  totalMinutes: number;
}

/** Returns the estimate: lanes = area / sweep width, drive = lanes + transit (m), minutes = drive / speed / 60 + setup. */
export function coverageEstimate(input: CoverageInput): CoverageEstimate {
  const { areaM2, sweepWidthM, driveSpeedMps, transitM, setupMinutes } = input;
  if (!(areaM2 >= 0) || !Number.isFinite(areaM2)) throw new RangeError(`The area must be zero or more square metres, got ${areaM2}.`);
  if (!(sweepWidthM > 0) || !Number.isFinite(sweepWidthM)) throw new RangeError(`The sweep width must be a positive number of metres, got ${sweepWidthM}.`);
  if (!(driveSpeedMps > 0) || !Number.isFinite(driveSpeedMps)) throw new RangeError(`The drive speed must be a positive number of metres per second, got ${driveSpeedMps}.`);
  if (!(transitM >= 0) || !Number.isFinite(transitM)) throw new RangeError(`The transit must be zero or more metres, got ${transitM}.`);
  if (!(setupMinutes >= 0) || !Number.isFinite(setupMinutes)) throw new RangeError(`The setup must be zero or more minutes, got ${setupMinutes}.`);
  const laneLengthM = areaM2 / sweepWidthM;
  const driveLengthM = laneLengthM + transitM;
  const driveMinutes = driveLengthM / driveSpeedMps / 60;
  return { areaM2, sweepWidthM, driveSpeedMps, laneLengthM, transitM, driveLengthM, driveMinutes, overheadMinutes: setupMinutes, totalMinutes: driveMinutes + setupMinutes };
}

/**
 * Length in metres of an open path through the points (the parts' centres), visiting the nearest
 * unvisited point next, starting from the first: a short tour, not always the shortest one.
 */
export function transitLength(points: readonly (readonly [number, number])[]): number {
  if (points.length < 2) return 0;
  const left = points.slice(1);
  let [x, y] = points[0];
  let total = 0;
  while (left.length > 0) {
    let best = 0;
    let bestD = Infinity;
    for (let k = 0; k < left.length; k++) {
      const d = Math.hypot(left[k][0] - x, left[k][1] - y);
      if (d < bestD) {
        bestD = d;
        best = k;
      }
    }
    total += bestD;
    [x, y] = left[best];
    left.splice(best, 1);
  }
  return total;
}
