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
  return squarePasses(mask, width, height, radius, 1);
}

/** Erosion of the mask (non-zero = set) by a square or disc of `radius` cells; a new 0/1 mask. 1 byte per cell. */
export function erode(mask: Uint8Array, width: number, height: number, radius: number, shape: ElementShape = 'square'): Uint8Array {
  checkInput(mask, width, height, radius, shape);
  if (shape === 'disc') return discThreshold(mask, width, height, radius, 0);
  return squarePasses(mask, width, height, radius, 0);
}

/** Closing (dilation, then erosion) by a square or disc of `radius` cells: fills gaps narrower than the element; a new 0/1 mask. */
export function closing(mask: Uint8Array, width: number, height: number, radius: number, shape: ElementShape = 'square'): Uint8Array {
  return erode(dilate(mask, width, height, radius, shape), width, height, radius, shape);
}

/**
 * Square element, separable: a cell of the result is `1 − seek` when no cell equal to `seek` lies
 * within ±radius along the row, then along the column. Dilation seeks 1 (any set cell spreads),
 * erosion seeks 0 (any clear cell erodes).
 */
function squarePasses(mask: Uint8Array, width: number, height: number, radius: number, seek: 0 | 1): Uint8Array {
  const r = Math.floor(radius);
  const rows = new Uint8Array(mask.length);
  const out = new Uint8Array(mask.length);
  for (let j = 0; j < height; j++) slideLine(mask, rows, j * width, width, r, seek);
  slideColumns(rows, out, width, height, r, seek);
  return out;
}

/**
 * The column pass, run row by row with one running count per column: the same window sums as
 * sliding down each column, but reading memory in order, which is several times faster on large
 * grids than striding by a whole row per step.
 */
function slideColumns(src: Uint8Array, dst: Uint8Array, width: number, height: number, r: number, seek: 0 | 1): void {
  const wantSet = seek === 1;
  const notFound = 1 - seek;
  const counts = new Int32Array(width);
  const firstEnd = Math.min(r, height - 1);
  for (let j = 0; j <= firstEnd; j++) {
    const row = j * width;
    for (let i = 0; i < width; i++) if ((src[row + i] !== 0) === wantSet) counts[i]++;
  }
  for (let j = 0; j < height; j++) {
    const row = j * width;
    for (let i = 0; i < width; i++) dst[row + i] = counts[i] > 0 ? seek : notFound;
    const leaving = j - r;
    if (leaving >= 0) {
      const lrow = leaving * width;
      for (let i = 0; i < width; i++) if ((src[lrow + i] !== 0) === wantSet) counts[i]--;
    }
    const entering = j + r + 1;
    if (entering < height) {
      const erow = entering * width;
      for (let i = 0; i < width; i++) if ((src[erow + i] !== 0) === wantSet) counts[i]++;
    }
  }
}

/** One row of `length` cells starting at `start`: running count of `seek` in the window ±r. */
function slideLine(src: Uint8Array, dst: Uint8Array, start: number, length: number, r: number, seek: 0 | 1): void {
  const found = seek;
  const notFound = 1 - seek;
  // Any non-zero input counts as set, so masks of other 0/non-0 values work too.
  const wantSet = seek === 1;
  let count = 0;
  // Window of position 0 covers cells 0…r (the part inside the line).
  const firstEnd = Math.min(r, length - 1);
  for (let q = 0; q <= firstEnd; q++) if ((src[start + q] !== 0) === wantSet) count++;
  for (let q = 0; q < length; q++) {
    dst[start + q] = count > 0 ? found : notFound;
    // Slide: cell q − r leaves, cell q + r + 1 enters.
    const leaving = q - r;
    if (leaving >= 0 && (src[start + leaving] !== 0) === wantSet) count--;
    const entering = q + r + 1;
    if (entering < length && (src[start + entering] !== 0) === wantSet) count++;
  }
}

/**
 * Disc element through the exact distance transform: dilation sets the cells within `radius` of a
 * set cell; erosion keeps the cells farther than `radius` from every clear cell. Memory: 8 bytes per cell.
 */
function discThreshold(mask: Uint8Array, width: number, height: number, radius: number, seek: 0 | 1): Uint8Array {
  const source = seek === 1 ? mask : invert(mask);
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

function invert(mask: Uint8Array): Uint8Array {
  const out = new Uint8Array(mask.length);
  for (let k = 0; k < mask.length; k++) out[k] = mask[k] !== 0 ? 0 : 1;
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
