/**
 * Exact Euclidean distance transform of a binary feature mask, after Felzenszwalb & Huttenlocher,
 * "Distance Transforms of Sampled Functions", Theory of Computing 8 (2012): the squared distance
 * is separable, so a 1-D pass over every column and then a lower-envelope-of-parabolas pass over
 * every row gives the exact result in O(cells) time.
 *
 * Coordinates: cell (i, j) is at index j * width + i and covers [i, i + 1) × [j, j + 1) in
 * continuous cell coordinates, so its sample sits at (i + 0.5, j + 0.5). Distances are measured
 * between cell centres.
 */

/** A distance field: per-cell distance in cells (Infinity where the mask has no feature). 4 bytes per cell. */
export interface DistanceField {
  width: number;
  height: number;
  /** Distance in cells from each cell centre to the nearest feature cell centre; index j * width + i. */
  values: Float32Array;
}

/**
 * Squared Euclidean distance transform of a 1-D sampled function `f` (length n), in place into `d`.
 * Samples equal to Infinity are not features; they never enter the lower envelope, which avoids
 * the Infinity − Infinity = NaN that the paper's finite "large number" trick would otherwise hide.
 * `v` (Int32Array n) and `z` (Float64Array n + 1) are caller-owned scratch so the hot loop allocates nothing.
 */
function transform1D(f: Float64Array, n: number, d: Float64Array, v: Int32Array, z: Float64Array): void {
  let k = -1;
  for (let q = 0; q < n; q++) {
    const fq = f[q];
    if (fq === Infinity) continue;
    if (k < 0) {
      k = 0;
      v[0] = q;
      z[0] = -Infinity;
      z[1] = Infinity;
      continue;
    }
    // Intersection of the parabola rooted at q with the rightmost one in the envelope (paper, eq. in §2.1).
    let s = (fq + q * q - (f[v[k]] + v[k] * v[k])) / (2 * q - 2 * v[k]);
    while (s <= z[k]) {
      k--;
      // k cannot fall below 0: z[0] is −Infinity, so the loop always stops at the first parabola.
      s = (fq + q * q - (f[v[k]] + v[k] * v[k])) / (2 * q - 2 * v[k]);
    }
    k++;
    v[k] = q;
    z[k] = s;
    z[k + 1] = Infinity;
  }
  if (k < 0) {
    // No feature on this line: every sample stays unreachable along it.
    d.fill(Infinity, 0, n);
    return;
  }
  let m = 0;
  for (let q = 0; q < n; q++) {
    while (z[m + 1] < q) m++;
    const dq = q - v[m];
    d[q] = dq * dq + f[v[m]];
  }
}

/**
 * Squared Euclidean distance in cells² from each cell centre to the nearest cell with mask ≠ 0,
 * Infinity when the mask has none. Float64Array because squared distances above 2^24 (grids
 * wider than ~4096 cells) are not exact in float32. Memory: 8 bytes per cell.
 */
export function squaredDistanceTransform(mask: Uint8Array, width: number, height: number): Float64Array {
  checkMaskSize(mask, width, height);
  const out = new Float64Array(width * height);
  const n = width;
  const f = new Float64Array(n);
  const d = new Float64Array(n);
  const v = new Int32Array(n);
  const z = new Float64Array(n + 1);
  // Pass 1, columns. For a binary mask (f = 0 on features, Infinity elsewhere) the 1-D transform
  // is just the squared distance to the nearest feature in the same column, which two sweeps
  // find exactly (as in the paper's §2 for such f). Sweeping whole rows with one state per column
  // reads memory in order instead of striding a full row per cell, several times faster on big grids.
  const last = new Int32Array(width).fill(-1);
  for (let j = 0; j < height; j++) {
    const row = j * width;
    for (let i = 0; i < width; i++) {
      if (mask[row + i] !== 0) last[i] = j;
      const gap = j - last[i];
      out[row + i] = last[i] < 0 ? Infinity : gap * gap;
    }
  }
  last.fill(-1);
  for (let j = height - 1; j >= 0; j--) {
    const row = j * width;
    for (let i = 0; i < width; i++) {
      if (mask[row + i] !== 0) last[i] = j;
      if (last[i] < 0) continue;
      const gap = last[i] - j;
      if (gap * gap < out[row + i]) out[row + i] = gap * gap;
    }
  }
  // Pass 2, rows: the column result is the sampled function whose lower envelope gives dx² + dy².
  for (let j = 0; j < height; j++) {
    const row = j * width;
    for (let i = 0; i < width; i++) f[i] = out[row + i];
    transform1D(f, width, d, v, z);
    for (let i = 0; i < width; i++) out[row + i] = d[i];
  }
  return out;
}

