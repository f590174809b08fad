import { CellState, type OccupancyGrid } from '../types/grid.js';

// Cell-level difference between two map versions of one site, on the base version's cells: each
// base cell's centre is taken into map metres and looked up in the other version's grid (the cell
// that holds it, i.e. nearest-neighbour resampling); outside the other grid counts as unknown.

/**
 * What one base cell became in the other version, one code per cell. Codes follow the tiles'
 * priority (lower wins when one pixel shows several cells): structure changes before knowledge changes.
 * Unknown → occupied is coded as Added, though it also counts as revealed.
 */
export const CellChange = { None: 0, Added: 1, Removed: 2, Revealed: 3, Hidden: 4 } as const;
export type CellChange = (typeof CellChange)[keyof typeof CellChange];

/**
 * Cells per class of change, counted on the base's cells: added (base free or unknown → other
 * occupied), removed (base occupied → other free), revealed (base unknown → other free or
 * occupied), hidden (base free or occupied → other unknown). Unknown → occupied counts in both
 * added and revealed, so the four do not sum to the changed cells.
 */
export interface GridDiffCounts {
  added: number;
  removed: number;
  revealed: number;
  hidden: number;
}

/**
 * The difference of another version against a base, on the base's cells. Memory: 1 byte per base
 * cell for `changes`, plus 9 counters.
 */
export interface GridDiff {
  /** Base grid size in cells. */
  width: number;
  height: number;
  /** CellChange per base cell, row-major with row j from the bottom (index j · width + i), like OccupancyGrid.cells. */
  changes: Uint8Array;
  /** Base cells per transition: transitions[3 · baseState + otherState] with CellState codes (Free 0, Occupied 1, Unknown 2). */
  transitions: Float64Array;
}

// Change code per transition, indexed 3 · baseState + otherState.
const CHANGE_OF = new Uint8Array(9);
CHANGE_OF[3 * CellState.Free + CellState.Occupied] = CellChange.Added;
CHANGE_OF[3 * CellState.Unknown + CellState.Occupied] = CellChange.Added;
CHANGE_OF[3 * CellState.Occupied + CellState.Free] = CellChange.Removed;
CHANGE_OF[3 * CellState.Unknown + CellState.Free] = CellChange.Revealed;
CHANGE_OF[3 * CellState.Free + CellState.Unknown] = CellChange.Hidden;
CHANGE_OF[3 * CellState.Occupied + CellState.Unknown] = CellChange.Hidden;

/** Returns an empty difference of the base's size (all None, no transitions counted), for `diffRows` to fill. */
export function emptyGridDiff(base: Pick<OccupancyGrid, 'width' | 'height'>): GridDiff {
  return { width: base.width, height: base.height, changes: new Uint8Array(base.width * base.height), transitions: new Float64Array(9) };
}

/**
 * Fills the base rows j0 ≤ j < j1 of `diff` (from `emptyGridDiff(base)`): each base cell centre in
 * map metres, then the other grid's cell holding it. Returns nothing; callers split long maps into
 * bands of rows to yield between them.
 */
export function diffRows(base: OccupancyGrid, other: OccupancyGrid, diff: GridDiff, j0: number, j1: number): void {
  // Base cell centre → map metres → other grid frame is one affine map of (i, j); its constants
  // are worked out once, so the loop does two multiply-adds per cell and no trig.
  const ca = Math.cos(base.origin.yaw);
  const sa = Math.sin(base.origin.yaw);
  const cb = Math.cos(other.origin.yaw);
  const sb = Math.sin(other.origin.yaw);
  const ra = base.resolution;
  const kb = 1 / other.resolution;
  // Map point of base grid-frame (a, b) metres: x = xa + ca·a − sa·b, y = ya + sa·a + ca·b.
  // Other grid frame: u = (cb·(x − xb) + sb·(y − yb)) / rb, v = (−sb·(x − xb) + cb·(y − yb)) / rb.
  const dx0 = base.origin.x - other.origin.x;
  const dy0 = base.origin.y - other.origin.y;
  const uOf = (a: number, b: number) => (cb * (dx0 + ca * a - sa * b) + sb * (dy0 + sa * a + ca * b)) * kb;
  const vOf = (a: number, b: number) => (-sb * (dx0 + ca * a - sa * b) + cb * (dy0 + sa * a + ca * b)) * kb;
  // Steps per base cell along i and j, in other cells.
  const uDi = uOf(ra, 0) - uOf(0, 0);
  const vDi = vOf(ra, 0) - vOf(0, 0);
  const uDj = uOf(0, ra) - uOf(0, 0);
  const vDj = vOf(0, ra) - vOf(0, 0);
  const u00 = uOf(0.5 * ra, 0.5 * ra);
  const v00 = vOf(0.5 * ra, 0.5 * ra);
  const { width: w, cells: a } = base;
  const { width: ow, height: oh, cells: o } = other;
  const t = diff.transitions;
  for (let j = Math.max(0, j0); j < Math.min(base.height, j1); j++) {
    const uRow = u00 + j * uDj;
    const vRow = v00 + j * vDj;
    const row = j * w;
    for (let i = 0; i < w; i++) {
      // Multiplied, not accumulated, so rounding does not drift along a long row.
      const ui = Math.floor(uRow + i * uDi);
      const vj = Math.floor(vRow + i * vDi);
      const otherState = ui >= 0 && vj >= 0 && ui < ow && vj < oh ? o[vj * ow + ui] : CellState.Unknown;
      const k = 3 * a[row + i] + otherState;
      t[k]++;
      diff.changes[row + i] = CHANGE_OF[k];
    }
  }
}

/** Returns the difference of `other` against `base` on the base's cells (all rows at once; see `diffRows`). */
export function diffGrids(base: OccupancyGrid, other: OccupancyGrid): GridDiff {
  const diff = emptyGridDiff(base);
  diffRows(base, other, diff, 0, base.height);
  return diff;
}

/** Returns the cells per class of change (added, removed, revealed, hidden) of a difference; see GridDiffCounts. */
export function diffCounts(diff: GridDiff): GridDiffCounts {
  const t = (b: number, o: number) => diff.transitions[3 * b + o];
  const { Free: F, Occupied: O, Unknown: U } = CellState;
  return {
    added: t(F, O) + t(U, O),
    removed: t(O, F),
    revealed: t(U, F) + t(U, O),
    hidden: t(F, U) + t(O, U),
  };
}

/** Returns the areas in m² of cell counts on a grid of `resolution` m per cell (cells × resolution²), rounded to 0.0001 m². */
export function diffAreasM2(counts: GridDiffCounts, resolution: number): GridDiffCounts {
  const m2 = (cells: number) => Math.round(cells * resolution * resolution * 1e4) / 1e4;
  return { added: m2(counts.added), removed: m2(counts.removed), revealed: m2(counts.revealed), hidden: m2(counts.hidden) };
}
