/**
 * The area a remap re-drives: the union of its zones' neighbourhoods, i.e. the zones' cells grown
 * by a margin (a disc dilation), holes filled, traced into outlines in map metres. Works on a crop
 * around the zones, so its cost follows the area, not the map. A cell's membership is decided by
 * its centre, so the same area can be laid onto another map version's grid (`cellsInOutlines`).
 */
import { labelComponents } from '../detect/labelling.js';
import { dilate } from '../detect/morphology.js';
import { outlineToMetres, traceOutline } from '../detect/outline.js';
import { gridFrameToWorld, worldToGridFrame } from '../grid/transform.js';
import type { GridGeometry } from '../types/grid.js';

/** One connected part of a remap area: its outline (metres, counter-clockwise), centre (metres) and area (m²). */
export interface AreaPart {
  outline: [number, number][];
  centre: [number, number];
  areaM2: number;
}

/** A remap area: its parts, their total area in m², its cells on the grid it was built on (indices j·width + i, ascending). */
export interface RemapArea {
  parts: AreaPart[];
  areaM2: number;
  cells: Int32Array;
}

const round3 = (v: number) => Math.round(v * 1000) / 1000;

/**
 * Returns the union of the zones' cells (each an index list j·width + i on `geometry`) grown by
 * `marginM` metres, clipped to the grid, with enclosed holes filled: parts, area and cells.
 * Memory: about 13 bytes per cell of the crop (the zones' bounding box plus the margin).
 */
export function remapArea(zoneCells: readonly Int32Array[], geometry: GridGeometry, marginM: number): RemapArea {
  if (!(marginM >= 0) || !Number.isFinite(marginM)) throw new RangeError(`The margin must be zero or more metres, got ${marginM}.`);
  const { width, height, resolution } = geometry;
  let minI = Infinity;
  let minJ = Infinity;
  let maxI = -Infinity;
  let maxJ = -Infinity;
  for (const cells of zoneCells) {
    for (const c of cells) {
      if (!(c >= 0 && c < width * height)) throw new RangeError(`Cell index ${c} lies outside the ${width} × ${height} grid.`);
      const i = c % width;
      const j = (c - i) / width;
      if (i < minI) minI = i;
      if (i > maxI) maxI = i;
      if (j < minJ) minJ = j;
      if (j > maxJ) maxJ = j;
    }
  }
  if (minI === Infinity) return { parts: [], areaM2: 0, cells: new Int32Array(0) };

  // The crop keeps a clear ring beyond the reach of the dilation, so the outside is one
  // connected background and outline tracing never meets the crop's edge.
  const radius = marginM / resolution;
  const pad = Math.ceil(radius) + 1;
  const ci0 = minI - pad;
  const cj0 = minJ - pad;
  const cw = maxI - minI + 1 + 2 * pad;
  const ch = maxJ - minJ + 1 + 2 * pad;
  const seed = new Uint8Array(cw * ch);
  for (const cells of zoneCells) {
    for (const c of cells) {
      const i = c % width;
      const j = (c - i) / width;
      seed[(j - cj0) * cw + (i - ci0)] = 1;
    }
  }
  const grown = radius > 0 ? dilate(seed, cw, ch, radius, 'disc') : seed;
  // Nothing to re-drive outside the map.
  for (let y = 0; y < ch; y++) {
    const j = cj0 + y;
    for (let x = 0; x < cw; x++) {
      const i = ci0 + x;
      if (i < 0 || j < 0 || i >= width || j >= height) grown[y * cw + x] = 0;
    }
  }
  // Holes: background components (4-connected, the dual of the parts' 8-connectivity) other than the outside.
  const background = new Uint8Array(grown.length);
  for (let k = 0; k < grown.length; k++) background[k] = grown[k] ? 0 : 1;
  const bg = labelComponents(background, cw, ch, 4);
  const outside = bg.labels[0];
  for (let k = 0; k < grown.length; k++) if (bg.labels[k] !== 0 && bg.labels[k] !== outside) grown[k] = 1;

  const labelling = labelComponents(grown, cw, ch, 8);
  const parts: AreaPart[] = [];
  let count = 0;
  for (let label = 1; label <= labelling.count; label++) {
    const vertices = traceOutline(labelling, label);
    for (let k = 0; k < vertices.length; k += 2) {
      vertices[k] += ci0;
      vertices[k + 1] += cj0;
    }
    const metres = outlineToMetres(vertices, geometry);
    const outline: [number, number][] = [];
    for (let k = 0; k < metres.length; k += 2) outline.push([round3(metres[k]), round3(metres[k + 1])]);
    const cellsOfPart = labelling.stats.cellCount[label];
    count += cellsOfPart;
    const centre = gridFrameToWorld(geometry, labelling.stats.centroidX[label] + ci0, labelling.stats.centroidY[label] + cj0);
    parts.push({ outline, centre: [round3(centre.x), round3(centre.y)], areaM2: cellsOfPart * resolution * resolution });
  }
  const cells = new Int32Array(count);
  let n = 0;
  for (let y = 0; y < ch; y++) {
    for (let x = 0; x < cw; x++) if (grown[y * cw + x]) cells[n++] = (cj0 + y) * width + (ci0 + x);
  }
  return { parts, areaM2: count * resolution * resolution, cells };
}

/** True when the point (u, v) lies inside the polygon [u0, v0, u1, v1, …] (even–odd crossing rule). */
function insidePolygon(poly: Float64Array, u: number, v: number): boolean {
  let inside = false;
  const n = poly.length >> 1;
  for (let a = 0, b = n - 1; a < n; b = a++) {
    const ua = poly[2 * a];
    const va = poly[2 * a + 1];
    const ub = poly[2 * b];
    const vb = poly[2 * b + 1];
    if (va > v !== vb > v && u < ((ub - ua) * (v - va)) / (vb - va) + ua) inside = !inside;
  }
  return inside;
}

/**
 * Returns the cells of `geometry` whose centres lie inside any of the outlines (metres), as indices
 * j·width + i, ascending: an area laid onto another grid, whatever its origin, yaw or resolution.
 */
export function cellsInOutlines(outlines: readonly (readonly (readonly [number, number])[])[], geometry: GridGeometry): Int32Array {
  const { width, height } = geometry;
  const polys = outlines
    .filter((o) => o.length >= 3)
    .map((o) => {
      const p = new Float64Array(o.length * 2);
      o.forEach(([x, y], k) => {
        const g = worldToGridFrame(geometry, x, y);
        p[2 * k] = g.u;
        p[2 * k + 1] = g.v;
      });
      return p;
    });
  const out: number[] = [];
  for (const p of polys) {
    let u0 = Infinity;
    let u1 = -Infinity;
    let v0 = Infinity;
    let v1 = -Infinity;
    for (let k = 0; k < p.length; k += 2) {
      u0 = Math.min(u0, p[k]);
      u1 = Math.max(u1, p[k]);
      v0 = Math.min(v0, p[k + 1]);
      v1 = Math.max(v1, p[k + 1]);
    }
    const i0 = Math.max(0, Math.floor(u0));
    const i1 = Math.min(width - 1, Math.ceil(u1));
    const j0 = Math.max(0, Math.floor(v0));
    const j1 = Math.min(height - 1, Math.ceil(v1));
    for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) if (insidePolygon(p, i + 0.5, j + 0.5)) out.push(j * width + i);
  }
  // Parts never overlap, but outlines from elsewhere may: keep each cell once.
  return Int32Array.from(new Set(out)).sort();
}
