/**
 * Simulated docking results for the demo and tests (invented data): each robot of a site docks
 * at a station a few times a day within the site-local working hours, coming to rest off the
 * nominal pose by its own small bias plus noise; the station may be knocked (a step in the mean
 * offset on a given day) or creep (a steady drift), and some days may bring bursts of poor dockings.
 */
import { DateTime } from 'luxon';
import { createRng, mixSeed } from './random.js';

/** How a simulated station behaves; lengths in metres, angles in radians. */
export interface StationBehaviour {
  seed: number;
  /** Offset every docking shares (a model placed slightly off), [dx, dy]. */
  bias?: [number, number];
  /** The station is knocked on day `day` (0-based) at `hour` site time by [dx, dy] and dyaw. */
  step?: { day: number; hour: number; dx: number; dy: number; dyaw?: number };
  /** The mean offset creeps by [dx, dy] per day from day 0. */
  creepPerDay?: [number, number];
  /** Days (0-based) on which a third of the dockings are off by an extra N(0, burstSigma) per axis. */
  burstDays?: number[];
  burstSigma?: number;
}

/** One simulated docking: robot name, ISO time, ms, and the offset. */
export interface SimulatedDocking {
  robot: string;
  t: string;
  tMs: number;
  dx: number;
  dy: number;
  dyaw: number;
}

/** Noise of a docking about its mean, per axis (1.5 mm) and heading (0.2°): invented, of the order robots dock to (from memory). */
const POSITION_SIGMA = 0.0015;
const YAW_SIGMA = (0.2 * Math.PI) / 180;
/** Each robot's own docking bias, standard deviation per axis (0.8 mm): invented. */
const ROBOT_BIAS_SIGMA = 0.0008;
/** Working hours of the dockings, site-local (06:00–22:00). */
const HOURS: [number, number] = [6, 22];

/**
 * Dockings of `robots` at one station on `days` site-local days from `startDate` (YYYY-MM-DD)
 * in `timezone`: 0–3 per robot and day. Deterministic for a seed; in time order.
 */
export function simulateDockings(behaviour: StationBehaviour, robots: readonly string[], startDate: string, days: number, timezone: string): SimulatedDocking[] {
  const out: SimulatedDocking[] = [];
  const biasRng = createRng(mixSeed(behaviour.seed, 0));
  const robotBias = robots.map(() => [biasRng.gaussian(ROBOT_BIAS_SIGMA), biasRng.gaussian(ROBOT_BIAS_SIGMA)]);
  const [bx, by] = behaviour.bias ?? [0, 0];
  const bursts = new Set(behaviour.burstDays ?? []);
  const first = DateTime.fromISO(startDate, { zone: timezone }).startOf('day');
  const stepAt = behaviour.step ? first.plus({ days: behaviour.step.day }).set({ hour: Math.floor(behaviour.step.hour), minute: Math.round((behaviour.step.hour % 1) * 60) }).toMillis() : Infinity;
  for (let day = 0; day < days; day++) {
    const midnight = first.plus({ days: day });
    const open = midnight.set({ hour: HOURS[0] }).toMillis();
    const close = midnight.set({ hour: HOURS[1] }).toMillis();
    robots.forEach((robot, k) => {
      // One stream per robot and day, so adding a day or a robot leaves the others as they were.
      const rng = createRng(mixSeed(behaviour.seed, day + 1, k + 1));
      const count = rng.int(4);
      for (let n = 0; n < count; n++) {
        const tMs = Math.round(rng.range(open, close) / 1000) * 1000;
        const stepped = tMs >= stepAt && behaviour.step ? behaviour.step : null;
        const creep = behaviour.creepPerDay ?? [0, 0];
        const elapsed = (tMs - first.toMillis()) / 86_400_000;
        const extra = bursts.has(day) && rng.chance(1 / 3) ? (behaviour.burstSigma ?? 0.02) : 0;
        out.push({
          robot,
          t: new Date(tMs).toISOString(),
          tMs,
          dx: bx + robotBias[k][0] + (stepped?.dx ?? 0) + creep[0] * elapsed + rng.gaussian(POSITION_SIGMA) + rng.gaussian(extra),
          dy: by + robotBias[k][1] + (stepped?.dy ?? 0) + creep[1] * elapsed + rng.gaussian(POSITION_SIGMA) + rng.gaussian(extra),
          dyaw: (stepped?.dyaw ?? 0) + rng.gaussian(YAW_SIGMA),
        });
      }
    });
  }
  return out.sort((a, b) => a.tMs - b.tMs);
}
