// View maths of the site map without Leaflet: fitting the whole grid into the viewport, measured
// lengths and the cursor's words. Pure, so that they are tested apart from the DOM.
import { worldToCell } from '../../../shared/grid/transform.js';
import { pixelToMap } from '../../../shared/render/crs.js';
import { pixelsPerCell } from '../../../shared/render/tiles.js';
import type { GridGeometry } from '../../../shared/types/grid.js';
import { metres } from '../../format/units.js';

/** A view of the map: its centre in map metres and a zoom of the tile pyramid (may be fractional). */
export interface MapView {
  centre: { x: number; y: number };
  zoom: number;
}

/**
 * Returns the view that shows the whole grid inside a viewport of `width` × `height` pixels with
 * `padding` pixels left free on every side: the largest zoom (a multiple of `snap`, within
 * [minZoom, maxZoom]) at which the grid's pixel rectangle fits, centred on the grid's centre.
 * Works in the pyramid's pixels, where the grid is an upright rectangle whatever the map's yaw
 * (fitting its map-frame bounds instead would zoom out too far on a turned map).
 */
export function fitView(geom: GridGeometry, viewport: { width: number; height: number }, options: { padding: number; snap: number; minZoom: number; maxZoom: number }): MapView {
  const zoom0 = pixelsPerCell(geom, 0);
  const w0 = geom.width * zoom0;
  const h0 = geom.height * zoom0;
  const free = { width: Math.max(1, viewport.width - 2 * options.padding), height: Math.max(1, viewport.height - 2 * options.padding) };
  const exact = Math.log2(Math.min(free.width / w0, free.height / h0));
  const snapped = options.snap > 0 ? Math.floor(exact / options.snap + 1e-9) * options.snap : exact;
  const zoom = Math.max(options.minZoom, Math.min(options.maxZoom, snapped));
  return { centre: pixelToMap(geom, 0, w0 / 2, h0 / 2), zoom };
}

/** Returns the length in metres of the polyline through `points` (map metres; Euclidean, as in the map frame). */
export function pathLength(points: readonly { x: number; y: number }[]): number {
  let total = 0;
  for (let k = 1; k < points.length; k++) total += Math.hypot(points[k].x - points[k - 1].x, points[k].y - points[k - 1].y);
  return total;
}

/** Returns a map point in words with centimetre precision ("x 12.34 m · y −5.67 m"). */
export function mapPointLabel(x: number, y: number): string {
  return `x ${metres(x)} · y ${metres(y)}`;
}

/** Returns the grid cell (i column, j row from the bottom) under a map point, or null outside the grid. */
export function cellAt(geom: GridGeometry, x: number, y: number): { i: number; j: number } | null {
  const { i, j } = worldToCell(geom, x, y);
  return i >= 0 && j >= 0 && i < geom.width && j < geom.height ? { i, j } : null;
}
