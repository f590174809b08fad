import { CellChange, type GridDiff } from '../grid/diff.js';
import type { GridGeometry } from '../types/grid.js';
import type { RgbaImage } from './grid-image.js';
import { MAP_COLOURS } from './palette.js';
import { pixelsPerCell, tileBounds, TILE_SIZE } from './tiles.js';

/**
 * Overlay colours of a map difference as [r, g, b, a] bytes: structure added amber and removed
 * violet (DESIGN.md §5's new and missing structure), opaque; unknown → known pale teal and known →
 * unknown slate, both see-through so the base grid shows under what may be a large area.
 * Their look is part of TILE_STYLE (palette.ts).
 */
export const DIFF_COLOURS = {
  added: [...MAP_COLOURS.newStructure, 255],
  removed: [...MAP_COLOURS.missingStructure, 255],
  revealed: [0x7f, 0xcf, 0xc4, 160],
  hidden: [0x5b, 0x68, 0x7e, 150],
} as const satisfies Record<string, readonly [number, number, number, number]>;

// RGBA per CellChange code; None is fully transparent.
const RGBA_OF: ReadonlyArray<readonly number[]> = [[0, 0, 0, 0], DIFF_COLOURS.added, DIFF_COLOURS.removed, DIFF_COLOURS.revealed, DIFF_COLOURS.hidden];

/**
 * Returns the change a block of base cells shows: the lowest non-None CellChange code of the block
 * (structure added, then removed, then revealed, then hidden), None when nothing changed or the
 * block lies outside the grid. The block spans columns i0 … i0 + cols − 1 and rows jTop down to
 * jTop − rows + 1 (cells, j from the bottom), so a one-cell change stays visible when scaled down.
 */
export function blockChange(diff: Pick<GridDiff, 'width' | 'height' | 'changes'>, i0: number, jTop: number, cols: number, rows: number): number {
  const iStart = Math.max(0, i0);
  const iEnd = Math.min(diff.width, i0 + cols);
  const jEnd = Math.min(diff.height - 1, jTop);
  const jStart = Math.max(0, jTop - rows + 1);
  let best: number = CellChange.None;
  for (let j = jEnd; j >= jStart; j--) {
    const row = j * diff.width;
    for (let i = iStart; i < iEnd; i++) {
      const c = diff.changes[row + i];
      if (c === CellChange.Added) return c;
      if (c !== CellChange.None && (best === CellChange.None || c < best)) best = c;
    }
  }
  return best;
}

/**
 * Returns tile (x, y) at zoom z of a difference as a 256 × 256 RGBA image in the base version's
 * tile pyramid (tiles.ts): DIFF_COLOURS where the other version differs, transparent elsewhere and
 * outside the grid.
 */
export function renderDiffTile(base: Pick<GridGeometry, 'width' | 'height'>, diff: GridDiff, z: number, x: number, y: number): RgbaImage {
  const data = new Uint8Array(TILE_SIZE * TILE_SIZE * 4);
  const bounds = tileBounds(base, z, x, y);
  const scale = pixelsPerCell(base, z);
  const block = Math.max(1, 1 / scale);
  const pxPerCell = Math.max(1, scale);
  for (let py = 0; py < TILE_SIZE; py++) {
    const jTop = bounds.jMax - 1 - Math.floor(py / pxPerCell) * block;
    for (let px = 0; px < TILE_SIZE; px++) {
      const change = blockChange(diff, bounds.iMin + Math.floor(px / pxPerCell) * block, jTop, block, block);
      if (change === CellChange.None) continue;
      data.set(RGBA_OF[change], (py * TILE_SIZE + px) * 4);
    }
  }
  return { width: TILE_SIZE, height: TILE_SIZE, data };
}
