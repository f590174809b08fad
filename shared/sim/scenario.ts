import { DateTime } from 'luxon';
import { DEFAULT_FREE_THRESH, DEFAULT_OCCUPIED_THRESH } from '../grid/map-metadata.js';
import type { MapMetadata, OccupancyGrid } from '../types/grid.js';
import { planChanges, structureOnDay, surfaceDropout, type ChangeOptions, type ChangePlan, type ScriptedChange } from './changes.js';
import { buildFleet, defaultRobotOptions, type MountError, type RobotOptions, type SimMount, type SimRobot } from './fleet.js';
import { createRng, mixSeed } from './random.js';
import { poseOnRoute } from './route.js';
import { beamTable, castScan, safetyScannerModel, type ScannerModel } from './scanner.js';
import type { Box } from './shapes.js';
import { gridGeometryFor, rasterizeMappingRun } from './stored-map.js';
import { createSnapshot, planTraffic, snapshotTraffic, type DayTraffic, type TrafficOptions } from './traffic.js';
import { buildWarehouse, type WarehouseLayout, type WarehouseOptions } from './warehouse.js';
import { StaticWorld } from './world-index.js';

/** One pose report in its JSON-line form (no beams; it feeds the paths layer). */
export interface PoseLogLine {
  t: string;
  robot: string;
  pose: [number, number, number];
}

/** One scan in its JSON-line form (DESIGN §4.2), as `parseScanLine` reads it: pose in metres/radians, ranges in metres, null = no return. */
export interface ScanLogLine {
  t: string;
  robot: string;
  scanner: string;
  pose: [number, number, number];
  angleMin: number;
  angleIncrement: number;
  rangeMin: number;
  rangeMax: number;
  ranges: (number | null)[];
}

/** Sensor and localization noise (metres, radians, probabilities). */
export interface NoiseOptions {
  /** Range noise σ, metres (default 0.015: typical safety-scanner figure, from memory). */
  rangeSigma: number;
  /** Reported-pose noise σ per axis, metres (default 0.025: typical laser localization, from memory). */
  poseSigmaXY: number;
  /** Reported-heading noise σ, radians (default 0.3°: from memory). */
  poseSigmaYaw: number;
  /** Chance of a beam giving no return on any surface (default 0.005, invented). */
  dropout: number;
}

/** Everything a scenario can be told; only seed, days and startDate are required. */
export interface ScenarioOptions {
  /** Seed of every random choice; the same options give byte-identical output. */
  seed: number;
  /** Number of simulated days (1–366). */
  days: number;
  /** First day as an ISO date, e.g. "2026-11-02" (site-local calendar day). */
  startDate: string;
  /** IANA time zone of the site (default "UTC"); working hours are local. */
  siteTimezone?: string;
  /** Building size (default 60 m × 40 m). */
  site?: WarehouseOptions;
  /** Robot count or explicit robots (default 3: AMR-01 … AMR-03, AMR-03 with a rear scanner). */
  robots?: number | RobotOptions[];
  /** Scripted change days (defaults in ChangeOptions). */
  changes?: ChangeOptions;
  /** True mount errors of some scanners (default none). */
  mountErrors?: MountError[];
  /** Scans per robot per day, per scanner (default 240: one every 4 minutes over 16 hours). */
  scansPerRobotPerDay?: number;
  /** Keep every n-th beam of the 541 (default 1). */
  beamStep?: number;
  /** Local working hours [from, to), hours 0–24 (default [6, 22]). */
  workingHours?: [number, number];
  /** Noise figures (defaults in NoiseOptions). */
  noise?: Partial<NoiseOptions>;
  /** People and forklift traffic (defaults in TrafficOptions). */
  traffic?: TrafficOptions;
}

