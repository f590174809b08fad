import { describe, expect, it } from 'vitest';
import { GridFormatError } from '../../../../shared/grid/errors.js';
import { gridToImage, imageToGrid } from '../../../../shared/grid/image-to-grid.js';
import { encodePgm, parsePgm, type PgmImage } from '../../../../shared/grid/pgm.js';
import { CellState, type MapMetadata } from '../../../../shared/types/grid.js';

const { Free: F, Occupied: O, Unknown: U } = CellState;

const META: MapMetadata = {
  image: 'test.pgm',
  resolution: 0.05,
  origin: [1, 2, 0.25],
  negate: 0,
  occupiedThresh: 0.65,
  freeThresh: 0.196,
  mode: 'trinary',
};

/** A one-row image holding the given grey values. */
function row(values: number[], maxval = 255): PgmImage {
  return { width: values.length, height: 1, maxval, pixels: Uint16Array.from(values) };
}

describe('imageToGrid', () => {
  it('when grey values straddle the default thresholds, then states follow p = (maxval − v)/maxval with strict comparisons', () => {
    // Arrange: hand-computed with the rule of DESIGN §4.1 and the convention's defaults (common practice):
    // v=0 → p=1 O; v=89 → p=166/255=0.6510 > 0.65 O; v=90 → 0.6471 U; v=205 → 50/255=0.19608 ≥ 0.196 U;
    // v=206 → 49/255=0.19216 F; v=255 → 0 F.
    const img = row([0, 89, 90, 205, 206, 255]);

    // Act
    const grid = imageToGrid(img, META);

    // Assert
    expect(Array.from(grid.cells)).toEqual([O, O, U, U, F, F]);
    expect(Array.from(grid.probability)).toEqual([255, 166, 165, 50, 49, 0]);
  });

  it('when negate is 1, then light pixels are occupied (p = v/maxval)', () => {
    // Arrange: v=255 → p=1 O; v=166 → 0.651 O; v=50 → 0.196078 U; v=49 → 0.192 F.
    const img = row([255, 166, 50, 49, 0]);

    // Act
    const grid = imageToGrid(img, { ...META, negate: 1 });

    // Assert
    expect(Array.from(grid.cells)).toEqual([O, O, U, F, F]);
  });

  it('when the image is 16-bit, then p uses maxval 65535', () => {
    // Arrange: v=0 → 1 O; v=22937 → 42598/65535 = 0.65001 O; v=22938 → 0.64999 U; v=65535 → 0 F.
    const img = row([0, 22937, 22938, 65535], 65535);

    // Act
    const grid = imageToGrid(img, META);

    // Assert
    expect(Array.from(grid.cells)).toEqual([O, O, U, F]);
    expect(grid.probability[1]).toBe(Math.round((42598 / 65535) * 255));
  });

  it('when the mode is scale, then states are classified as in trinary and p is kept', () => {
    // Act
    const grid = imageToGrid(row([0, 128, 255]), { ...META, mode: 'scale' });

    // Assert: p = 127/255 for v = 128
    expect(Array.from(grid.cells)).toEqual([O, U, F]);
    expect(grid.probability[1]).toBe(127);
  });

  it('when the mode is raw, then the value is occupancy in percent, negate is ignored, and above 100 is unknown', () => {
    // Arrange: v=100 → 1.00 O; 66 → 0.66 O; 65 → 0.65 not > 0.65 U; 20 → 0.20 U; 19 → 0.19 F; 0 F; 101, 255 U.
    const img = row([100, 66, 65, 20, 19, 0, 101, 255]);

    // Act
    const grid = imageToGrid(img, { ...META, mode: 'raw', negate: 1 });

    // Assert
    expect(Array.from(grid.cells)).toEqual([O, O, U, U, F, F, U, U]);
    expect(Array.from(grid.probability.subarray(0, 6))).toEqual([255, 168, 166, 51, 48, 0]);
  });

  it('when rows are converted, then image row 0 becomes the top grid row (j = height − 1)', () => {
    // Arrange: 2 wide, 3 high; only the top-left pixel is black (DESIGN §4.1: cell (i, j) ↔ image row height − 1 − j).
    const img: PgmImage = { width: 2, height: 3, maxval: 255, pixels: Uint16Array.from([0, 254, 254, 254, 254, 205]) };

    // Act
    const grid = imageToGrid(img, META);

    // Assert: index j * width + i
    expect(grid.cells[2 * 2 + 0]).toBe(O); // top-left: i=0, j=2
    expect(grid.cells[0 * 2 + 1]).toBe(U); // bottom-right: i=1, j=0
    expect(Array.from(grid.cells)).toEqual([F, U, F, F, O, F]);
  });

  it('when converting, then geometry comes from the metadata', () => {
    // Act
    const grid = imageToGrid(row([0, 0, 0]), META);

    // Assert
    expect([grid.width, grid.height, grid.resolution]).toEqual([3, 1, 0.05]);
    expect(grid.origin).toEqual({ x: 1, y: 2, yaw: 0.25 });
  });

  it('when pixel count or values do not fit the size, then a GridFormatError says so', () => {
    expect(() => imageToGrid({ width: 2, height: 2, maxval: 255, pixels: new Uint8Array(3) }, META)).toThrow(GridFormatError);
    expect(() => imageToGrid({ width: 1, height: 1, maxval: 10, pixels: [11] }, META)).toThrow(/above the image's maximum/);
    expect(() => imageToGrid({ width: 1, height: 1, maxval: 0, pixels: [0] }, META)).toThrow(/between 1 and 65,535/);
  });
});

describe('gridToImage', () => {
  it('when rendering, then occupied is 0, free 254 and unknown 205, top row first (common practice, from memory)', () => {
    // Arrange
    const grid = imageToGrid({ width: 2, height: 2, maxval: 255, pixels: [0, 254, 205, 254] }, META);

    // Act
    const img = gridToImage(grid);

    // Assert
    expect(img.maxval).toBe(255);
    expect(Array.from(img.pixels)).toEqual([0, 254, 205, 254]);
  });

  it('when rendering then reading back through PGM with the default thresholds, then every state is kept', () => {
    // Arrange: a 7 × 5 pattern of all three states
    const states = Array.from({ length: 35 }, (_, k) => [F, O, U][(k * 7) % 3]);
    const grid = { ...imageToGrid(row(new Array(35).fill(0)), META), width: 7, height: 5, cells: Uint8Array.from(states) };

    // Act
    const back = imageToGrid(parsePgm(encodePgm(gridToImage(grid))), META);

    // Assert
    expect(Array.from(back.cells)).toEqual(states);
  });
});