/** Euclidean distance field in cells from each cell centre to the nearest cell with mask ≠ 0 (Infinity if none). */
export function distanceTransform(mask: Uint8Array, width: number, height: number): DistanceField {
  const squared = squaredDistanceTransform(mask, width, height);
  const values = new Float32Array(squared.length);
  for (let k = 0; k < squared.length; k++) values[k] = Math.sqrt(squared[k]);
  return { width, height, values };
}

/** Copy of a distance field's values converted from cells to metres (resolution in metres per cell). */
export function distancesInMetres(field: DistanceField, resolution: number): Float32Array {
  if (!(resolution > 0) || !Number.isFinite(resolution)) {
    throw new RangeError(`Resolution must be a positive number of metres per cell, got ${resolution}.`);
  }
  const out = new Float32Array(field.values.length);
  for (let k = 0; k < out.length; k++) out[k] = field.values[k] * resolution;
  return out;
}

/**
 * Bilinear interpolation of the field at continuous cell coordinates (x, y) and its exact gradient,
 * written into `out` as [value (cells), ∂/∂x, ∂/∂y (cells per cell)]. Returns false (and leaves
 * `out` untouched) outside the lattice of cell centres or where a neighbour is Infinity, because
 * no finite distance can be interpolated there. The gradient is that of the interpolant itself,
 * so a Gauss–Newton step that uses it is consistent with the residual it linearizes.
 */
export function sampleDistanceGradient(field: DistanceField, x: number, y: number, out: Float64Array): boolean {
  const { width, height, values } = field;
  // Samples sit at cell centres, so shift by half a cell to reach the lattice of samples.
  const u = x - 0.5;
  const w = y - 0.5;
  if (!(u >= 0 && w >= 0 && u <= width - 1 && w <= height - 1)) return false;
  // Clamp the base so the last row/column still has a neighbour; fx or fy is then exactly 1.
  const i0 = Math.min(Math.floor(u), Math.max(width - 2, 0));
  const j0 = Math.min(Math.floor(w), Math.max(height - 2, 0));
  const i1 = Math.min(i0 + 1, width - 1);
  const j1 = Math.min(j0 + 1, height - 1);
  const fx = u - i0;
  const fy = w - j0;
  const f00 = values[j0 * width + i0];
  const f10 = values[j0 * width + i1];
  const f01 = values[j1 * width + i0];
  const f11 = values[j1 * width + i1];
  if (f00 === Infinity || f10 === Infinity || f01 === Infinity || f11 === Infinity) return false;
  const bottom = f00 + (f10 - f00) * fx;
  const top = f01 + (f11 - f01) * fx;
  out[0] = bottom + (top - bottom) * fy;
  out[1] = (1 - fy) * (f10 - f00) + fy * (f11 - f01);
  out[2] = top - bottom;
  return true;
}

/** Bilinear interpolation of the field in cells at continuous cell coordinates (x, y); NaN outside or next to Infinity. */
export function sampleDistance(field: DistanceField, x: number, y: number): number {
  const out = new Float64Array(3);
  return sampleDistanceGradient(field, x, y, out) ? out[0] : Number.NaN;
}

/** Throws a RangeError unless the grid size is positive whole cells and the mask holds width × height cells. */
export function checkMaskSize(mask: ArrayLike<number>, width: number, height: number): void {
  const length = mask.length;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new RangeError(`Grid size must be positive whole numbers of cells, got ${width} × ${height}.`);
  }
  if (length !== width * height) {
    throw new RangeError(`Mask has ${length} cells but a ${width} × ${height} grid needs ${width * height}.`);
  }
}
