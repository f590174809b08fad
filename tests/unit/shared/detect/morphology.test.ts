import { beforeAll, describe, expect, it } from 'vitest';
import { closing, dilate, erode, type ElementShape } from '../../../../shared/detect/morphology.js';
import { loadOpenCv } from './opencv.js';
import { randomMask } from './random-mask.js';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
let cv: any;

/**
 * Brute force of the definitions (Serra, "Image Analysis and Mathematical Morphology", 1982; from memory):
 * dilation = some in-grid cell of the element around p is set; erosion = every in-grid cell of it is set.
 */
function bruteMorph(mask: Uint8Array, width: number, height: number, radius: number, shape: ElementShape, op: 'dilate' | 'erode'): Uint8Array {
  const out = new Uint8Array(mask.length);
  const r = Math.ceil(radius);
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      let any = false;
      let all = true;
      for (let dj = -r; dj <= r; dj++) {
        for (let di = -r; di <= r; di++) {
          if (shape === 'disc' && di * di + dj * dj > radius * radius) continue;
          const ni = i + di;
          const nj = j + dj;
          if (ni < 0 || nj < 0 || ni >= width || nj >= height) continue;
          const set = mask[nj * width + ni] !== 0;
          any ||= set;
          all &&= set;
        }
      }
      out[j * width + i] = (op === 'dilate' ? any : all) ? 1 : 0;
    }
  }
  return out;
}

describe('binary morphology', () => {
  beforeAll(async () => {
    ({ cv } = await loadOpenCv());
  });

  it('when random masks are dilated and eroded by squares and discs, then results equal the brute-force definition', () => {
    for (const [width, height, density, seed] of [
      [37, 29, 0.1, 1],
      [20, 45, 0.7, 2],
      [1, 30, 0.3, 3],
    ] as const) {
      const mask = randomMask(width, height, density, seed);
      for (const [radius, shape] of [
        [0, 'square'],
        [1, 'square'],
        [3, 'square'],
        [1, 'disc'],
        [2.5, 'disc'],
        [4, 'disc'],
      ] as const) {
        // Act + Assert
        expect(Array.from(dilate(mask, width, height, radius, shape))).toEqual(
          Array.from(bruteMorph(mask, width, height, radius, shape, 'dilate')),
        );
        expect(Array.from(erode(mask, width, height, radius, shape))).toEqual(
          Array.from(bruteMorph(mask, width, height, radius, shape, 'erode')),
        );
        const dilated = bruteMorph(mask, width, height, radius, shape, 'dilate');
        expect(Array.from(closing(mask, width, height, radius, shape))).toEqual(
          Array.from(bruteMorph(dilated, width, height, radius, shape, 'erode')),
        );
      }
    }
  });

  it('when compared with OpenCV square dilation, erosion and closing, then the masks are identical', () => {
    // Reference: @techstark/opencv-js@4.5.2 cv.dilate / cv.erode / cv.morphologyEx(MORPH_CLOSE) with a
    // MORPH_RECT element of side 2r + 1 and the default constant border, which leaves outside cells out.
    const width = 60;
    const height = 45;
    const mask = randomMask(width, height, 0.15, 9);
    for (const r of [1, 2]) {
      const src = cv.matFromArray(height, width, cv.CV_8UC1, Array.from(mask));
      const element = cv.getStructuringElement(cv.MORPH_RECT, new cv.Size(2 * r + 1, 2 * r + 1));
      const anchor = new cv.Point(-1, -1);
      const border = cv.morphologyDefaultBorderValue();
      const dilated = new cv.Mat();
      const eroded = new cv.Mat();
      const closed = new cv.Mat();
      cv.dilate(src, dilated, element, anchor, 1, cv.BORDER_CONSTANT, border);
      cv.erode(src, eroded, element, anchor, 1, cv.BORDER_CONSTANT, border);
      cv.morphologyEx(src, closed, cv.MORPH_CLOSE, element, anchor, 1, cv.BORDER_CONSTANT, border);
      // Act + Assert
      expect(Array.from(dilate(mask, width, height, r))).toEqual(Array.from(dilated.data as Uint8Array));
      expect(Array.from(erode(mask, width, height, r))).toEqual(Array.from(eroded.data as Uint8Array));
      expect(Array.from(closing(mask, width, height, r))).toEqual(Array.from(closed.data as Uint8Array));
      for (const m of [src, element, dilated, eroded, closed]) m.delete();
    }
  });

  it('when two flagged patches are one cell apart, then a radius-1 closing joins them and keeps every original cell', () => {
    // Arrange: two 3 × 3 blocks with a one-cell gap at column 5, two cells clear of the grid's edges
    // (a dilation that reaches the edge stays there, because erosion ignores cells outside the grid).
    const width = 11;
    const height = 7;
    const mask = new Uint8Array(width * height);
    for (let j = 2; j <= 4; j++) for (const i of [2, 3, 4, 6, 7, 8]) mask[j * width + i] = 1;
    // Act
    const closed = closing(mask, width, height, 1, 'square');
    // Assert: the gap fills, nothing set is lost, and nothing grows beyond the blocks' hull.
    for (let j = 2; j <= 4; j++) expect(closed[j * width + 5]).toBe(1);
    for (let k = 0; k < mask.length; k++) if (mask[k]) expect(closed[k]).toBe(1);
    expect(closed[1 * width + 5]).toBe(0);
    expect(closed.reduce((sum, v) => sum + v, 0)).toBe(21);
  });

  it('when the radius or shape is unusable, then a RangeError explains it', () => {
    const mask = new Uint8Array(4);
    expect(() => dilate(mask, 2, 2, -1)).toThrow(/Radius/);
    expect(() => dilate(mask, 2, 2, 1.5, 'square')).toThrow(/whole number/);
    expect(() => erode(mask, 2, 3, 1)).toThrow(/needs 6/);
  });
});
