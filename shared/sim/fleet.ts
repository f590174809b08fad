import type { ScannerMount } from '../scan/accumulate.js';
import { createRoute, type Route } from './route.js';
import type { WarehouseLayout } from './warehouse.js';

/** A named scanner's mounting pose in the robot frame: metres and radians (x forward, y left). */
export interface SimMount extends ScannerMount {
  /** Scanner name as it appears in scan records, e.g. "front". */
  name: string;
}

/** The difference between a scanner's true and configured mount (metres, radians). */
export interface MountError {
  /** Robot name, e.g. "AMR-02". */
  robot: string;
  /** Scanner name (default "front"). */
  scanner?: string;
  dx?: number;
  dy?: number;
  /** Yaw error, radians (positive turns the scanner counter-clockwise). */
  dyaw?: number;
}

/** How to equip one simulated robot. */
export interface RobotOptions {
  /** Robot name, e.g. "AMR-01". */
  name: string;
  /** Whether it carries a second, rear-facing scanner (default false). */
  rearScanner?: boolean;
  /** Driving speed along its route, m/s (default 1.2). */
  speed?: number;
}

/** A simulated robot: its configured mounts, the true mounts it really has, and its route. */
export interface SimRobot {
  name: string;
  /** Mounts as configured (what the fleet manager and Driftline are told). */
  mounts: SimMount[];
  /** Mounts as they really are (configured + mount error). */
  trueMounts: SimMount[];
  route: Route;
  /** Driving speed, m/s. */
  speed: number;
}

// Front scanner 0.45 m ahead of the base centre, rear one 0.45 m behind facing back: a
// plausible layout for a 1 m long AMR with two corner-free scanners, invented for the demo.
const FRONT: SimMount = { name: 'front', x: 0.45, y: 0, yaw: 0 };
const REAR: SimMount = { name: 'rear', x: -0.45, y: 0, yaw: Math.PI };
const DEFAULT_SPEED = 1.2;

/** Default fleet: "AMR-01" … "AMR-0n", the third carrying a rear scanner. */
export function defaultRobotOptions(count: number): RobotOptions[] {
  if (!Number.isInteger(count) || count < 1 || count > 20) throw new RangeError(`A site needs 1–20 robots; got ${count}.`);
  return Array.from({ length: count }, (_, k) => ({ name: `AMR-${String(k + 1).padStart(2, '0')}`, rearScanner: k === 2 }));
}

/** Waypoint loop (metres) for the robot at position `index` in the fleet: aisle loops, then the open-area loop. */
export function routeWaypoints(layout: WarehouseLayout, index: number): [number, number][] {
  const ax = layout.aisleX;
  const last = ax.length - 1;
  const ys = layout.stagingLaneY;
  const yn = layout.northAisleY;
  // Aisle pairs per fleet position: up one aisle, along the north aisle, down another, back
  // along the staging lane. The third robot patrols the open area east of the racks.
  const pairs: [number, number][] = [
    [0, 3],
    [4, 7],
    [-1, -1],
    [1, 6],
    [2, 5],
    [0, last],
  ];
  const [a, b] = pairs[index % pairs.length];
  if (a < 0) {
    const xe = layout.openArea.maxX - 3.2;
    const yt = layout.openArea.maxY - 1.5;
    return [
      [ax[last], ys],
      [xe, ys],
      [xe, yt],
      [ax[last], yt],
    ];
  }
  const xa = ax[Math.min(a, last)];
  const xb = ax[Math.min(b, last)];
  return [
    [xa, ys],
    [xa, yn],
    [xb, yn],
    [xb, ys],
  ];
}

/** Builds the fleet from robot options and mount errors; throws on a mount error naming no robot or scanner. */
export function buildFleet(layout: WarehouseLayout, robots: readonly RobotOptions[], errors: readonly MountError[] = []): SimRobot[] {
  const names = new Set<string>();
  const fleet = robots.map((r, index) => {
    if (names.has(r.name)) throw new RangeError(`Robot name "${r.name}" is used twice.`);
    names.add(r.name);
    const mounts = r.rearScanner ? [{ ...FRONT }, { ...REAR }] : [{ ...FRONT }];
    return {
      name: r.name,
      mounts,
      trueMounts: mounts.map((m) => ({ ...m })),
      route: createRoute(routeWaypoints(layout, index)),
      speed: r.speed ?? DEFAULT_SPEED,
    };
  });
  for (const e of errors) {
    const robot = fleet.find((r) => r.name === e.robot);
    if (!robot) throw new RangeError(`A mount error names robot "${e.robot}", which is not in the fleet.`);
    const scanner = e.scanner ?? 'front';
    const m = robot.trueMounts.find((t) => t.name === scanner);
    if (!m) throw new RangeError(`A mount error names scanner "${scanner}", which robot "${e.robot}" does not carry.`);
    m.x += e.dx ?? 0;
    m.y += e.dy ?? 0;
    m.yaw += e.dyaw ?? 0;
  }
  return fleet;
}
