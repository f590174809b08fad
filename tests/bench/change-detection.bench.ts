import { detectChanges, type DayCounters } from '../../shared/detect/change-detection.js';
import { distanceTransform } from '../../shared/grid/distance-transform.js';
import { createRng } from '../../shared/sim/random.js';
import { CellState, type OccupancyGrid } from '../../shared/types/grid.js';

const SIDE = 4000; // cells: a 200 m × 200 m site at 0.05 m per cell (common practice resolution)
const DAYS = 14;
const RES = 0.05;

const fmt = (n: number): string => Math.round(n).toLocaleString('en-US');
const mib = (bytes: number): string => `${fmt(bytes / 1048576)} MiB`;

let peakRss = 0;
/** Samples the resident set size so the printed peak covers every step, in bytes. */
function noteRss(): void {
  peakRss = Math.max(peakRss, process.memoryUsage().rss);
}

/**
 * A rack hall: 1-cell mapped walls every 60 cells across and racks of 200 cells every 60 rows,
 * free elsewhere, unknown behind the outer wall; plus one unknown 200 × 200 patch the mapper
 * left out. Invented for the benchmark.
 */
function hall(): OccupancyGrid {
  const cells = new Uint8Array(SIDE * SIDE).fill(CellState.Free);
  for (let j = 0; j < SIDE; j++) {
    for (let i = 0; i < SIDE; i++) {
      const k = j * SIDE + i;
      if (i === 0 || j === 0 || i === SIDE - 1 || j === SIDE - 1) cells[k] = CellState.Occupied;
      else if (i % 60 === 0 || (j % 60 === 0 && i % 240 < 200)) cells[k] = CellState.Occupied;
    }
  }
  for (let j = 2010; j < 2210; j++) cells.fill(CellState.Unknown, j * SIDE + 2010, j * SIDE + 2210);
  return { width: SIDE, height: SIDE, resolution: RES, origin: { x: 0, y: 0, yaw: 0 }, cells, probability: new Uint8Array(SIDE * SIDE) };
}

/**
 * A day's counters without ray tracing (tracing 16 M cells × 14 days would time the tracer, not
 * detection): free cells get ~25 passes, mapped walls ~12 hits with scatter into the next cell,
 * plus scripted changes — a removed wall stretch, a new box, a box on every other day, shelving in
 * the unknown patch — and 50,000 returns from people at random free cells. Same seed, same days.
 */
function makeDays(grid: OccupancyGrid): { days: () => Iterable<DayCounters>; templateMs: number } {
  const t0 = performance.now();
  const n = SIDE * SIDE;
  const baseHits = new Uint32Array(n);
  const basePasses = new Uint32Array(n);
  for (let k = 0; k < n; k++) {
    if (grid.cells[k] === CellState.Free) basePasses[k] = 25;
    else if (grid.cells[k] === CellState.Occupied) {
      baseHits[k] = 12;
      basePasses[k] = 3;
      // Scatter of a wall that is still there into the free cell beside it.
      if (k + 1 < n && grid.cells[k + 1] === CellState.Free) baseHits[k + 1] += 3;
    }
  }
  const templateMs = performance.now() - t0;
  const hits = new Uint32Array(n);
  const passes = new Uint32Array(n);
  const rect = (i0: number, j0: number, i1: number, j1: number, h: number, m: number): void => {
    for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) (hits[j * SIDE + i] = h), (passes[j * SIDE + i] = m);
  };
  function* days(): Generator<DayCounters> {
    const rng = createRng(7);
    for (let d = 0; d < DAYS; d++) {
      hits.set(baseHits);
      passes.set(basePasses);
      rect(600, 1025, 601, 1075, 0, 20); // a removed stretch of wall (and its scatter): passes only
      rect(1510, 1510, 1540, 1530, 10, 4); // a new box in free space
      if (d % 2 === 0) rect(3010, 730, 3040, 750, 10, 4); // pallets on every other day
      rect(2080, 2080, 2140, 2100, 8, 4); // shelving where the map is unknown
      for (let p = 0; p < 50_000; p++) {
        const k = rng.int(n);
        if (grid.cells[k] === CellState.Free) hits[k] += 1;
      }
      noteRss();
      yield { day: new Date(Date.UTC(2026, 10, 2 + d)).toISOString().slice(0, 10), hits, passes };
    }
  }
  return { days, templateMs };
}

/** Prints change detection's time and peak RSS on a 4000 × 4000 cell map with 14 days of evidence. */
export async function run(): Promise<void> {
  const grid = hall();
  const occupied = new Uint8Array(SIDE * SIDE);
  for (let k = 0; k < occupied.length; k++) occupied[k] = grid.cells[k] === CellState.Occupied ? 1 : 0;
  const t0 = performance.now();
  const distance = distanceTransform(occupied, SIDE, SIDE).values;
  const dtMs = performance.now() - t0;
  const { days, templateMs } = makeDays(grid);

  // The evidence generator alone, so its cost can be told apart from detection's; it also
  // touches the day buffers, so the RSS below already holds them.
  const g0 = performance.now();
  let read = 0;
  for (const d of days()) read += d.hits[0];
  const generatorMs = 2 * (performance.now() - g0); // detectChanges iterates the days twice
  void read;
  noteRss();
  const rssBefore = process.memoryUsage().rss;

  const t1 = performance.now();
  const result = detectChanges(grid, distance, days);
  const totalMs = performance.now() - t1;
  noteRss();

  const z = result.zones.map((q) => `${q.kind}/${q.persistence} ${q.areaM2.toFixed(2)} m²`).join(', ');
  console.log(`map ${SIDE} × ${SIDE} cells (${fmt((SIDE * SIDE) / 1e6)} M), ${DAYS} days; distance transform ${fmt(dtMs)} ms (once per map version); day template ${fmt(templateMs)} ms`);
  console.log(`detectChanges: ${(totalMs / 1000).toFixed(2)} s wall, of which the synthetic day generator ~${(generatorMs / 1000).toFixed(2)} s → detection ${((totalMs - generatorMs) / 1000).toFixed(2)} s`);
  console.log(`zones: ${result.zones.length} (${z}); cells observed ${fmt(result.figures.cellsObserved)}`);
  console.log(
    `RSS before detection ${mib(rssBefore)}, peak sampled ${mib(peakRss)} (+${mib(peakRss - rssBefore)} during detection, ${((peakRss - rssBefore) / (SIDE * SIDE)).toFixed(1)} bytes per cell); process maxRSS ${mib(process.resourceUsage().maxRSS * 1024)}`,
  );
}
