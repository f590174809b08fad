/**
 * Seeded pseudo-random numbers for tests, so that every "random" case is the same on every run.
 * mulberry32 (a public-domain 32-bit generator, from memory) and Box–Muller normals
 * (Box & Muller, "A note on the generation of random normal deviates", 1958).
 */

/** Returns a function giving uniform numbers in [0, 1) from a 32-bit seed. */
export function seededUniform(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Returns a function giving standard normal numbers (mean 0, standard deviation 1) from a seed. */
export function seededNormal(seed: number): () => number {
  const uniform = seededUniform(seed);
  return () => {
    // 1 − u keeps the logarithm's argument in (0, 1].
    const u = 1 - uniform();
    const v = uniform();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
}

/** Random binary mask (1 with probability `density`) of width × height cells. */
export function randomMask(width: number, height: number, density: number, seed: number): Uint8Array {
  const uniform = seededUniform(seed);
  const mask = new Uint8Array(width * height);
  for (let k = 0; k < mask.length; k++) mask[k] = uniform() < density ? 1 : 0;
  return mask;
}
