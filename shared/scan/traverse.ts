/**
 * Exact grid traversal of a segment (Amanatides & Woo 1987, "A Fast Voxel Traversal Algorithm
 * for Ray Tracing", Eurographics '87), in continuous grid coordinates where cell (i, j) is the
 * half-open square [i, i+1) × [j, j+1).
 *
 * Which cells are visited: the cell holding the start point, then every cell whose interior the
 * segment passes through, in order, ending with the cell holding the end point. Rules for the
 * measure-zero cases, chosen so the result is deterministic and symmetric in x and y:
 * - Corner tie: when the segment crosses a grid vertex exactly (both crossings at the same
 *   parameter t), it steps diagonally and visits neither of the two cells it only touches at
 *   that single point. So a 45° line through cell centres visits the diagonal cells only.
 *   Ties are decided on the computed crossing parameters, (boundary − x0) / dx, evaluated afresh
 *   at each step (no accumulated drift), so dyadic coordinates tie exactly.
 * - A segment lying on a grid line belongs to the cells above / right of it (floor of the
 *   coordinate), as do start and end points on a boundary.
 * - A zero-length segment visits the one cell holding it.
 */

/** Outcome of tracing one beam: where its endpoint lay relative to the grid. */
export const TraceStatus = {
  /** The endpoint lies in the grid: its cell got a hit, the cells before it passes. */
  EndpointInMap: 0,
  /** The segment crosses the grid but ends outside it: the crossed cells got passes, no hit. */
  EndpointOutOfMap: 1,
  /** The segment does not touch the grid (or has non-finite coordinates): nothing counted. */
  OutsideMap: 2,
} as const;
/** One of the TraceStatus codes. */
export type TraceStatus = (typeof TraceStatus)[keyof typeof TraceStatus];

/**
 * Walks the cells of one segment. A reusable cursor rather than a callback so the hot path
 * allocates nothing per beam or per cell; `i`, `j` hold the current cell.
 */
class SegmentWalker {
  i = 0;
  j = 0;
  private stepI = 0;
  private stepJ = 0;
  private remI = 0;
  private remJ = 0;
  private x0 = 0;
  private y0 = 0;
  private dx = 0;
  private dy = 0;
  private tMaxX = Infinity;
  private tMaxY = Infinity;

  /** Starts at the point at parameter tEnter and will stop in the cell of the point at tExit. */
  reset(x0: number, y0: number, x1: number, y1: number, tEnter: number, tExit: number): void {
    const dx = x1 - x0;
    const dy = y1 - y0;
    this.x0 = x0;
    this.y0 = y0;
    this.dx = dx;
    this.dy = dy;
    // Untouched endpoints are used as given so that an unclipped walk ends exactly in floor(x1).
    const sx = tEnter === 0 ? x0 : x0 + tEnter * dx;
    const sy = tEnter === 0 ? y0 : y0 + tEnter * dy;
    const ex = tExit === 1 ? x1 : x0 + tExit * dx;
    const ey = tExit === 1 ? y1 : y0 + tExit * dy;
    const i = Math.floor(sx);
    const j = Math.floor(sy);
    const endI = Math.floor(ex);
    const endJ = Math.floor(ey);
    this.i = i;
    this.j = j;
    // Per-axis step budgets guarantee the walk ends in the end cell even if rounding would
    // otherwise let it overshoot along one axis.
    this.stepI = endI > i ? 1 : endI < i ? -1 : 0;
    this.stepJ = endJ > j ? 1 : endJ < j ? -1 : 0;
    this.remI = Math.abs(endI - i);
    this.remJ = Math.abs(endJ - j);
    this.tMaxX = this.crossingX();
    this.tMaxY = this.crossingY();
  }

  /** Parameter t at which the segment leaves the current column (Infinity if it never does). */
  private crossingX(): number {
    if (this.stepI === 0) return Infinity;
    return ((this.stepI > 0 ? this.i + 1 : this.i) - this.x0) / this.dx;
  }

  /** Parameter t at which the segment leaves the current row (Infinity if it never does). */
  private crossingY(): number {
    if (this.stepJ === 0) return Infinity;
    return ((this.stepJ > 0 ? this.j + 1 : this.j) - this.y0) / this.dy;
  }

  /** Moves to the next cell; returns false (and stays) when the current cell is the last. */
  advance(): boolean {
    const remI = this.remI;
    const remJ = this.remJ;
    if (remI === 0 && remJ === 0) return false;
    const tx = this.tMaxX;
    const ty = this.tMaxY;
    if (remJ === 0 || (remI !== 0 && tx < ty)) {
      this.stepColumn();
    } else if (remI === 0 || ty < tx) {
      this.stepRow();
    } else {
      // Exact vertex crossing: step diagonally (the corner tie rule in the module comment).
      this.stepColumn();
      this.stepRow();
    }
    return true;
  }

