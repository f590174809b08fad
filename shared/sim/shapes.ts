/**
 * Solid shapes of the simulated world (map frame, metres) and exact ray intersections with
 * them. Every static structure is an axis-aligned box: warehouse walls, racks, pillars and
 * fences run along the building's axes, and boxes make the ray test a few comparisons.
 */

/** Axis-aligned solid box in the map frame (metres). */
export interface Box {
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

/** Solid disc in the map frame: centre and radius in metres. */
export interface Circle {
  x: number;
  y: number;
  r: number;
}

/** Distance in metres along a ray (unit direction dx, dy) to where it enters `box`; Infinity if it misses, 0 if it starts inside. */
export function rayBoxDistance(
  ox: number,
  oy: number,
  dx: number,
  dy: number,
  minX: number,
  minY: number,
  maxX: number,
  maxY: number,
): number {
  // Slab method (Kay & Kajiya 1986): intersect the ray's parameter interval with the x and y
  // slabs. A zero direction component means the ray runs parallel to that slab: it stays inside
  // it for every t or never, which avoids 0 · Infinity when the origin lies on a slab plane.
  let tNear = -Infinity;
  let tFar = Infinity;
  if (dx === 0) {
    if (ox < minX || ox > maxX) return Infinity;
  } else {
    const t1 = (minX - ox) / dx;
    const t2 = (maxX - ox) / dx;
    tNear = t1 < t2 ? t1 : t2;
    tFar = t1 < t2 ? t2 : t1;
  }
  if (dy === 0) {
    if (oy < minY || oy > maxY) return Infinity;
  } else {
    const t1 = (minY - oy) / dy;
    const t2 = (maxY - oy) / dy;
    const lo = t1 < t2 ? t1 : t2;
    const hi = t1 < t2 ? t2 : t1;
    if (lo > tNear) tNear = lo;
    if (hi < tFar) tFar = hi;
  }
  if (tNear > tFar || tFar < 0) return Infinity;
  return tNear > 0 ? tNear : 0;
}

/** Distance in metres along a ray (unit direction) to where it enters the disc; Infinity if it misses, 0 if it starts inside. */
export function rayCircleDistance(
  ox: number,
  oy: number,
  dx: number,
  dy: number,
  cx: number,
  cy: number,
  r: number,
): number {
  // Solve |o + t·d − c|² = r² with |d| = 1: t² + 2bt + c = 0.
  const fx = ox - cx;
  const fy = oy - cy;
  const b = fx * dx + fy * dy;
  const c = fx * fx + fy * fy - r * r;
  if (c <= 0) return 0;
  const disc = b * b - c;
  if (disc < 0 || b > 0) return Infinity;
  return -b - Math.sqrt(disc);
}

/** Corner points of a box, counter-clockwise from its lower-left corner (metres). */
export function boxPolygon(box: Box): [number, number][] {
  return [
    [box.minX, box.minY],
    [box.maxX, box.minY],
    [box.maxX, box.maxY],
    [box.minX, box.maxY],
  ];
}

/** Smallest box containing all given boxes (metres); throws on an empty list. */
export function boundingBox(boxes: readonly Box[]): Box {
  if (boxes.length === 0) throw new Error('A bounding box needs at least one box.');
  const out = { minX: Infinity, minY: Infinity, maxX: -Infinity, maxY: -Infinity };
  for (const b of boxes) {
    out.minX = Math.min(out.minX, b.minX);
    out.minY = Math.min(out.minY, b.minY);
    out.maxX = Math.max(out.maxX, b.maxX);
    out.maxY = Math.max(out.maxY, b.maxY);
  }
  return out;
}

/** True when the two boxes share interior area (touching edges do not count). */
export function boxesOverlap(a: Box, b: Box): boolean {
  return a.minX < b.maxX && b.minX < a.maxX && a.minY < b.maxY && b.minY < a.maxY;
}
