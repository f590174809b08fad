import { gridFrameToWorld, worldToGridFrame, type WorldPoint } from '../grid/transform.js';
import type { GridGeometry } from '../types/grid.js';
import { pixelsPerCell } from './tiles.js';

// The map's raster CRS without Leaflet: a map-frame point in metres (x right, y up) against the
// tile pyramid's pixels (tiles.ts), including the map's yaw, so the browser and tests share it.

/** A point in the pyramid's pixels at some zoom: x to the right, y down from the map's top-left corner. */
export interface PixelPoint {
  x: number;
  y: number;
}

/**
 * Returns the pixel at zoom z of the map point (x, y) in metres: rotated by −yaw about the origin,
 * scaled by 1/resolution into cells and by 2^(z − k) into pixels, with y flipped to count down from the top.
 */
export function mapToPixel(geom: GridGeometry, z: number, x: number, y: number): PixelPoint {
  const g = worldToGridFrame(geom, x, y);
  const scale = pixelsPerCell(geom, z);
  return { x: g.u * scale, y: (geom.height - g.v) * scale };
}

/** Returns the map point in metres of the pixel (px, py) at zoom z; the inverse of `mapToPixel`. */
export function pixelToMap(geom: GridGeometry, z: number, px: number, py: number): WorldPoint {
  const scale = pixelsPerCell(geom, z);
  return gridFrameToWorld(geom, px / scale, geom.height - py / scale);
}
