import { diffCounts, diffGrids } from '../../shared/grid/diff.js';
import { renderDiffTile } from '../../shared/render/diff-tiles.js';
import { tileCount, tilePyramid } from '../../shared/render/tiles.js';
import { createScenario } from '../../shared/sim/scenario.js';
import { encodePng } from '../../server/services/grid-codec.js';
import { CellState, type OccupancyGrid } from '../../shared/types/grid.js';

const fmt = (n: number, digits = 2) => n.toLocaleString('en-US', { maximumFractionDigits: digits });

/** A copy of `grid` placed 2 cm off and turned by 0.01 rad, with a 3 m × 1 m block of new structure: a remap that never lines up cell for cell. */
function remapped(grid: OccupancyGrid): OccupancyGrid {
  const cells = Uint8Array.from(grid.cells);
  const i0 = Math.floor(grid.width / 2);
  const j0 = Math.floor(grid.height / 2);
  for (let j = j0; j < j0 + 20; j++) cells.fill(CellState.Occupied, j * grid.width + i0, j * grid.width + i0 + 60);
  return { ...grid, origin: { x: grid.origin.x + 0.02, y: grid.origin.y - 0.02, yaw: grid.origin.yaw + 0.01 }, cells };
}

/** A 4000 × 4000-cell grid with walls every 2 m and rack rows, as in tiles.bench.ts. */
function largeGrid(): OccupancyGrid {
  const width = 4000;
  const height = 4000;
  const cells = new Uint8Array(width * height).fill(CellState.Free);
  for (let j = 0; j < height; j++) for (let i = 0; i < width; i++) if (i % 40 === 0 || j % 400 === 0 || (j % 80 < 40 && i % 40 < 30 && i % 40 > 10)) cells[j * width + i] = CellState.Occupied;
  return { width, height, resolution: 0.05, origin: { x: 0, y: 0, yaw: 0 }, cells, probability: new Uint8Array(width * height) };
}

/** Prints the time of a whole-map difference (median of 5) and of diff tiles per zoom, for the demo-size map and a 4000 × 4000 map. */
export async function run(): Promise<void> {
  const maps: Array<[string, OccupancyGrid]> = [
    ['simulated site 1240 × 840 cells', createScenario({ seed: 7101, days: 1, startDate: '2026-11-02' }).map],
    ['synthetic 4000 × 4000 cells', largeGrid()],
  ];
  for (const [label, base] of maps) {
    const other = remapped(base);
    const times: number[] = [];
    let diff = diffGrids(base, other);
    for (let k = 0; k < 5; k++) {
      const t0 = performance.now();
      diff = diffGrids(base, other);
      times.push(performance.now() - t0);
    }
    times.sort((a, b) => a - b);
    const c = diffCounts(diff);
    console.log(`${label}: difference in ${fmt(times[2])} ms (median of 5; ${fmt(times[0])}–${fmt(times[4])}), ${fmt(base.width * base.height / times[2] / 1000, 1)} M cells/s; added ${c.added}, removed ${c.removed}, revealed ${c.revealed}, hidden ${c.hidden} cells`);
    const pyramid = tilePyramid(base);
    for (let z = pyramid.minZoom; z <= pyramid.maxZoom; z++) {
      const { columns, rows } = tileCount(base, z);
      const samples: Array<[number, number]> = [];
      for (let y = Math.floor(rows / 2) - 2; y < Math.floor(rows / 2) + 2; y++) for (let x = Math.floor(columns / 2) - 2; x < Math.floor(columns / 2) + 2; x++) if (x >= 0 && y >= 0 && x < columns && y < rows) samples.push([x, y]);
      let render = 0;
      let encode = 0;
      for (const [x, y] of samples) {
        const t0 = performance.now();
        const img = renderDiffTile(base, diff, z, x, y);
        const t1 = performance.now();
        encodePng(img);
        encode += performance.now() - t1;
        render += t1 - t0;
      }
      console.log(`${label}, diff tiles at zoom ${z}: render ${fmt(render / samples.length)} ms, PNG ${fmt(encode / samples.length)} ms per tile`);
    }
  }
}
