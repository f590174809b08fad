/**
 * Seeded pseudo-random numbers for the warehouse simulator: a small 32-bit generator
 * (mulberry32) with Box–Muller normal deviates. Not for cryptography; chosen because it is
 * tiny, fast and gives the same sequence on every JavaScript engine.
 */

/** A seeded generator; every method advances the same underlying 32-bit state. */
export interface Rng {
  /** Uniform number in [0, 1). */
  next(): number;
  /** Standard normal deviate (mean 0, standard deviation 1). */
  normal(): number;
  /** Normal deviate with mean 0 and standard deviation `sigma` (same unit as sigma). */
  gaussian(sigma: number): number;
  /** Uniform number in [min, max). */
  range(min: number, max: number): number;
  /** Uniform integer in [0, n). */
  int(n: number): number;
  /** True with probability `p` (0–1). */
  chance(p: number): boolean;
}

/** Mixes any number of integers into one 32-bit seed (unsigned); order matters. */
export function mixSeed(...parts: number[]): number {
  // A murmur3-style finalizer per part: a day's or a robot's stream must not depend on the
  // order in which other days or robots were generated, so each stream gets its own seed.
  let h = 0x9e3779b9;
  for (const part of parts) {
    let k = Math.imul((part | 0) ^ Math.floor(part / 0x100000000), 0xcc9e2d51);
    k = (k << 15) | (k >>> 17);
    h ^= Math.imul(k, 0x1b873593);
    h = ((h << 13) | (h >>> 19)) >>> 0;
    h = (Math.imul(h, 5) + 0xe6546b64) >>> 0;
  }
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/** Creates a generator from a 32-bit seed; the same seed always yields the same sequence. */
export function createRng(seed: number): Rng {
  let state = seed >>> 0;
  // Box–Muller makes deviates in pairs; keep the second for the next call.
  let spare = 0;
  let hasSpare = false;

  const next = (): number => {
    // mulberry32: one add, three xor-shift-multiply rounds.
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };

  const normal = (): number => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    // 1 − u keeps the logarithm's argument in (0, 1], never log(0).
    const u = 1 - next();
    const v = next();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    hasSpare = true;
    return r * Math.cos(2 * Math.PI * v);
  };

  return {
    next,
    normal,
    gaussian: (sigma) => sigma * normal(),
    range: (min, max) => min + (max - min) * next(),
    int: (n) => Math.floor(next() * n),
    chance: (p) => next() < p,
  };
}
