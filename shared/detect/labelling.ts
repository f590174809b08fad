/**
 * Connected-component labelling of a binary mask in two raster passes with union–find
 * (Rosenfeld & Pfaltz, "Sequential operations in digital picture processing", JACM 13, 1966):
 * the first pass gives each set cell a provisional label from its already-visited neighbours and
 * records which provisional labels meet; the second pass replaces each by its set's final label.
 * Cells are scanned row by row from j = 0 (the map's bottom row), index j * width + i.
 */
import { checkMaskSize } from '../grid/distance-transform.js';

/** Neighbourhood that joins cells into one component: 4 (edges) or 8 (edges and corners). */
export type Connectivity = 4 | 8;

/**
 * Per-component figures as parallel typed arrays indexed by label (index 0, the background, is unused).
 * Memory: 36 bytes per component.
 */
export interface ComponentStats {
  /** Number of cells in the component. */
  cellCount: Int32Array;
  /** Bounding box, inclusive, in cell indices. */
  minI: Int32Array;
  minJ: Int32Array;
  maxI: Int32Array;
  maxJ: Int32Array;
  /** Centroid in continuous cell coordinates (cell (i, j) spans [i, i + 1) × [j, j + 1), so mean i + 0.5). */
  centroidX: Float64Array;
  centroidY: Float64Array;
  /** Index of the component's first cell in scan order: lowest row, then leftmost; where outline tracing starts. */
  firstCell: Int32Array;
}

/** Result of labelling: labels 1…count per cell (0 = background) and the components' figures. Memory: 4 bytes per cell. */
export interface Labelling {
  width: number;
  height: number;
  connectivity: Connectivity;
  /** Component label per cell, index j * width + i; 0 where the mask is 0. */
  labels: Int32Array;
  /** Number of components; labels run from 1 to count in order of first appearance in scan order. */
  count: number;
  stats: ComponentStats;
}

/** Labels the connected components of the cells with mask ≠ 0 (labels 1…count, in cells) and gives their figures. */
export function labelComponents(mask: Uint8Array, width: number, height: number, connectivity: Connectivity = 8): Labelling {
  checkMaskSize(mask, width, height);
  if (connectivity !== 4 && connectivity !== 8) {
    throw new RangeError(`Connectivity must be 4 or 8, got ${String(connectivity)}.`);
  }
  const labels = new Int32Array(width * height);
  const forest = new UnionFind();
  const diagonal = connectivity === 8;

  // Pass 1: the neighbours already visited are the west cell and, in the row below, the south
  // cell (plus south-west and south-east for 8-connectivity).
  for (let j = 0; j < height; j++) {
    const row = j * width;
    const below = row - width;
    for (let i = 0; i < width; i++) {
      const k = row + i;
      if (mask[k] === 0) continue;
      let label = 0;
      if (i > 0 && labels[k - 1] !== 0) label = labels[k - 1];
      if (j > 0) {
        label = join(forest, label, labels[below + i]);
        if (diagonal) {
          if (i > 0) label = join(forest, label, labels[below + i - 1]);
          if (i + 1 < width) label = join(forest, label, labels[below + i + 1]);
        }
      }
      labels[k] = label !== 0 ? label : forest.add();
    }
  }

  // Provisional → final: a set's root is its smallest provisional label, which was created first
  // in scan order, so numbering roots in ascending order labels components by first appearance.
  const provisional = forest.size;
  const final = new Int32Array(provisional + 1);
  let count = 0;
  for (let p = 1; p <= provisional; p++) {
    const root = forest.find(p);
    final[p] = root === p ? ++count : final[root];
  }

  const stats = emptyStats(count, width, height);
  // Pass 2: relabel and gather figures in the same sweep, so the grid is read only once more.
  for (let j = 0; j < height; j++) {
    const row = j * width;
    for (let i = 0; i < width; i++) {
      const k = row + i;
      if (labels[k] === 0) continue;
      const label = final[labels[k]];
      labels[k] = label;
      if (stats.cellCount[label] === 0) stats.firstCell[label] = k;
      stats.cellCount[label]++;
      if (i < stats.minI[label]) stats.minI[label] = i;
      if (i > stats.maxI[label]) stats.maxI[label] = i;
      if (j < stats.minJ[label]) stats.minJ[label] = j;
      if (j > stats.maxJ[label]) stats.maxJ[label] = j;
      stats.centroidX[label] += i;
      stats.centroidY[label] += j;
    }
  }
  for (let c = 1; c <= count; c++) {
    stats.centroidX[c] = stats.centroidX[c] / stats.cellCount[c] + 0.5;
    stats.centroidY[c] = stats.centroidY[c] / stats.cellCount[c] + 0.5;
  }
  return { width, height, connectivity, labels, count, stats };
}

/** Merges a neighbour's provisional label into the current one (0 = none yet); returns the label to use. */
function join(forest: UnionFind, current: number, neighbour: number): number {
  if (neighbour === 0) return current;
  if (current === 0) return neighbour;
  if (current !== neighbour) forest.union(current, neighbour);
  return current;
}

function emptyStats(count: number, width: number, height: number): ComponentStats {
  const n = count + 1;
  return {
    cellCount: new Int32Array(n),
    minI: new Int32Array(n).fill(width),
    minJ: new Int32Array(n).fill(height),
    maxI: new Int32Array(n).fill(-1),
    maxJ: new Int32Array(n).fill(-1),
    centroidX: new Float64Array(n),
    centroidY: new Float64Array(n),
    firstCell: new Int32Array(n).fill(-1),
  };
}

/**
 * Disjoint sets over provisional labels 1…size in a growable Int32Array: union keeps the smaller
 * label as root, find halves paths. Starts small because sparse masks need few labels, and grows
 * by doubling, so a checkerboard (one label per two cells) still costs only amortized O(1).
 */
class UnionFind {
  private parent = new Int32Array(1024);
  size = 0;

  add(): number {
    this.size++;
    if (this.size >= this.parent.length) {
      const grown = new Int32Array(this.parent.length * 2);
      grown.set(this.parent);
      this.parent = grown;
    }
    this.parent[this.size] = this.size;
    return this.size;
  }

  find(x: number): number {
    const parent = this.parent;
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]];
      x = parent[x];
    }
    return x;
  }

  union(a: number, b: number): void {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra < rb) this.parent[rb] = ra;
    else if (rb < ra) this.parent[ra] = rb;
  }
}
