import { createRng } from '../../../../shared/sim/random.js';

/** Random binary mask of width × height cells, each cell 1 with probability `density`, from a fixed seed. */
export function randomMask(width: number, height: number, density: number, seed: number): Uint8Array {
  const rng = createRng(seed);
  const mask = new Uint8Array(width * height);
  for (let k = 0; k < mask.length; k++) mask[k] = rng.chance(density) ? 1 : 0;
  return mask;
}
