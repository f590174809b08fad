import { createRng, mixSeed } from './random.js';
import type { Lane, WarehouseLayout } from './warehouse.js';

/** Someone or something moving back and forth along a straight stretch during part of the day. */
export interface Mover {
  /** Start and end of the stretch, metres. */
  x0: number;
  y0: number;
  x1: number;
  y1: number;
  /** Walking or driving speed, m/s. */
  speed: number;
  /** Distance already covered at `from`, metres (so movers do not start at an end). */
  phase: number;
  /** Seconds after the working day's start during which the mover is present. */
  from: number;
  to: number;
}

/** A day's transient traffic: people as discs, at most one forklift as an axis-aligned rectangle. */
export interface DayTraffic {
  people: Mover[];
  /** Radius of a person as the scanner sees them, metres. */
  personRadius: number;
  forklift: Mover | null;
  /** Forklift footprint along and across its direction of travel, metres. */
  forkliftLength: number;
  forkliftWidth: number;
}

/** How busy the floor is. */
export interface TrafficOptions {
  /** People walking the aisles per day (default 6). */
  peoplePerDay?: number;
  /** Chance (0–1) that a forklift drives through the staging band on a given day (default 0.5). */
  forkliftChance?: number;
}

/** Obstacles at one instant: discs (x, y, r) and rectangles (minX, minY, maxX, maxY) in metres. */
export interface TrafficSnapshot {
  circles: Float64Array;
  circleCount: number;
  boxes: Float64Array;
  boxCount: number;
}

// A person's torso/legs seen at scanner height ~0.3 m radius; walking ~1.2 m/s; a forklift
// ~2.5 m × 1.2 m driving ~2 m/s in a warehouse. Rough figures, from memory.
const PERSON_RADIUS = 0.3;
const FORKLIFT_LENGTH = 2.5;
const FORKLIFT_WIDTH = 1.2;

function pick(lane: Lane, rng: ReturnType<typeof createRng>): { x0: number; y0: number; x1: number; y1: number } {
  // A random stretch of the lane at a random offset across it: nobody walks the same line daily.
  const off = rng.range(-lane.halfWidth, lane.halfWidth);
  const len = Math.hypot(lane.x1 - lane.x0, lane.y1 - lane.y0);
  const ux = (lane.x1 - lane.x0) / len;
  const uy = (lane.y1 - lane.y0) / len;
  const a = rng.range(0, 0.5) * len;
  const b = a + rng.range(0.3, 0.5) * len;
  return { x0: lane.x0 + ux * a - uy * off, y0: lane.y0 + uy * a + ux * off, x1: lane.x0 + ux * b - uy * off, y1: lane.y0 + uy * b + ux * off };
}

/** Plans day `day`'s traffic for a working day of `daySeconds` seconds, seeded by `seed`. */
export function planTraffic(layout: WarehouseLayout, seed: number, day: number, daySeconds: number, options: TrafficOptions = {}): DayTraffic {
  const rng = createRng(mixSeed(seed, day, 0x7ea1));
  const people: Mover[] = [];
  const count = options.peoplePerDay ?? 6;
  for (let p = 0; p < count; p++) {
    const lane = layout.walkways[rng.int(layout.walkways.length)];
    const stretch = pick(lane, rng);
    const from = rng.range(0, daySeconds * 0.7);
    people.push({ ...stretch, speed: rng.range(0.9, 1.5), phase: rng.range(0, 20), from, to: from + rng.range(0.1, 0.3) * daySeconds });
  }
  let forklift: Mover | null = null;
  if (rng.chance(options.forkliftChance ?? 0.5)) {
    const stretch = pick(layout.forkliftLane, rng);
    const from = rng.range(0, daySeconds * 0.8);
    forklift = { ...stretch, speed: rng.range(1.5, 2.5), phase: rng.range(0, 30), from, to: from + rng.range(0.05, 0.2) * daySeconds };
  }
  return { people, personRadius: PERSON_RADIUS, forklift, forkliftLength: FORKLIFT_LENGTH, forkliftWidth: FORKLIFT_WIDTH };
}

/** Position [x, y] in metres of a mover `t` seconds after the working day's start, or null when absent. */
export function moverPosition(m: Mover, t: number): [number, number] | null {
  if (t < m.from || t > m.to) return null;
  const len = Math.hypot(m.x1 - m.x0, m.y1 - m.y0);
  if (len === 0) return [m.x0, m.y0];
  // Back and forth along the stretch: the covered distance folds into [0, len].
  let u = (m.phase + m.speed * (t - m.from)) % (2 * len);
  if (u > len) u = 2 * len - u;
  const f = u / len;
  return [m.x0 + f * (m.x1 - m.x0), m.y0 + f * (m.y1 - m.y0)];
}

/** Creates an empty snapshot with room for `maxCircles` discs and `maxBoxes` rectangles. */
export function createSnapshot(maxCircles: number, maxBoxes: number): TrafficSnapshot {
  return { circles: new Float64Array(maxCircles * 3), circleCount: 0, boxes: new Float64Array(maxBoxes * 4), boxCount: 0 };
}

/** Fills `out` with the obstacles present `t` seconds after the working day's start (metres); reuses its arrays. */
export function snapshotTraffic(traffic: DayTraffic, t: number, out: TrafficSnapshot): TrafficSnapshot {
  out.circleCount = 0;
  out.boxCount = 0;
  if (out.circles.length < traffic.people.length * 3) out.circles = new Float64Array(traffic.people.length * 3);
  for (const p of traffic.people) {
    const pos = moverPosition(p, t);
    if (!pos) continue;
    const o = out.circleCount++ * 3;
    out.circles[o] = pos[0];
    out.circles[o + 1] = pos[1];
    out.circles[o + 2] = traffic.personRadius;
  }
  const f = traffic.forklift;
  const pos = f ? moverPosition(f, t) : null;
  if (f && pos) {
    if (out.boxes.length < 4) out.boxes = new Float64Array(4);
    // The forklift drives along an axis-aligned lane, so its footprint stays axis-aligned.
    const alongX = Math.abs(f.x1 - f.x0) >= Math.abs(f.y1 - f.y0);
    const hx = (alongX ? traffic.forkliftLength : traffic.forkliftWidth) / 2;
    const hy = (alongX ? traffic.forkliftWidth : traffic.forkliftLength) / 2;
    out.boxes.set([pos[0] - hx, pos[1] - hy, pos[0] + hx, pos[1] + hy], 0);
    out.boxCount = 1;
  }
  return out;
}
