/**
 * Outer boundary of a labelled component as a closed polygon along cell edges, traced by
 * following the cracks between component and non-component cells with the component on the
 * left (square / crack tracing, the edge-following form of Moore-neighbour tracing). Vertices are
 * cell corners in continuous cell coordinates (cell (i, j) spans [i, i + 1] × [j, j + 1]), so the
 * polygon is exact: its shoelace area equals the cell count plus the area of any holes.
 */
import { gridFrameToWorld } from '../grid/transform.js';
import type { GridGeometry } from '../types/grid.js';
import type { Labelling } from './labelling.js';

/** Options of `traceOutline`: `simplify` (default true) keeps only the corners where the boundary turns. */
export interface OutlineOptions {
  simplify?: boolean;
}

// Directions E, N, W, S as unit steps between cell corners.
const STEP_X = [1, 0, -1, 0];
const STEP_Y = [0, 1, 0, -1];
// Offset from a corner to the cell ahead-left of the direction of travel (E: cell NE of the corner,
// N: NW, W: SW, S: SE); the cell ahead-right is the ahead-left cell of the direction turned right.
const LEFT_CELL_X = [0, -1, -1, 0];
const LEFT_CELL_Y = [0, 0, -1, -1];

/**
 * Outer boundary of component `label` as a counter-clockwise polygon of cell-corner vertices
 * [x0, y0, x1, y1, …] in cells (closed implicitly: the last vertex joins the first). With
 * 8-connectivity the polygon passes through corner-touching cells, touching itself there.
 */
export function traceOutline(labelling: Labelling, label: number, options: OutlineOptions = {}): Float64Array {
  const { width, height, labels, stats, count, connectivity } = labelling;
  if (!Number.isInteger(label) || label < 1 || label > count) {
    throw new RangeError(`Label must be a component number from 1 to ${count}, got ${label}.`);
  }
  const simplify = options.simplify ?? true;
  const first = stats.firstCell[label];
  const startX = first % width;
  const startY = (first - startX) / width;
  const inside = (i: number, j: number): boolean =>
    i >= 0 && j >= 0 && i < width && j < height && labels[j * width + i] === label;

  // The first cell in scan order has nothing of its component below it, so its bottom edge lies on
  // the outer boundary (never on a hole's): start there heading east, the cell on the left.
  let x = startX;
  let y = startY;
  let dir = 0;
  let buffer = new Float64Array(64);
  let used = 0;
  // A component of c cells has at most 4c boundary edges; the guard only stops corrupt input.
  const maxSteps = 4 * stats.cellCount[label] + 4;
  for (let steps = 0; steps <= maxSteps; steps++) {
    x += STEP_X[dir];
    y += STEP_Y[dir];
    const right = (dir + 3) & 3;
    const aheadLeft = inside(x + LEFT_CELL_X[dir], y + LEFT_CELL_Y[dir]);
    const aheadRight = inside(x + LEFT_CELL_X[right], y + LEFT_CELL_Y[right]);
    let next: number;
    // Where the two cells ahead touch only diagonally, 8-connectivity keeps them together (turn
    // right, keeping to the same background), 4-connectivity keeps them apart (turn left).
    if (aheadRight && (aheadLeft || connectivity === 8)) next = right;
    else if (aheadLeft) next = dir;
    else next = (dir + 1) & 3;
    if (!simplify || next !== dir) {
      if (used + 2 > buffer.length) {
        const grown = new Float64Array(buffer.length * 2);
        grown.set(buffer);
        buffer = grown;
      }
      buffer[used++] = x;
      buffer[used++] = y;
    }
    dir = next;
    if (x === startX && y === startY && dir === 0) return buffer.slice(0, used);
  }
  throw new RangeError(`Component ${label}'s boundary did not close; the labelling is inconsistent.`);
}

/** Signed area of a polygon [x0, y0, x1, y1, …] by the shoelace formula, in squared vertex units; positive when counter-clockwise. */
export function polygonArea(vertices: Float64Array): number {
  const n = vertices.length >> 1;
  let twice = 0;
  for (let a = 0; a < n; a++) {
    const b = a + 1 === n ? 0 : a + 1;
    twice += vertices[2 * a] * vertices[2 * b + 1] - vertices[2 * b] * vertices[2 * a + 1];
  }
  return twice / 2;
}

/** Polygon vertices converted from cell-corner coordinates (cells) to map-frame metres, honouring the grid's origin yaw. */
export function outlineToMetres(vertices: Float64Array, geometry: GridGeometry): Float64Array {
  const out = new Float64Array(vertices.length);
  for (let k = 0; k < vertices.length; k += 2) {
    // Per vertex, not per cell: an object here is cheap next to the trace that produced the vertex.
    const p = gridFrameToWorld(geometry, vertices[k], vertices[k + 1]);
    out[k] = p.x;
    out[k + 1] = p.y;
  }
  return out;
}