/** Ground truth of a scenario for tests and for judging the analysis (metres, radians, days). */
export interface ScenarioTruth {
  seed: number;
  startDate: string;
  siteTimezone: string;
  days: number;
  /** Site-local calendar date (ISO) of each scenario day, index = day number. */
  dayDates: string[];
  /** Scripted changes with their outline, the exact boxes that make them up (metres) and active days. */
  changes: (Omit<ScriptedChange, 'boxes'> & { parts: Box[] })[];
  /** Areas the stored map leaves unknown on purpose, metres. */
  blankedInMap: Box[];
  /** Each robot's configured mounts and its true mount errors (metres, radians). */
  robots: { name: string; mounts: SimMount[]; mountErrors: { scanner: string; dx: number; dy: number; dyaw: number }[] }[];
  noise: NoiseOptions;
}

/** A simulated site: stored map, truth, and a lazy per-day scan generator. */
export interface Scenario {
  /** The building. */
  layout: WarehouseLayout;
  /** The stored map: rasterization of the day-0 building as the mapping run saw it. */
  map: OccupancyGrid;
  /** Map metadata for map.yaml (image "map.pgm"). */
  metadata: MapMetadata;
  truth: ScenarioTruth;
  robots: SimRobot[];
  /** Scanner model used for every scanner (after beam decimation). */
  scanner: ScannerModel;
  /** The true static world of day `day` (0-based), indexed for ray casts. */
  worldForDay(day: number): StaticWorld;
  /** The transient traffic of day `day`. */
  trafficForDay(day: number): DayTraffic;
  /** UTC start and end of day `day`'s working hours, milliseconds since the epoch. */
  workingWindow(day: number): [number, number];
  /** Lazily generates day `day`'s scans in time order (all robots, all scanners). */
  scansForDay(day: number): Generator<ScanLogLine>;
  /** Pose reports of every robot every `stepMs` over a day's working window, on the same routes as that day's scans, in time order. */
  posesForDay(day: number, stepMs: number): Generator<PoseLogLine>;
}

/** Map resolution of the stored map, metres per cell (typical 5 cm: common practice). */
export const SIM_MAP_RESOLUTION = 0.05;

const DEFAULT_NOISE: NoiseOptions = { rangeSigma: 0.015, poseSigmaXY: 0.025, poseSigmaYaw: (0.3 * Math.PI) / 180, dropout: 0.005 };

/** Wraps an angle into (−π, π] radians. */
function wrapAngle(a: number): number {
  let w = a % (2 * Math.PI);
  if (w <= -Math.PI) w += 2 * Math.PI;
  else if (w > Math.PI) w -= 2 * Math.PI;
  return w;
}

function round(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}

function checkOptions(o: ScenarioOptions): void {
  if (!Number.isInteger(o.seed)) throw new RangeError(`The seed must be a whole number; got ${o.seed}.`);
  if (!Number.isInteger(o.days) || o.days < 1 || o.days > 366) throw new RangeError(`days must be a whole number from 1 to 366; got ${o.days}.`);
  if (!/^\d{4}-\d{2}-\d{2}$/.test(o.startDate) || !DateTime.fromISO(o.startDate, { zone: 'UTC' }).isValid) {
    throw new RangeError(`startDate must be an ISO date like 2026-11-02; got "${o.startDate}".`);
  }
  const zone = o.siteTimezone ?? 'UTC';
  if (!DateTime.now().setZone(zone).isValid) throw new RangeError(`"${zone}" is not a known time zone.`);
  const n = o.scansPerRobotPerDay ?? 240;
  if (!Number.isInteger(n) || n < 0 || n > 100_000) throw new RangeError(`scansPerRobotPerDay must be a whole number from 0 to 100000; got ${n}.`);
  const [h0, h1] = o.workingHours ?? [6, 22];
  if (!(h0 >= 0 && h1 <= 24 && h0 < h1)) throw new RangeError(`workingHours must satisfy 0 ≤ from < to ≤ 24; got [${h0}, ${h1}].`);
}

