import type { GridGeometry } from '../types/grid.js';
import type { RgbaImage } from './grid-image.js';
import { MAP_COLOURS } from './palette.js';

export type OutlineKind = 'new' | 'missing' | 'unmapped';

/** The zone kind colours of the map palette (DESIGN.md §5). */
export const OUTLINE_COLOURS: Record<OutlineKind, readonly [number, number, number]> = {
  new: MAP_COLOURS.newStructure,
  missing: MAP_COLOURS.missingStructure,
  unmapped: MAP_COLOURS.unmappedStructure,
};

/**
 * The pixel of a map point (metres) in an image of the grid drawn `step` cells per pixel
 * (renderGridImage): x from the left edge, y from the top edge, as fractional pixels.
 * The origin's yaw is taken as zero, as the map images are drawn.
 */
export function previewPixel(geometry: GridGeometry, step: number, x: number, y: number): [number, number] {
  const i = (x - geometry.origin.x) / geometry.resolution;
  const j = (y - geometry.origin.y) / geometry.resolution;
  return [i / step, (geometry.height - j) / step];
}

/** Sets one opaque pixel when it lies inside the image. */
function plot(img: RgbaImage, x: number, y: number, c: readonly [number, number, number]) {
  if (x < 0 || y < 0 || x >= img.width || y >= img.height) return;
  const o = (y * img.width + x) * 4;
  img.data[o] = c[0];
  img.data[o + 1] = c[1];
  img.data[o + 2] = c[2];
  img.data[o + 3] = 255;
}

/**
 * Draws a line between two pixel points with Bresenham's algorithm (Bresenham, "Algorithm for
 * computer control of a digital plotter", IBM Systems Journal, 1965) in the all-octant error form
 * (Zingl, "A Rasterizing Algorithm for Drawing Curves", 2012), `width` pixels thick as a square brush.
 */
export function drawLine(img: RgbaImage, x0: number, y0: number, x1: number, y1: number, c: readonly [number, number, number], width = 2) {
  let x = Math.floor(x0);
  let y = Math.floor(y0);
  const xe = Math.floor(x1);
  const ye = Math.floor(y1);
  const dx = Math.abs(xe - x);
  const dy = -Math.abs(ye - y);
  const sx = x < xe ? 1 : -1;
  const sy = y < ye ? 1 : -1;
  let err = dx + dy;
  const lo = -Math.floor((width - 1) / 2);
  const hi = lo + width - 1;
  for (;;) {
    for (let a = lo; a <= hi; a++) for (let b = lo; b <= hi; b++) plot(img, x + a, y + b, c);
    if (x === xe && y === ye) return;
    const e2 = 2 * err;
    if (e2 >= dy) {
      err += dy;
      x += sx;
    }
    if (e2 <= dx) {
      err += dx;
      y += sy;
    }
  }
}

/**
 * Draws closed zone outlines (polygons in map metres) onto a map image in place, each in its
 * kind's colour; returns the image. Outlines are drawn in the order given, so later ones lie on top.
 */
export function drawZoneOutlines(img: RgbaImage, geometry: GridGeometry, step: number, zones: Array<{ kind: OutlineKind; outline: [number, number][] }>, width = 2): RgbaImage {
  for (const z of zones) {
    const pts = z.outline.map(([x, y]) => previewPixel(geometry, step, x, y));
    for (let k = 0; k < pts.length; k++) {
      const [a, b] = [pts[k], pts[(k + 1) % pts.length]];
      drawLine(img, a[0], a[1], b[0], b[1], OUTLINE_COLOURS[z.kind], width);
    }
  }
  return img;
}

/** The cells per pixel renderGridImage uses for a grid and a longest side. */
export const previewStep = (geometry: Pick<GridGeometry, 'width' | 'height'>, maxSide: number) => Math.max(1, Math.ceil(Math.max(geometry.width, geometry.height) / maxSide));
