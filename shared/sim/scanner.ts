import type { Rng } from './random.js';
import { rayBoxDistance, rayCircleDistance } from './shapes.js';
import type { TrafficSnapshot } from './traffic.js';
import type { StaticWorld } from './world-index.js';

/** A 2-D scanner's geometry and noise (radians, metres). */
export interface ScannerModel {
  /** Bearing of the first beam relative to the scanner's heading, radians. */
  angleMin: number;
  /** Angle between neighbouring beams, radians. */
  angleIncrement: number;
  /** Number of beams per scan. */
  beams: number;
  /** Shortest and longest reported range, metres; a range outside [rangeMin, rangeMax) is "no return". */
  rangeMin: number;
  rangeMax: number;
  /** Standard deviation of the Gaussian range noise, metres. */
  rangeSigma: number;
  /** Chance (0–1) that any beam gives no return regardless of surface. */
  dropout: number;
}

/**
 * Safety-laser-like figures: 270° field, 0.5° steps, 30 m range, 0.05 m minimum, σ 15 mm.
 * Typical datasheet figures of safety laser scanners, common practice, values from memory.
 */
export const SAFETY_SCANNER_FIGURES = {
  fieldOfView: (270 * Math.PI) / 180,
  angleStep: (0.5 * Math.PI) / 180,
  rangeMin: 0.05,
  rangeMax: 30,
  rangeSigma: 0.015,
  dropout: 0.005,
} as const;

/** Scanner model with the safety-laser figures; `beamStep` keeps every n-th beam (1 = all 541), a speed/size trade for demos. */
export function safetyScannerModel(beamStep = 1, overrides: Partial<Pick<ScannerModel, 'rangeSigma' | 'dropout' | 'rangeMax'>> = {}): ScannerModel {
  if (!Number.isInteger(beamStep) || beamStep < 1) throw new RangeError(`beamStep must be a whole number ≥ 1; got ${beamStep}.`);
  const f = SAFETY_SCANNER_FIGURES;
  const increment = f.angleStep * beamStep;
  return {
    angleMin: -f.fieldOfView / 2,
    angleIncrement: increment,
    // Round before floor: 270 / 0.5 is 540 steps, which float division may give as 539.999….
    beams: Math.floor(Math.round((f.fieldOfView / increment) * 1e6) / 1e6) + 1,
    rangeMin: f.rangeMin,
    rangeMax: overrides.rangeMax ?? f.rangeMax,
    rangeSigma: overrides.rangeSigma ?? f.rangeSigma,
    dropout: overrides.dropout ?? f.dropout,
  };
}

/** Unit beam directions relative to the scanner heading: cos and sin per beam (no units). */
export interface BeamTable {
  cos: Float64Array;
  sin: Float64Array;
}

/** Precomputes the beam directions of `model` so a scan needs no trigonometry per beam. */
export function beamTable(model: ScannerModel): BeamTable {
  const cos = new Float64Array(model.beams);
  const sin = new Float64Array(model.beams);
  for (let k = 0; k < model.beams; k++) {
    const a = model.angleMin + k * model.angleIncrement;
    cos[k] = Math.cos(a);
    sin[k] = Math.sin(a);
  }
  return { cos, sin };
}

/**
 * Casts one scan from scanner pose (sx, sy, syaw) (metres, radians) into `out` (metres, NaN =
 * no return) against the static world and the traffic snapshot. With `rng` null the ranges
 * are exact geometry (no noise, no dropout); otherwise Gaussian range noise and dropout apply.
 */
export function castScan(
  world: StaticWorld,
  traffic: TrafficSnapshot | null,
  sx: number,
  sy: number,
  syaw: number,
  model: ScannerModel,
  table: BeamTable,
  rng: Rng | null,
  out: Float64Array,
): Float64Array {
  const c = Math.cos(syaw);
  const s = Math.sin(syaw);
  const { rangeMin, rangeMax, rangeSigma, dropout } = model;
  const circles = traffic?.circles;
  const nCircles = traffic?.circleCount ?? 0;
  const boxes = traffic?.boxes;
  const nBoxes = traffic?.boxCount ?? 0;
  for (let k = 0; k < model.beams; k++) {
    // Rotate the precomputed beam direction by the scanner heading (angle addition).
    const dx = c * table.cos[k] - s * table.sin[k];
    const dy = s * table.cos[k] + c * table.sin[k];
    let d = world.cast(sx, sy, dx, dy, rangeMax);
    let surfaceDropout = world.lastHit >= 0 ? world.dropout[world.lastHit] : 0;
    // Traffic is a handful of shapes: testing them all per beam is cheaper than indexing them.
    for (let q = 0; q < nCircles; q++) {
      const o = q * 3;
      const t = rayCircleDistance(sx, sy, dx, dy, circles![o], circles![o + 1], circles![o + 2]);
      if (t < d) {
        d = t;
        surfaceDropout = 0;
      }
    }
    for (let q = 0; q < nBoxes; q++) {
      const o = q * 4;
      const t = rayBoxDistance(sx, sy, dx, dy, boxes![o], boxes![o + 1], boxes![o + 2], boxes![o + 3]);
      if (t < d) {
        d = t;
        surfaceDropout = 0;
      }
    }
    if (rng) {
      if (d !== Infinity) d += rng.gaussian(rangeSigma);
      if (rng.next() < dropout || (surfaceDropout > 0 && rng.next() < surfaceDropout)) d = NaN;
    }
    out[k] = d >= rangeMin && d < rangeMax ? d : NaN;
  }
  return out;
}
