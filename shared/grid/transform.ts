import type { GridGeometry } from '../types/grid.js';

/** A point in continuous grid units: u along the grid's rows (cells), v along its columns (cells). */
export interface GridPoint {
  u: number;
  v: number;
}

/** Integer cell coordinates (i column, j row from the bottom); may lie outside the grid. */
export interface CellCoord {
  i: number;
  j: number;
}

/** A point in the map frame, metres. */
export interface WorldPoint {
  x: number;
  y: number;
}

/**
 * Precomputed constants of a grid's placement, for hot loops that must not call trig per point:
 * cos/sin of the origin yaw, origin in metres, cells per metre.
 */
export interface GridFrame {
  cos: number;
  sin: number;
  x0: number;
  y0: number;
  cellsPerMetre: number;
}

/** Returns the placement constants of a grid (yaw trig, origin in metres, 1/resolution in cells per metre). */
export function makeGridFrame(geom: GridGeometry): GridFrame {
  return {
    cos: Math.cos(geom.origin.yaw),
    sin: Math.sin(geom.origin.yaw),
    x0: geom.origin.x,
    y0: geom.origin.y,
    cellsPerMetre: 1 / geom.resolution,
  };
}

/** Returns the grid-frame u coordinate in cells of the map point (x, y) in metres. */
export function frameU(f: GridFrame, x: number, y: number): number {
  // Rotating by −yaw about the origin: x' = cos·dx + sin·dy.
  return (f.cos * (x - f.x0) + f.sin * (y - f.y0)) * f.cellsPerMetre;
}

/** Returns the grid-frame v coordinate in cells of the map point (x, y) in metres. */
export function frameV(f: GridFrame, x: number, y: number): number {
  // y' = −sin·dx + cos·dy.
  return (-f.sin * (x - f.x0) + f.cos * (y - f.y0)) * f.cellsPerMetre;
}

/**
 * Returns the map point (x, y) in metres as continuous grid coordinates in cells: (0, 0) is the
 * lower-left corner of cell (0, 0), (width, height) the upper-right corner of the grid.
 */
export function worldToGridFrame(geom: GridGeometry, x: number, y: number): GridPoint {
  const f = makeGridFrame(geom);
  return { u: frameU(f, x, y), v: frameV(f, x, y) };
}

/** Returns the map point (x, y) in metres of the continuous grid point (u, v) in cells. */
export function gridFrameToWorld(geom: GridGeometry, u: number, v: number): WorldPoint {
  const c = Math.cos(geom.origin.yaw);
  const s = Math.sin(geom.origin.yaw);
  const a = u * geom.resolution;
  const b = v * geom.resolution;
  return { x: geom.origin.x + c * a - s * b, y: geom.origin.y + s * a + c * b };
}

/** Returns the cell (i, j) holding the map point (x, y) in metres; it may lie outside the grid. */
export function worldToCell(geom: GridGeometry, x: number, y: number): CellCoord {
  const p = worldToGridFrame(geom, x, y);
  return { i: Math.floor(p.u), j: Math.floor(p.v) };
}

/** Returns the map point in metres at the centre of cell (i, j). */
export function cellCentre(geom: GridGeometry, i: number, j: number): WorldPoint {
  return gridFrameToWorld(geom, i + 0.5, j + 0.5);
}

/** Returns the flat index j·width + i of cell (i, j), or −1 when the cell lies outside the grid. */
export function cellIndex(geom: GridGeometry, i: number, j: number): number {
  if (i < 0 || j < 0 || i >= geom.width || j >= geom.height) return -1;
  return j * geom.width + i;
}
