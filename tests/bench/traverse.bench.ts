import { accumulateScan, createCounters } from '../../shared/scan/accumulate.js';
import type { ScanRecord } from '../../shared/scan/scan-record.js';
import { traceBeam } from '../../shared/scan/traverse.js';
import type { GridGeometry } from '../../shared/types/grid.js';
import { createRng } from '../../shared/sim/random.js';

/** Seeded uniform numbers in [0, 1) (the simulator's generator) so every run draws the same values. */
function rng(seed: number): () => number {
  const g = createRng(seed);
  return () => g.next();
}

const RESOLUTION = 0.05; // m per cell, the usual map resolution (common practice)
const SIDE = 1400; // cells: 70 m, so 30 m beams from the central 10 m stay inside the grid

const fmt = (n: number): string => Math.round(n).toLocaleString('en-US');

/** Times traceBeam over random beams of 0.5–30 m; returns nothing, prints cells/s and beams/s. */
function benchTraverse(): void {
  const r = rng(1);
  const n = 200_000;
  const beams = new Float64Array(4 * n);
  let cellsAlongBeams = 0;
  for (let k = 0; k < n; k++) {
    const x0 = SIDE / 2 + (r() - 0.5) * 200;
    const y0 = SIDE / 2 + (r() - 0.5) * 200;
    const len = (0.5 + r() * 29.5) / RESOLUTION;
    const a = r() * 2 * Math.PI;
    beams.set([x0, y0, x0 + len * Math.cos(a), y0 + len * Math.sin(a)], 4 * k);
    cellsAlongBeams += len;
  }
  const hits = new Uint32Array(SIDE * SIDE);
  const passes = new Uint32Array(SIDE * SIDE);
  const runOnce = () => {
    for (let k = 0; k < n; k++) {
      traceBeam(beams[4 * k], beams[4 * k + 1], beams[4 * k + 2], beams[4 * k + 3], SIDE, SIDE, hits, passes);
    }
  };
  runOnce(); // warm-up: lets the JIT compile the loop before timing
  hits.fill(0);
  passes.fill(0);
  const rounds = 3;
  const t0 = performance.now();
  for (let k = 0; k < rounds; k++) runOnce();
  const seconds = (performance.now() - t0) / 1000;
  let cells = 0;
  for (let k = 0; k < hits.length; k++) cells += hits[k] + passes[k];
  console.log(`traverse: ${fmt(rounds * n)} beams of 0.5–30 m at ${RESOLUTION} m/cell, mean beam length ${fmt(cellsAlongBeams / n)} cells`);
  console.log(`traverse: ${fmt(cells / seconds)} cells/s, ${fmt((rounds * n) / seconds)} beams/s (one core, ${seconds.toFixed(2)} s)`);
}

/** Times accumulateScan on a 541-beam 270° scan; returns nothing, prints scans/s and beams/s. */
function benchAccumulate(): void {
  const r = rng(2);
  const geom: GridGeometry = { width: SIDE, height: SIDE, resolution: RESOLUTION, origin: { x: -35, y: -35, yaw: 0.1 } };
  const counters = createCounters(geom);
  const beams = 541;
  const scans: ScanRecord[] = [];
  for (let s = 0; s < 64; s++) {
    // Indoor-like ranges: mostly 0.5–15 m, a few no-returns; a product-made test load, not measured data.
    const ranges = Float64Array.from({ length: beams }, () => (r() < 0.05 ? NaN : 0.5 + r() * r() * 29));
    scans.push({
      t: '2026-11-03T08:15:02.120Z',
      timeMs: 0,
      robot: 'AMR-07',
      scanner: 'front',
      pose: [(r() - 0.5) * 10, (r() - 0.5) * 10, r() * 2 * Math.PI],
      angleMin: (-3 * Math.PI) / 4,
      angleIncrement: (3 * Math.PI) / 2 / (beams - 1),
      rangeMin: 0.05,
      rangeMax: 30,
      ranges,
    });
  }
  const mount = { x: 0.35, y: 0, yaw: 0 };
  const n = 6000;
  for (let k = 0; k < 500; k++) accumulateScan(geom, counters, scans[k % scans.length], mount); // warm-up
  const t0 = performance.now();
  let traced = 0;
  for (let k = 0; k < n; k++) traced += accumulateScan(geom, counters, scans[k % scans.length], mount).traced;
  const seconds = (performance.now() - t0) / 1000;
  console.log(`accumulateScan: ${fmt(n / seconds)} scans/s, ${fmt((n * beams) / seconds)} beams/s, ${fmt(traced / seconds)} traced beams/s (541-beam 270° scans, one core, ${seconds.toFixed(2)} s)`);
}

/** Runs the traversal benchmarks and prints their figures. */
export async function run(): Promise<void> {
  benchTraverse();
  benchAccumulate();
}