/** Creates a deterministic simulated site from `options` (see ScenarioOptions for defaults). */
export function createScenario(options: ScenarioOptions): Scenario {
  checkOptions(options);
  const { seed, days, startDate } = options;
  const zone = options.siteTimezone ?? 'UTC';
  const [h0, h1] = options.workingHours ?? [6, 22];
  const scansPerDay = options.scansPerRobotPerDay ?? 240;
  const noise: NoiseOptions = { ...DEFAULT_NOISE, ...options.noise };
  const layout = buildWarehouse(options.site);
  const robotOptions = typeof options.robots === 'number' || options.robots === undefined ? defaultRobotOptions(options.robots ?? 3) : options.robots;
  const robots = buildFleet(layout, robotOptions, options.mountErrors ?? []);
  const plan: ChangePlan = planChanges(layout, seed, days, options.changes);
  const scanner = safetyScannerModel(options.beamStep ?? 1, { rangeSigma: noise.rangeSigma, dropout: noise.dropout });
  const table = beamTable(scanner);

  // The mapping robot drove every route and aisle before day 0.
  const seeds: [number, number][] = [];
  for (const r of robots) for (let k = 0; k < r.route.points.length; k += 2) seeds.push([r.route.points[k], r.route.points[k + 1]]);
  for (const x of layout.aisleX) seeds.push([x, layout.crossAisleY]);
  seeds.push([(layout.openArea.minX + layout.openArea.maxX) / 2, (layout.openArea.minY + layout.openArea.maxY) / 2]);
  const geometry = gridGeometryFor({ minX: 0, minY: 0, maxX: layout.width, maxY: layout.depth }, SIM_MAP_RESOLUTION, 1);
  const map = rasterizeMappingRun(geometry, { structure: layout.structure, seeds, blanked: plan.blanked });
  const metadata: MapMetadata = {
    image: 'map.pgm',
    resolution: SIM_MAP_RESOLUTION,
    origin: [geometry.origin.x, geometry.origin.y, 0],
    negate: 0,
    occupiedThresh: DEFAULT_OCCUPIED_THRESH,
    freeThresh: DEFAULT_FREE_THRESH,
    mode: 'trinary',
  };

  const truth: ScenarioTruth = {
    seed,
    startDate,
    siteTimezone: zone,
    days,
    dayDates: Array.from({ length: days }, (_, d) => DateTime.fromISO(startDate, { zone }).plus({ days: d }).toISODate()!),
    changes: plan.changes.map(({ boxes, ...rest }) => ({ ...rest, parts: boxes.map(({ minX, minY, maxX, maxY }) => ({ minX, minY, maxX, maxY })) })),
    blankedInMap: plan.blanked,
    robots: robots.map((r) => ({
      name: r.name,
      mounts: r.mounts,
      mountErrors: r.trueMounts
        .map((t, k) => ({ scanner: t.name, dx: t.x - r.mounts[k].x, dy: t.y - r.mounts[k].y, dyaw: t.yaw - r.mounts[k].yaw }))
        .filter((e) => e.dx !== 0 || e.dy !== 0 || e.dyaw !== 0),
    })),
    noise,
  };

  const checkDay = (day: number): void => {
    if (!Number.isInteger(day) || day < 0 || day >= days) throw new RangeError(`day must be a whole number from 0 to ${days - 1}; got ${day}.`);
  };
  const worldForDay = (day: number): StaticWorld => {
    checkDay(day);
    return new StaticWorld(structureOnDay(layout, plan, day).map((s) => ({ ...s, dropout: surfaceDropout(s) })));
  };
  const workingWindow = (day: number): [number, number] => {
    checkDay(day);
    // Set the local wall-clock hour rather than adding hours to midnight: on a day when the
    // clocks change, midnight + 6 h is 05:00 or 07:00 local.
    const midnight = DateTime.fromISO(startDate, { zone }).plus({ days: day }).startOf('day');
    const at = (h: number): number =>
      h >= 24 ? midnight.plus({ days: 1 }).toMillis() : midnight.set({ hour: Math.floor(h), minute: Math.round((h % 1) * 60) }).toMillis();
    return [at(h0), at(h1)];
  };
  const trafficForDay = (day: number): DayTraffic => {
    const [a, b] = workingWindow(day);
    return planTraffic(layout, seed, day, (b - a) / 1000, options.traffic);
  };

  // A robot's scan times and route phase for a day, from its own random stream.
  const robotStream = (day: number, k: number, start: number, span: number) => {
    const r = robots[k];
    const rng = createRng(mixSeed(seed, day, k, 0x5ca4));
    const times = new Float64Array(scansPerDay);
    const step = span / Math.max(1, scansPerDay);
    for (let q = 0; q < scansPerDay; q++) times[q] = start + (q + rng.next()) * step;
    return { robot: r, rng, times, phase: rng.range(0, r.route.length), next: 0 };
  };

  function* posesForDay(day: number, stepMs: number): Generator<PoseLogLine> {
    const [start, end] = workingWindow(day);
    const phases = robots.map((_, k) => robotStream(day, k, start, end - start).phase);
    for (let tMs = start; tMs < end; tMs += stepMs) {
      const t = new Date(tMs).toISOString();
      for (let k = 0; k < robots.length; k++) {
        const r = robots[k];
        const [x, y, theta] = poseOnRoute(r.route, phases[k] + (r.speed * (tMs - start)) / 1000);
        yield { t, robot: r.name, pose: [round(x, 3), round(y, 3), round(wrapAngle(theta), 4)] };
      }
    }
  }

  function* scansForDay(day: number): Generator<ScanLogLine> {
    const world = worldForDay(day);
    const traffic = trafficForDay(day);
    const [start, end] = workingWindow(day);
    const span = end - start;
    // Each robot draws its scan times and noise from its own stream, so adding a robot or
    // generating days out of order changes nothing for the others.
    const streams = robots.map((r, k) => robotStream(day, k, start, span));
    const snapshot = createSnapshot(traffic.people.length, 1);
    const ranges = new Float64Array(scanner.beams);
    const angleMin = scanner.angleMin;
    const angleIncrement = scanner.angleIncrement;
    for (;;) {
      // Merge the robots' time-ordered streams so the day's log is in time order.
      let pick = -1;
      for (let k = 0; k < streams.length; k++) {
        const st = streams[k];
        if (st.next < st.times.length && (pick < 0 || st.times[st.next] < streams[pick].times[streams[pick].next])) pick = k;
      }
      if (pick < 0) return;
      const st = streams[pick];
      const tMs = Math.round(st.times[st.next++]);
      const r = st.robot;
      const elapsed = (tMs - start) / 1000;
      const [x, y, theta] = poseOnRoute(r.route, st.phase + r.speed * elapsed);
      snapshotTraffic(traffic, elapsed, snapshot);
      const t = new Date(tMs).toISOString();
      // The localizer's estimate: the true pose plus Gaussian error, shared by both scanners.
      const pose: [number, number, number] = [
        round(x + st.rng.gaussian(noise.poseSigmaXY), 4),
        round(y + st.rng.gaussian(noise.poseSigmaXY), 4),
        round(wrapAngle(theta + st.rng.gaussian(noise.poseSigmaYaw)), 5),
      ];
      const c = Math.cos(theta);
      const s = Math.sin(theta);
      for (const m of r.trueMounts) {
        const sx = x + c * m.x - s * m.y;
        const sy = y + s * m.x + c * m.y;
        castScan(world, snapshot, sx, sy, theta + m.yaw, scanner, table, st.rng, ranges);
        const out: (number | null)[] = new Array(scanner.beams);
        // Millimetre steps, as safety scanners report (common practice).
        for (let k = 0; k < scanner.beams; k++) out[k] = Number.isNaN(ranges[k]) ? null : Math.round(ranges[k] * 1000) / 1000;
        yield { t, robot: r.name, scanner: m.name, pose, angleMin, angleIncrement, rangeMin: scanner.rangeMin, rangeMax: scanner.rangeMax, ranges: out };
      }
    }
  }

  return { layout, map, metadata, truth, robots, scanner, worldForDay, trafficForDay, workingWindow, scansForDay, posesForDay };
}
