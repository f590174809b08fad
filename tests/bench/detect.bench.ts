import { distanceTransform } from '../../shared/grid/distance-transform.js';
import { labelComponents } from '../../shared/detect/labelling.js';
import { closing } from '../../shared/detect/morphology.js';
import { traceOutline } from '../../shared/detect/outline.js';
import { createRng } from '../../shared/sim/random.js';

const SIDE = 4000; // cells: a 200 m × 200 m site at 0.05 m per cell (common practice resolution)

const fmt = (n: number): string => Math.round(n).toLocaleString('en-US');
const mib = (bytes: number): string => `${fmt(bytes / 1048576)} MiB`;

let peakRss = 0;
/** Samples the resident set size after a step so the printed peak covers every step, in bytes. */
function noteRss(): void {
  peakRss = Math.max(peakRss, process.memoryUsage().rss);
}

/** Runs `fn` once and returns its wall time in milliseconds. */
function time<T>(fn: () => T): { result: T; ms: number } {
  const start = performance.now();
  const result = fn();
  const ms = performance.now() - start;
  noteRss();
  return { result, ms };
}

/** Random 0/1 mask of SIDE × SIDE cells with the given density of set cells, from a fixed seed. */
function sparseMask(density: number, seed: number): Uint8Array {
  const rng = createRng(seed);
  const mask = new Uint8Array(SIDE * SIDE);
  for (let k = 0; k < mask.length; k++) mask[k] = rng.chance(density) ? 1 : 0;
  return mask;
}

/** Occupied-like mask: a rack layout of 1-cell walls every 60 cells both ways plus sparse clutter. */
function rackMask(): Uint8Array {
  const mask = sparseMask(0.002, 7);
  for (let j = 0; j < SIDE; j++) {
    for (let i = 0; i < SIDE; i++) if (i % 60 === 0 || (j % 60 === 0 && i % 240 < 200)) mask[j * SIDE + i] = 1;
  }
  return mask;
}

/** Prints distance transform, labelling, closing and outline times on 4000 × 4000 cells, and the peak RSS. */
export async function run(): Promise<void> {
  // Warm the JIT on a small grid so the figures measure steady-state code, not compilation.
  const warm = new Uint8Array(256 * 256);
  warm[1000] = 1;
  distanceTransform(warm, 256, 256);
  labelComponents(warm, 256, 256);
  closing(warm, 256, 256, 2, 'square');
  closing(warm, 256, 256, 2, 'disc');
  noteRss();

  const cells = SIDE * SIDE;
  const racks = rackMask();
  const dt = time(() => distanceTransform(racks, SIDE, SIDE));
  console.log(`distance transform: ${SIDE} × ${SIDE} cells in ${fmt(dt.ms)} ms (${fmt(cells / (dt.ms / 1000))} cells/s)`);

  const flagged = sparseMask(0.05, 11);
  const labelled = time(() => labelComponents(flagged, SIDE, SIDE, 8));
  console.log(
    `labelling (8-connected, 5 % random cells): ${fmt(labelled.ms)} ms, ${fmt(labelled.result.count)} components (${fmt(cells / (labelled.ms / 1000))} cells/s)`,
  );
  const dense = sparseMask(0.3, 12);
  const labelledDense = time(() => labelComponents(dense, SIDE, SIDE, 8));
  console.log(`labelling (8-connected, 30 % random cells): ${fmt(labelledDense.ms)} ms, ${fmt(labelledDense.result.count)} components`);

  const square = time(() => closing(flagged, SIDE, SIDE, 2, 'square'));
  console.log(`closing, 5 × 5 square: ${fmt(square.ms)} ms`);
  const disc = time(() => closing(flagged, SIDE, SIDE, 2, 'disc'));
  console.log(`closing, disc of radius 2 cells: ${fmt(disc.ms)} ms`);

  const closedLabels = labelComponents(square.result, SIDE, SIDE, 8);
  const outlines = time(() => {
    let vertices = 0;
    for (let c = 1; c <= closedLabels.count; c++) vertices += traceOutline(closedLabels, c).length / 2;
    return vertices;
  });
  console.log(
    `outlines of the closed mask's ${fmt(closedLabels.count)} components: ${fmt(outlines.ms)} ms, ${fmt(outlines.result)} vertices`,
  );

  noteRss();
  console.log(`peak RSS sampled after each step: ${mib(peakRss)} (process maxRSS ${mib(process.resourceUsage().maxRSS * 1024)})`);
}
