/**
 * The per-cell and per-block change tests of change detection (DESIGN §4.4), run on one set of
 * hit/pass counters: the pooled window, or one day. They only mark cells; grouping into zones
 * and the per-zone daily decisions live in change-detection.ts.
 *
 * - Missing: a mapped-occupied cell whose tolerance-neighbourhood hit rate
 *   r̃ = (hits within the tolerance disc) / (those hits + passes through the cell) has a Wilson
 *   upper bound below `missingUpperMax`. Hits are pooled over the disc because pose noise moves a
 *   wall's returns a cell or two either way; passes are the cell's own, so each beam that crossed
 *   the cell counts once.
 * - New (mapped-free) and unmapped (mapped-unknown): a cell farther than the tolerance from mapped
 *   structure whose Wilson lower bound of h / (h + m) is above `newLowerMin`; and, because a real
 *   surface spreads its returns over a band a few cells wide, the same test on the pooled counts of
 *   square blocks (side `blockCells`, half-overlapping so a band of up to half a block's width
 *   always falls inside one block). A block is tested only when all of its cells are of one state
 *   (all free or all unknown) and farther than `blockClearanceM` from mapped structure, so the
 *   scatter beside walls that are still there never pools into a flag. A flagged block marks its
 *   cells that returned at least one hit, not the whole block, so zones keep the surface's shape.
 */
import { wilsonLower, wilsonUpper } from '../stats/wilson.js';
import { CellState, type OccupancyGrid } from '../types/grid.js';
import type { DetectionSettings } from './change-detection.js';

/** Thresholds the tests read (meanings and defaults in DetectionSettings). */
export type FlagThresholds = Pick<DetectionSettings, 'toleranceM' | 'z' | 'minObservations' | 'missingUpperMax' | 'newLowerMin' | 'blockCells' | 'blockClearanceM'>;

/** Block eligibility codes in `FlagContext.blockKind`. */
const BLOCK_NONE = 0;
const BLOCK_FREE = 1;
const BLOCK_UNKNOWN = 2;

/**
 * A growable list of cell indices (4 bytes per entry), reused from pass to pass so that the
 * tests allocate nothing per day once it has grown to the day's size.
 */
export class CellList {
  data = new Int32Array(1024);
  size = 0;

