import { describe, expect, it } from 'vitest';
import { CellChange, emptyGridDiff, type GridDiff } from '../../../../shared/grid/diff.js';
import { blockChange, DIFF_COLOURS, renderDiffTile } from '../../../../shared/render/diff-tiles.js';

function diffOf(width: number, height: number, marks: Array<[number, number, number]>): GridDiff {
  const diff = emptyGridDiff({ width, height });
  for (const [i, j, change] of marks) diff.changes[j * width + i] = change;
  return diff;
}
const rgba = (img: { width: number; data: Uint8Array }, x: number, y: number) => Array.from(img.data.slice((y * img.width + x) * 4, (y * img.width + x) * 4 + 4));
// Amber #e38b1b and violet #6a4bd6 are DESIGN.md §5's new and missing structure, opaque.
const AMBER = [0xe3, 0x8b, 0x1b, 255];
const VIOLET = [0x6a, 0x4b, 0xd6, 255];
const TRANSPARENT = [0, 0, 0, 0];

describe('blockChange', () => {
  it('when a block holds several changes, then added wins over removed, removed over revealed, revealed over hidden', () => {
    const diff = diffOf(4, 1, [[0, 0, CellChange.Hidden], [1, 0, CellChange.Revealed], [2, 0, CellChange.Removed], [3, 0, CellChange.Added]]);

    expect(blockChange(diff, 0, 0, 4, 1)).toBe(CellChange.Added);
    expect(blockChange(diff, 0, 0, 3, 1)).toBe(CellChange.Removed);
    expect(blockChange(diff, 0, 0, 2, 1)).toBe(CellChange.Revealed);
    expect(blockChange(diff, 0, 0, 1, 1)).toBe(CellChange.Hidden);
  });

  it('when the block lies outside the grid, then it shows no change', () => {
    const diff = diffOf(2, 2, [[0, 0, CellChange.Added]]);

    expect(blockChange(diff, 2, 1, 2, 2)).toBe(CellChange.None);
    expect(blockChange(diff, -4, 5, 2, 2)).toBe(CellChange.None);
  });
});

describe('renderDiffTile', () => {
  it('when the base is 40 × 40 cells, then zoom 0 draws one pixel per cell from the top-left, changes coloured and the rest transparent', () => {
    // Arrange: 40 ≤ 512, so zoom 0 is 1 pixel per cell (tiles.ts); cell (i, j) is pixel (i, 39 − j).
    const base = { width: 40, height: 40 };
    const diff = diffOf(40, 40, [[3, 0, CellChange.Added], [5, 39, CellChange.Removed], [10, 10, CellChange.Revealed], [11, 10, CellChange.Hidden]]);

    // Act
    const img = renderDiffTile(base, diff, 0, 0, 0);

    // Assert
    expect([img.width, img.height]).toEqual([256, 256]);
    expect(rgba(img, 3, 39)).toEqual(AMBER);
    expect(rgba(img, 5, 0)).toEqual(VIOLET);
    expect(rgba(img, 10, 29)).toEqual([...DIFF_COLOURS.revealed]);
    expect(rgba(img, 11, 29)).toEqual([...DIFF_COLOURS.hidden]);
    expect(rgba(img, 0, 0)).toEqual(TRANSPARENT);
    expect(rgba(img, 100, 100)).toEqual(TRANSPARENT);
  });

  it('when zoomed in to 4 pixels per cell, then one changed cell fills a 4 × 4 pixel square', () => {
    // Arrange: zoom 2 on a 40 × 40 base is 2^(2 − 0) = 4 pixels per cell; cell (0, 39) is the top-left corner.
    const diff = diffOf(40, 40, [[0, 39, CellChange.Added]]);

    // Act
    const img = renderDiffTile({ width: 40, height: 40 }, diff, 2, 0, 0);

    // Assert
    expect(rgba(img, 0, 0)).toEqual(AMBER);
    expect(rgba(img, 3, 3)).toEqual(AMBER);
    expect(rgba(img, 4, 0)).toEqual(TRANSPARENT);
    expect(rgba(img, 0, 4)).toEqual(TRANSPARENT);
  });

  it('when zoomed out to 2 cells per pixel, then a single removed cell still colours its pixel', () => {
    // Arrange: 1000 × 600 cells → k = 1, zoom 0 is 2 cells per pixel (tiles.ts). Cell (7, 0) lies
    // in block columns 6–7 → pixel x 3, and in the bottom block rows 0–1 → pixel y (600 − 2) / 2 = 299
    // of the pyramid, which is row 299 − 256 = 43 of tile (0, 1).
    const diff = diffOf(1000, 600, [[7, 0, CellChange.Removed]]);

    // Act
    const img = renderDiffTile({ width: 1000, height: 600 }, diff, 0, 0, 1);

    // Assert
    expect(rgba(img, 3, 43)).toEqual(VIOLET);
    expect(rgba(img, 4, 43)).toEqual(TRANSPARENT);
    expect(rgba(img, 3, 44)).toEqual(TRANSPARENT);
  });
});
