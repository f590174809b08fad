import { GREY_FREE, GREY_OCCUPIED, GREY_UNKNOWN } from '../grid/image-to-grid.js';
import { CellState, type GridGeometry, type OccupancyGrid } from '../types/grid.js';
import type { Box } from './shapes.js';

/** What the simulated mapping run saw: structure, where it drove, and what the mapper blanked. */
export interface MappingRun {
  /** Solid structure as it stood during the mapping run (metres). */
  structure: readonly Box[];
  /** Points in metres the mapping robot drove through; free space is what is reachable from them. */
  seeds: readonly (readonly [number, number])[];
  /** Areas the mapper erased to unknown after the run (metres). */
  blanked?: readonly Box[];
}

/** Geometry (cells, m/cell, origin in metres) covering x ∈ [minX, maxX], y ∈ [minY, maxY] metres plus `margin` metres. */
export function gridGeometryFor(bounds: Box, resolution: number, margin: number): GridGeometry {
  const x0 = bounds.minX - margin;
  const y0 = bounds.minY - margin;
  return {
    width: Math.ceil((bounds.maxX + margin - x0) / resolution - 1e-9),
    height: Math.ceil((bounds.maxY + margin - y0) / resolution - 1e-9),
    resolution,
    origin: { x: x0, y: y0, yaw: 0 },
  };
}

/** Cell index range [i0, i1) × [j0, j1) of the cells overlapping a box (yaw-0 geometry), clipped to the grid. */
function cellSpan(g: GridGeometry, b: Box): [number, number, number, number] {
  // The epsilon keeps a box edge that lies exactly on a cell edge from claiming the next cell
  // through floating-point error (0.3 / 0.05 = 6.000000000000001).
  const eps = 1e-6;
  const i0 = Math.max(0, Math.floor((b.minX - g.origin.x) / g.resolution + eps));
  const j0 = Math.max(0, Math.floor((b.minY - g.origin.y) / g.resolution + eps));
  const i1 = Math.min(g.width, Math.ceil((b.maxX - g.origin.x) / g.resolution - eps));
  const j1 = Math.min(g.height, Math.ceil((b.maxY - g.origin.y) / g.resolution - eps));
  return [i0, j0, Math.max(i0, i1), Math.max(j0, j1)];
}

/**
 * Rasterizes a mapping run into a stored occupancy grid (yaw-0 geometry): free where the
 * mapping robot could reach, occupied on structure cells next to that free space, unknown
 * elsewhere (outside the outer walls, inside solid racks, blanked areas). Reachability stands
 * in for line of sight: from inside a building every reachable floor cell is seen by some
 * scan of a full mapping run. Memory: 2 bytes per cell for the grid plus 5 bytes per cell of
 * scratch.
 */
export function rasterizeMappingRun(geometry: GridGeometry, run: MappingRun): OccupancyGrid {
  const { width, height, resolution } = geometry;
  const n = width * height;
  const solid = new Uint8Array(n);
  for (const b of run.structure) {
    const [i0, j0, i1, j1] = cellSpan(geometry, b);
    for (let j = j0; j < j1; j++) solid.fill(1, j * width + i0, j * width + i1);
  }

  // 4-connected flood fill from the seeds over non-solid cells, with an explicit stack so a
  // million-cell map does not overflow the call stack.
  const reached = new Uint8Array(n);
  const stack = new Int32Array(n);
  let top = 0;
  // Marking a cell when pushing it keeps each cell on the stack at most once. The helper is
  // made once, outside the loop: a closure per popped cell made this ten times slower.
  const push = (q: number): void => {
    if (solid[q] === 0 && reached[q] === 0) {
      reached[q] = 1;
      stack[top++] = q;
    }
  };
  for (const [x, y] of run.seeds) {
    const i = Math.floor((x - geometry.origin.x) / resolution);
    const j = Math.floor((y - geometry.origin.y) / resolution);
    if (i >= 0 && j >= 0 && i < width && j < height) push(j * width + i);
  }
  while (top > 0) {
    const k = stack[--top];
    const i = k % width;
    if (i > 0) push(k - 1);
    if (i < width - 1) push(k + 1);
    if (k >= width) push(k - width);
    if (k < n - width) push(k + width);
  }

  const cells = new Uint8Array(n).fill(CellState.Unknown);
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const k = j * width + i;
      if (reached[k]) {
        cells[k] = CellState.Free;
        continue;
      }
      if (!solid[k]) continue;
      // A structure cell is a surface the scanner saw when one of its 8 neighbours is reachable.
      let seen = false;
      for (let dj = -1; dj <= 1 && !seen; dj++) {
        const jj = j + dj;
        if (jj < 0 || jj >= height) continue;
        for (let di = -1; di <= 1; di++) {
          const ii = i + di;
          if (ii >= 0 && ii < width && reached[jj * width + ii]) {
            seen = true;
            break;
          }
        }
      }
      if (seen) cells[k] = CellState.Occupied;
    }
  }
  for (const b of run.blanked ?? []) {
    const [i0, j0, i1, j1] = cellSpan(geometry, b);
    for (let j = j0; j < j1; j++) cells.fill(CellState.Unknown, j * width + i0, j * width + i1);
  }

  // Probability bytes as the map image would read back: p = (255 − grey) / 255.
  const probability = new Uint8Array(n);
  const probOf = [255 - GREY_FREE, 255 - GREY_OCCUPIED, 255 - GREY_UNKNOWN];
  for (let k = 0; k < n; k++) probability[k] = probOf[cells[k]];
  return { ...geometry, origin: { ...geometry.origin }, cells, probability };
}
