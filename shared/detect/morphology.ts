/**
 * Binary dilation, erosion and closing of a mask, used to close small gaps between flagged cells
 * before they are grouped into zones. Square elements run as two separable running-count passes
 * (rows, then columns), disc elements through the exact squared distance transform; both cost
 * O(cells) whatever the radius. Cells outside the grid are ignored: they neither grow a dilation
 * nor erode an edge, so a closing never eats into the grid's border (and what a dilation pushes
 * onto the border stays there). This is the same border rule as OpenCV's default.
 */
import { checkMaskSize, squaredDistanceTransform } from '../grid/distance-transform.js';

/** Shape of the structuring element: `square` (side 2r + 1 cells) or `disc` (offsets with dx² + dy² ≤ r², cells). */
export type ElementShape = 'square' | 'disc';

/** Dilation of the mask (non-zero = set) by a square or disc of `radius` cells; a new 0/1 mask. 1 byte per cell. */
export function dilate(mask: Uint8Array, width: number, height: number, radius: number, shape: ElementShape = 'square'): Uint8Array {
  checkInput(mask, width, height, radius, shape);
  if (shape === 'disc') return discThreshold(mask, width, height, radius, 1);
  return squareDilate(toBinary(mask, false), width, height, radius);
}

/** Erosion of the mask (non-zero = set) by a square or disc of `radius` cells; a new 0/1 mask. 1 byte per cell. */
export function erode(mask: Uint8Array, width: number, height: number, radius: number, shape: ElementShape = 'square'): Uint8Array {
  checkInput(mask, width, height, radius, shape);
  if (shape === 'disc') return discThreshold(mask, width, height, radius, 0);
  // Erosion is the complement of the dilated complement; outside cells count in neither, so the
  // border rule carries over unchanged.
  const out = squareDilate(toBinary(mask, true), width, height, radius);
  for (let k = 0; k < out.length; k++) out[k] ^= 1;
  return out;
}

/** Closing (dilation, then erosion) by a square or disc of `radius` cells: fills gaps narrower than the element; a new 0/1 mask. */
export function closing(mask: Uint8Array, width: number, height: number, radius: number, shape: ElementShape = 'square'): Uint8Array {
  return erode(dilate(mask, width, height, radius, shape), width, height, radius, shape);
}

/**
 * Square dilation of a strict 0/1 mask, separable: running window sums of ±r cells along each row,
 * then along each column; a cell is set when its window sum is positive. Adding the 0/1 values
 * directly keeps the inner loops free of branches.
 */
function squareDilate(set: Uint8Array, width: number, height: number, radius: number): Uint8Array {
  const r = Math.floor(radius);
  const rows = new Uint8Array(set.length);
  for (let j = 0; j < height; j++) {
    const start = j * width;
    let count = 0;
    // Window of position 0 covers cells 0…r (the part inside the row).
    const firstEnd = Math.min(r, width - 1);
    for (let q = 0; q <= firstEnd; q++) count += set[start + q];
    for (let q = 0; q < width; q++) {
      rows[start + q] = count > 0 ? 1 : 0;
      // Slide: cell q − r leaves, cell q + r + 1 enters.
      if (q - r >= 0) count -= set[start + q - r];
      if (q + r + 1 < width) count += set[start + q + r + 1];
    }
  }
  // The column pass runs row by row with one running sum per column: the same window sums as
  // sliding down each column, but reading memory in order, which is much faster on large grids.
  const out = new Uint8Array(set.length);
  const counts = new Int32Array(width);
  const firstEnd = Math.min(r, height - 1);
  for (let j = 0; j <= firstEnd; j++) {
    const row = j * width;
    for (let i = 0; i < width; i++) counts[i] += rows[row + i];
  }
  for (let j = 0; j < height; j++) {
    const row = j * width;
    for (let i = 0; i < width; i++) out[row + i] = counts[i] > 0 ? 1 : 0;
    if (j - r >= 0) {
      const leaving = (j - r) * width;
      for (let i = 0; i < width; i++) counts[i] -= rows[leaving + i];
    }
    if (j + r + 1 < height) {
      const entering = (j + r + 1) * width;
      for (let i = 0; i < width; i++) counts[i] += rows[entering + i];
    }
  }
  return out;
}

/** Strict 0/1 copy of a mask (non-zero = 1), complemented when `complement` is true. */
function toBinary(mask: Uint8Array, complement: boolean): Uint8Array {
  const out = new Uint8Array(mask.length);
  const on = complement ? 0 : 1;
  const off = complement ? 1 : 0;
  for (let k = 0; k < mask.length; k++) out[k] = mask[k] !== 0 ? on : off;
  return out;
}

/**
 * Disc element through the exact distance transform: dilation sets the cells within `radius` of a
 * set cell; erosion keeps the cells farther than `radius` from every clear cell. Memory: 8 bytes per cell.
 */
function discThreshold(mask: Uint8Array, width: number, height: number, radius: number, seek: 0 | 1): Uint8Array {
  const source = seek === 1 ? mask : toBinary(mask, true);
  const squared = squaredDistanceTransform(source, width, height);
  const r2 = radius * radius;
  const out = new Uint8Array(mask.length);
  if (seek === 1) {
    for (let k = 0; k < out.length; k++) out[k] = squared[k] <= r2 ? 1 : 0;
  } else {
    // With no clear cell at all the distance is Infinity and every cell survives.
    for (let k = 0; k < out.length; k++) out[k] = squared[k] > r2 ? 1 : 0;
  }
  return out;
}

function checkInput(mask: Uint8Array, width: number, height: number, radius: number, shape: ElementShape): void {
  checkMaskSize(mask, width, height);
  if (!(radius >= 0) || !Number.isFinite(radius)) throw new RangeError(`Radius must be zero or more cells, got ${radius}.`);
  if (shape === 'square' && !Number.isInteger(radius)) {
    throw new RangeError(`A square element needs a whole number of cells as radius, got ${radius}.`);
  }
  if (shape !== 'square' && shape !== 'disc') throw new RangeError(`Element shape must be 'square' or 'disc', got ${String(shape)}.`);
}