  /** Appends cell index k. */
  push(k: number): void {
    if (this.size === this.data.length) {
      const grown = new Int32Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    this.data[this.size++] = k;
  }
}

/**
 * Precomputed geometry of the tests for one grid: tolerance-disc offsets, the list of mapped-occupied
 * cells, which cells may hold new structure and which blocks may be pooled. Memory: 1 byte per cell
 * (eligibility), 3 bytes per block (≤ 0.75 byte per cell at the default block side of 4 cells),
 * 4 bytes per mapped-occupied cell, 4 bytes per cell with hits in the pass being tested.
 */
export interface FlagContext {
  width: number;
  height: number;
  thresholds: FlagThresholds;
  /** Tolerance disc as cell offsets (di, dj), |offset| ≤ tolerance in cells. */
  discI: Int32Array;
  discJ: Int32Array;
  /** Indices of the mapped-occupied cells, ascending. */
  occupied: Int32Array;
  /** Per cell: 1 if free and farther than the tolerance from mapped structure, 2 if unknown and as far, else 0. */
  cellKind: Uint8Array;
  /** Block side and stride in cells (block bx covers columns bx·stride … bx·stride + block − 1, clipped), and blocks per axis. */
  block: number;
  stride: number;
  blocksX: number;
  blocksY: number;
  /** Per block (row-major, bx + by·blocksX): 1 all-free, 2 all-unknown (both clear of structure), 0 not pooled. */
  blockKind: Uint8Array;
  /** Per block: the pass that last tested it, so a block holding several hit cells is tested once per pass. */
  blockPass: Uint16Array;
  pass: number;
  /** Scratch: the eligible cells with hits in the current pass. */
  hitCells: CellList;
}

/** Builds the tests' precomputed geometry for a grid and its distance field (cells to the nearest mapped-occupied cell). */
export function createFlagContext(grid: OccupancyGrid, distance: Float32Array, thresholds: FlagThresholds): FlagContext {
  const { width, height, cells, resolution } = grid;
  const tol = thresholds.toleranceM / resolution;
  const clearance = Math.max(tol, thresholds.blockClearanceM / resolution);
  const r = Math.floor(tol);
  const di: number[] = [];
  const dj: number[] = [];
  for (let b = -r; b <= r; b++) for (let a = -r; a <= r; a++) if (a * a + b * b <= tol * tol) (di.push(a), dj.push(b));

  let occupiedCount = 0;
  for (let k = 0; k < cells.length; k++) if (cells[k] === CellState.Occupied) occupiedCount++;
  const occupied = new Int32Array(occupiedCount);
  const cellKind = new Uint8Array(cells.length);
  let o = 0;
  for (let k = 0; k < cells.length; k++) {
    const s = cells[k];
    if (s === CellState.Occupied) occupied[o++] = k;
    // "Farther than the tolerance": a surface within it is explained by the map (DESIGN §4.3).
    else if (distance[k] > tol) cellKind[k] = s === CellState.Free ? BLOCK_FREE : BLOCK_UNKNOWN;
  }

  const block = thresholds.blockCells;
  const stride = Math.max(1, block >> 1);
  const blocksX = Math.ceil(width / stride);
  const blocksY = Math.ceil(height / stride);
  const blockKind = new Uint8Array(blocksX * blocksY);
  for (let by = 0; by < blocksY; by++) {
    const j0 = by * stride;
    const j1 = Math.min(height, j0 + block);
    for (let bx = 0; bx < blocksX; bx++) {
      const i0 = bx * stride;
      const i1 = Math.min(width, i0 + block);
      const first = cells[j0 * width + i0];
      let kind = first === CellState.Free ? BLOCK_FREE : first === CellState.Unknown ? BLOCK_UNKNOWN : BLOCK_NONE;
      for (let j = j0; j < j1 && kind !== BLOCK_NONE; j++) {
        for (let i = i0; i < i1; i++) {
          const k = j * width + i;
          if (cells[k] !== first || !(distance[k] > clearance)) {
            kind = BLOCK_NONE;
            break;
          }
        }
      }
      blockKind[bx + by * blocksX] = kind;
    }
  }
  return {
    width,
    height,
    thresholds,
    discI: Int32Array.from(di),
    discJ: Int32Array.from(dj),
    occupied,
    cellKind,
    block,
    stride,
    blocksX,
    blocksY,
    blockKind,
    blockPass: new Uint16Array(blocksX * blocksY),
    pass: 0,
    hitCells: new CellList(),
  };
}

/** Hits within the tolerance disc around cell (i, j), a count of returns. */
export function discHits(ctx: FlagContext, hits: Uint32Array, i: number, j: number): number {
  const { width, height, discI, discJ } = ctx;
  let h = 0;
  for (let q = 0; q < discI.length; q++) {
    const ii = i + discI[q];
    const jj = j + discJ[q];
    if (ii >= 0 && jj >= 0 && ii < width && jj < height) h += hits[jj * width + ii];
  }
  return h;
}

/**
 * Runs the missing, new and unmapped tests on one set of counters, ORs `bit` into `marks` for
 * every flagged cell and appends each newly marked cell to `marked` (a cell appears once per call).
 */
export function flagChanges(ctx: FlagContext, hits: Uint32Array, passes: Uint32Array, marks: Uint8Array, bit: number, marked: CellList): void {
  const { width, thresholds: t, occupied, cellKind, hitCells } = ctx;
  const { z, minObservations, missingUpperMax, newLowerMin } = t;
  const mark = (k: number): void => {
    if ((marks[k] & bit) !== 0) return;
    marks[k] |= bit;
    marked.push(k);
  };

  for (let q = 0; q < occupied.length; q++) {
    const k = occupied[q];
    const m = passes[k];
    // Without beams through the cell nothing says the structure went away.
    if (m === 0) continue;
    const i = k % width;
    const h = discHits(ctx, hits, i, (k - i) / width);
    const n = h + m;
    // The upper bound is never below the observed rate, so most cells leave before the square root.
    if (n < minObservations || h >= missingUpperMax * n) continue;
    if (wilsonUpper(h, n, z) < missingUpperMax) mark(k);
  }

  hitCells.size = 0;
  for (let k = 0; k < cellKind.length; k++) {
    const h = hits[k];
    if (h === 0 || cellKind[k] === BLOCK_NONE) continue;
    hitCells.push(k);
    const n = h + passes[k];
    // The lower bound never exceeds the observed rate.
    if (n < minObservations || h <= newLowerMin * n) continue;
    if (wilsonLower(h, n, z) > newLowerMin) mark(k);
  }

  flagBlocks(ctx, hits, passes, mark);
}

/**
 * The block-pooled new/unmapped test, run only on blocks that hold an eligible cell with hits
 * (the others cannot pass it): marks the cells with hits of every block whose pooled lower bound
 * exceeds newLowerMin.
 */
function flagBlocks(ctx: FlagContext, hits: Uint32Array, passes: Uint32Array, mark: (k: number) => void): void {
  const { width, height, block, stride, blocksX, blocksY, blockKind, blockPass, hitCells, thresholds: t } = ctx;
  const { z, minObservations, newLowerMin } = t;
  ctx.pass = ctx.pass === 0xffff ? 1 : ctx.pass + 1;
  if (ctx.pass === 1) blockPass.fill(0);
  const pass = ctx.pass;
  for (let q = 0; q < hitCells.size; q++) {
    const k = hitCells.data[q];
    const ci = k % width;
    const cj = (k - ci) / width;
    // Blocks bx with bx·stride ≤ ci < bx·stride + block.
    const bx0 = Math.max(0, Math.floor((ci - block) / stride) + 1);
    const bx1 = Math.min(blocksX - 1, Math.floor(ci / stride));
    const by0 = Math.max(0, Math.floor((cj - block) / stride) + 1);
    const by1 = Math.min(blocksY - 1, Math.floor(cj / stride));
    for (let by = by0; by <= by1; by++) {
      for (let bx = bx0; bx <= bx1; bx++) {
        const b = bx + by * blocksX;
        if (blockKind[b] === BLOCK_NONE || blockPass[b] === pass) continue;
        blockPass[b] = pass;
        const i0 = bx * stride;
        const i1 = Math.min(width, i0 + block);
        const j0 = by * stride;
        const j1 = Math.min(height, j0 + block);
        let h = 0;
        let n = 0;
        for (let j = j0; j < j1; j++) {
          for (let kk = j * width + i0, end = j * width + i1; kk < end; kk++) {
            h += hits[kk];
            n += hits[kk] + passes[kk];
          }
        }
        if (n < minObservations || h <= newLowerMin * n || !(wilsonLower(h, n, z) > newLowerMin)) continue;
        for (let j = j0; j < j1; j++) for (let kk = j * width + i0, end = j * width + i1; kk < end; kk++) if (hits[kk] > 0) mark(kk);
      }
    }
  }
}