  private stepColumn(): void {
    this.i += this.stepI;
    this.remI--;
    this.tMaxX = this.crossingX();
  }

  private stepRow(): void {
    this.j += this.stepJ;
    this.remJ--;
    this.tMaxY = this.crossingY();
  }
}

// One walker for the tracing functions below; they call no user code, so no re-entrancy.
const walker = new SegmentWalker();
// Clip result of the last clipToGrid call (module scratch, to avoid returning an object).
let clipEnter = 0;
let clipExit = 1;

/**
 * Clips the segment to the closed rectangle [0, width] × [0, height] (Liang & Barsky 1984,
 * "A New Concept and Method for Line Clipping"); sets clipEnter/clipExit (segment parameters)
 * and returns false when no part of the segment lies in it.
 */
function clipToGrid(x0: number, y0: number, x1: number, y1: number, width: number, height: number): boolean {
  if (!(Number.isFinite(x0) && Number.isFinite(y0) && Number.isFinite(x1) && Number.isFinite(y1))) return false;
  const dx = x1 - x0;
  const dy = y1 - y0;
  clipEnter = 0;
  clipExit = 1;
  return (
    clipSide(-dx, x0) && clipSide(dx, width - x0) && clipSide(-dy, y0) && clipSide(dy, height - y0) && clipEnter <= clipExit
  );
}

/** Narrows [clipEnter, clipExit] to where p·t ≤ q (one rectangle side); false if never. */
function clipSide(p: number, q: number): boolean {
  if (p === 0) return q >= 0;
  const r = q / p;
  if (p < 0) {
    if (r > clipEnter) clipEnter = r;
  } else if (r < clipExit) {
    clipExit = r;
  }
  return true;
}

/** Shared body of traceBeam / tracePass: counts passes, and a hit at the endpoint when `hits` is given. */
function trace(
  x0: number,
  y0: number,
  x1: number,
  y1: number,
  width: number,
  height: number,
  hits: Uint32Array | null,
  passes: Uint32Array,
): TraceStatus {
  if (!clipToGrid(x0, y0, x1, y1, width, height)) return TraceStatus.OutsideMap;
  const endI = Math.floor(x1);
  const endJ = Math.floor(y1);
  const endInMap = endI >= 0 && endJ >= 0 && endI < width && endJ < height;
  walker.reset(x0, y0, x1, y1, clipEnter, endInMap ? 1 : clipExit);
  for (;;) {
    const i = walker.i;
    const j = walker.j;
    const more = walker.advance();
    // Cells on the far boundary (i = width or j = height) can appear after clipping; skip them.
    if (i >= 0 && j >= 0 && i < width && j < height) {
      if (!more && endInMap && hits !== null) hits[j * width + i]++;
      else passes[j * width + i]++;
    }
    if (!more) break;
  }
  return endInMap ? TraceStatus.EndpointInMap : TraceStatus.EndpointOutOfMap;
}

/**
 * Traces a beam from (x0, y0) to its return at (x1, y1), both in continuous grid cells, over a
 * width × height grid: +1 hit in the endpoint's cell, +1 pass in every cell crossed before it
 * (counters indexed j·width + i); cells outside the grid are skipped. Returns a TraceStatus.
 */
export function traceBeam(
  x0: number,
  y0: number,
  x1: number,
  y1: number,
  width: number,
  height: number,
  hits: Uint32Array,
  passes: Uint32Array,
): TraceStatus {
  return trace(x0, y0, x1, y1, width, height, hits, passes);
}

/**
 * Traces a segment without a return (e.g. a no-return beam cut at a maximum length), in grid
 * cells: +1 pass in every grid cell it crosses, including the last. Returns a TraceStatus.
 */
export function tracePass(
  x0: number,
  y0: number,
  x1: number,
  y1: number,
  width: number,
  height: number,
  passes: Uint32Array,
): TraceStatus {
  return trace(x0, y0, x1, y1, width, height, null, passes);
}

/**
 * Calls visit(i, j) for every cell (in an unbounded grid) the segment from (x0, y0) to (x1, y1),
 * in continuous grid cells, crosses, in order from start to end; returns the number of cells.
 */
export function forEachCellOnSegment(
  x0: number,
  y0: number,
  x1: number,
  y1: number,
  visit: (i: number, j: number) => void,
): number {
  if (!(Number.isFinite(x0) && Number.isFinite(y0) && Number.isFinite(x1) && Number.isFinite(y1))) return 0;
  // A walker of its own: visit() may itself trace segments.
  const w = new SegmentWalker();
  w.reset(x0, y0, x1, y1, 0, 1);
  let count = 0;
  for (;;) {
    visit(w.i, w.j);
    count++;
    if (!w.advance()) return count;
  }
}
