import { renderGridImage } from '../../shared/render/grid-image.js';
import { renderTile, tileCount, tilePyramid } from '../../shared/render/tiles.js';
import { createScenario } from '../../shared/sim/scenario.js';
import { encodePng } from '../../server/services/grid-codec.js';
import { CellState, type OccupancyGrid } from '../../shared/types/grid.js';

const fmt = (n: number, digits = 2) => n.toLocaleString('en-US', { maximumFractionDigits: digits });

/** A 4000 × 4000-cell grid with walls every 2 m and rack rows, for the large-map figures. */
function largeGrid(): OccupancyGrid {
  const width = 4000;
  const height = 4000;
  const cells = new Uint8Array(width * height).fill(CellState.Free);
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      if (i % 40 === 0 || j % 400 === 0 || (j % 80 < 40 && i % 40 < 30 && i % 40 > 10)) cells[j * width + i] = CellState.Occupied;
    }
  }
  return { width, height, resolution: 0.05, origin: { x: 0, y: 0, yaw: 0 }, cells, probability: new Uint8Array(width * height) };
}

/** Prints tile rendering and PNG encoding times per zoom for the demo-size map and a 4000 × 4000 map. */
export async function run(): Promise<void> {
  const maps: Array<[string, OccupancyGrid]> = [
    ['simulated site 1240 × 840 cells', createScenario({ seed: 7101, days: 1, startDate: '2026-11-02' }).map],
    ['synthetic 4000 × 4000 cells', largeGrid()],
  ];
  for (const [label, grid] of maps) {
    const pyramid = tilePyramid(grid);
    for (let z = pyramid.minZoom; z <= pyramid.maxZoom; z++) {
      const { columns, rows } = tileCount(grid, z);
      // Up to 16 tiles from the middle of the pyramid: the cost of a typical visible screen.
      const samples: Array<[number, number]> = [];
      for (let y = Math.floor(rows / 2) - 2; y < Math.floor(rows / 2) + 2; y++) for (let x = Math.floor(columns / 2) - 2; x < Math.floor(columns / 2) + 2; x++) if (x >= 0 && y >= 0 && x < columns && y < rows) samples.push([x, y]);
      let render = 0;
      let encode = 0;
      let bytes = 0;
      for (const [x, y] of samples) {
        const t0 = performance.now();
        const img = renderTile(grid, z, x, y);
        const t1 = performance.now();
        bytes += encodePng(img).length;
        encode += performance.now() - t1;
        render += t1 - t0;
      }
      console.log(`${label}, zoom ${z} (${columns} × ${rows} tiles): render ${fmt(render / samples.length)} ms, PNG ${fmt(encode / samples.length)} ms, ${fmt(bytes / samples.length / 1024, 1)} KB per tile`);
    }
    const t = performance.now();
    renderGridImage(grid, 1024);
    console.log(`${label}: 1024 px preview in ${fmt(performance.now() - t)} ms`);
  }
}
