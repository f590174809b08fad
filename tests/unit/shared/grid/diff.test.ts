import { describe, expect, it } from 'vitest';
import { CellChange, diffAreasM2, diffCounts, diffGrids, diffRows, emptyGridDiff } from '../../../../shared/grid/diff.js';
import { CellState, type OccupancyGrid } from '../../../../shared/types/grid.js';

/**
 * A grid drawn as a picture: `rows` from the TOP row down, '.' free, '#' occupied, '?' unknown.
 * Cell (i, j) counts j from the bottom (DESIGN.md §4.1), so the last string is row j = 0.
 */
function drawn(rows: string[], resolution: number, origin: { x: number; y: number; yaw: number }): OccupancyGrid {
  const height = rows.length;
  const width = rows[0].length;
  const cells = new Uint8Array(width * height);
  rows.forEach((line, r) => {
    const j = height - 1 - r;
    for (let i = 0; i < width; i++) cells[j * width + i] = line[i] === '#' ? CellState.Occupied : line[i] === '?' ? CellState.Unknown : CellState.Free;
  });
  return { width, height, resolution, origin, cells, probability: new Uint8Array(width * height) };
}

const at = (diff: { width: number; changes: Uint8Array }, i: number, j: number) => diff.changes[j * diff.width + i];

// Every expected value below is worked by hand from the rule of DESIGN.md §4.1 (world → cell:
// rotate by −yaw about the origin, i = floor(x'/res), j = floor(y'/res)) applied to base cell
// centres, and the class definitions of the issue (added: free/unknown → occupied, removed:
// occupied → free, revealed: unknown → known, hidden: known → unknown).
describe('diffGrids', () => {
  it('when both versions share one geometry, then each cell is compared with its twin and the four classes are counted', () => {
    // Arrange: 4 × 3 cells at 0.5 m. Cell by cell (i, j): (1,0) free → occupied added; (2,0) occupied
    // → free removed; (3,0) occupied → unknown hidden; (0,1) unknown → free revealed; (1,1) unknown →
    // occupied added and revealed; (2,2) free → unknown hidden; the other six unchanged.
    const geometry = { x: 0, y: 0, yaw: 0 };
    const base = drawn(['....', '??.#', '..##'], 0.5, geometry);
    const other = drawn(['..?.', '.#.#', '.#.?'], 0.5, geometry);

    // Act
    const diff = diffGrids(base, other);

    // Assert
    expect(diffCounts(diff)).toEqual({ added: 2, removed: 1, revealed: 2, hidden: 2 });
    // Areas: cells × 0.5² = 0.25 m² each.
    expect(diffAreasM2(diffCounts(diff), base.resolution)).toEqual({ added: 0.5, removed: 0.25, revealed: 0.5, hidden: 0.5 });
    expect(at(diff, 1, 0)).toBe(CellChange.Added);
    expect(at(diff, 2, 0)).toBe(CellChange.Removed);
    expect(at(diff, 3, 0)).toBe(CellChange.Hidden);
    expect(at(diff, 0, 1)).toBe(CellChange.Revealed);
    // Unknown → occupied shows as added (structure first) though it also counts as revealed.
    expect(at(diff, 1, 1)).toBe(CellChange.Added);
    expect(at(diff, 2, 2)).toBe(CellChange.Hidden);
    expect(Array.from(diff.changes).filter((c) => c === CellChange.None)).toHaveLength(6);
  });

  it('when the versions are the same grid, then nothing changed', () => {
    const base = drawn(['#..?', '#.##'], 0.05, { x: -3, y: 2, yaw: 0.3 });

    const diff = diffGrids(base, base);

    expect(diffCounts(diff)).toEqual({ added: 0, removed: 0, revealed: 0, hidden: 0 });
    expect(diff.changes.every((c) => c === CellChange.None)).toBe(true);
  });

  it('when the other origin lies 1 m to the right, then base cell i meets other cell i − 1 and the strip outside it counts as unknown', () => {
    // Arrange: base 3 × 2 at 1 m, origin (0, 0), all free. Other 3 × 2 at 1 m, origin (1, 0).
    // Base centres x = 0.5, 1.5, 2.5 → other u = −0.5, 0.5, 1.5 → outside, cell 0, cell 1.
    const base = drawn(['...', '...'], 1, { x: 0, y: 0, yaw: 0 });
    const other = drawn(['..#', '#..'], 1, { x: 1, y: 0, yaw: 0 });

    // Act
    const diff = diffGrids(base, other);

    // Assert: base (1, 0) meets other (0, 0), occupied → added; base (0, 0) and (0, 1) lie outside
    // the other grid → hidden; other (2, 1) is past the base and not compared.
    expect(diffCounts(diff)).toEqual({ added: 1, removed: 0, revealed: 0, hidden: 2 });
    expect(at(diff, 1, 0)).toBe(CellChange.Added);
    expect(at(diff, 0, 0)).toBe(CellChange.Hidden);
    expect(at(diff, 0, 1)).toBe(CellChange.Hidden);
    expect(at(diff, 2, 1)).toBe(CellChange.None);
  });

  it('when the other grid is finer, then each base centre takes the one fine cell holding it and areas use the base resolution', () => {
    // Arrange: base 2 × 1 at 1 m, all unknown. Other 8 × 3 at 0.4 m, same origin. Base centres
    // (0.5, 0.5) and (1.5, 0.5) m → other (1.25, 1.25) and (3.75, 1.25) cells → cells (1, 1), (3, 1).
    const base = drawn(['??'], 1, { x: 0, y: 0, yaw: 0 });
    const other = drawn(['????????', '?#?.????', '????????'], 0.4, { x: 0, y: 0, yaw: 0 });

    // Act
    const diff = diffGrids(base, other);

    // Assert: (0, 0) unknown → occupied (added and revealed), (1, 0) unknown → free (revealed);
    // at the base's 1 m per cell that is 1 m² added and 2 m² revealed.
    expect(diffCounts(diff)).toEqual({ added: 1, removed: 0, revealed: 2, hidden: 0 });
    expect(diffAreasM2(diffCounts(diff), base.resolution)).toEqual({ added: 1, removed: 0, revealed: 2, hidden: 0 });
    expect(at(diff, 0, 0)).toBe(CellChange.Added);
    expect(at(diff, 1, 0)).toBe(CellChange.Revealed);
  });

  it('when the other grid is turned by 90° about origin (3, 0), then base cell (i, j) meets other cell (j, 2 − i)', () => {
    // Arrange: base 3 × 2 at 1 m, origin (0, 0, 0), covering x 0…3, y 0…2. Other 2 × 3 at 1 m,
    // origin (3, 0, π/2): for a base centre (x, y), dx = x − 3, dy = y; u = cos·dx + sin·dy = y,
    // v = −sin·dx + cos·dy = 3 − x. Centre (i + ½, j + ½) → u = j + ½, v = 2½ − i → cell (j, 2 − i).
    // Other picture (2 wide, 3 high, top row is j = 2): (1, 2) occupied, (0, 0) occupied.
    const base = drawn(['#?.', '...'], 1, { x: 0, y: 0, yaw: 0 });
    const other = drawn(['.#', '..', '#.'], 1, { x: 3, y: 0, yaw: Math.PI / 2 });

    // Act
    const diff = diffGrids(base, other);

    // Assert: base (2, 0) → other (0, 0) occupied: added. Base (0, 1) occupied → other (1, 2)
    // occupied: unchanged. Base (1, 1) unknown → other (1, 1) free: revealed. The rest free → free.
    expect(diffCounts(diff)).toEqual({ added: 1, removed: 0, revealed: 1, hidden: 0 });
    expect(at(diff, 2, 0)).toBe(CellChange.Added);
    expect(at(diff, 0, 1)).toBe(CellChange.None);
    expect(at(diff, 1, 1)).toBe(CellChange.Revealed);
  });

  it('when the base is the turned one, then base cell (i, j) of origin (3, 0, 90°) meets upright cell (2 − j, i)', () => {
    // Arrange: base 2 × 3 at 1 m, origin (3, 0, π/2): its centre (i + ½, j + ½) in the grid frame
    // is x = 3 − (j + ½), y = i + ½ in map metres (x = x0 + cos·a − sin·b, y = y0 + sin·a + cos·b).
    // Other 3 × 2 upright at origin (0, 0): cell (floor(2½ − j), floor(i + ½)) = (2 − j, i).
    // Base: (0, 0) occupied, (1, 2) free, all else free except (0, 2) unknown.
    const base = drawn(['?.', '..', '#.'], 1, { x: 3, y: 0, yaw: Math.PI / 2 });
    // Other (3 wide, 2 high): (2, 0) free, (0, 1) occupied, (2, 1) occupied.
    const other = drawn(['#.#', '...'], 1, { x: 0, y: 0, yaw: 0 });

    // Act
    const diff = diffGrids(base, other);

    // Assert: base (0, 0) occupied → other (2, 0) free: removed. Base (1, 2) free → other (0, 1)
    // occupied: added. Base (0, 2) unknown → other (0, 0) free: revealed. Base (1, 0) → other (2, 1)
    // occupied: added. Base (0, 1), (1, 1) → other (1, 0), (1, 1) free: unchanged.
    expect(diffCounts(diff)).toEqual({ added: 2, removed: 1, revealed: 1, hidden: 0 });
    expect(at(diff, 0, 0)).toBe(CellChange.Removed);
    expect(at(diff, 1, 2)).toBe(CellChange.Added);
    expect(at(diff, 0, 2)).toBe(CellChange.Revealed);
    expect(at(diff, 1, 0)).toBe(CellChange.Added);
    expect(at(diff, 0, 1)).toBe(CellChange.None);
  });
});

describe('diffRows', () => {
  it('when a map is compared in bands of rows, then the result equals the whole-map comparison', () => {
    const base = drawn(['#..?#', '.?#..', '##...', '..?.#'], 0.05, { x: 0.02, y: -0.01, yaw: 0 });
    const other = drawn(['.#.?', '#?..', '.#.#'], 0.06, { x: 0, y: 0, yaw: 0.2 });
    const whole = diffGrids(base, other);

    const banded = emptyGridDiff(base);
    diffRows(base, other, banded, 0, 1);
    diffRows(base, other, banded, 1, 3);
    diffRows(base, other, banded, 3, 4);

    expect(Array.from(banded.changes)).toEqual(Array.from(whole.changes));
    expect(Array.from(banded.transitions)).toEqual(Array.from(whole.transitions));
    // Every base cell is counted exactly once.
    expect(banded.transitions.reduce((s, n) => s + n, 0)).toBe(base.width * base.height);
  });
});
