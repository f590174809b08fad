import bresenham from 'bresenham';
import { describe, expect, it } from 'vitest';
import { forEachCellOnSegment, tracePass, traceBeam, TraceStatus } from '../../../../shared/scan/traverse.js';
import { createRng } from '../../../../shared/sim/random.js';

type Cell = [number, number];

/** Seeded uniform numbers in [0, 1) (the simulator's generator) so every run draws the same values. */
function rng(seed: number): () => number {
  const g = createRng(seed);
  return () => g.next();
}

function cellsOf(x0: number, y0: number, x1: number, y1: number): Cell[] {
  const out: Cell[] = [];
  forEachCellOnSegment(x0, y0, x1, y1, (i, j) => out.push([i, j]));
  return out;
}

const key = (c: Cell): string => `${c[0]},${c[1]}`;

/**
 * Brute-force reference, independent of the traversal: the cells whose open square the segment
 * passes through (Liang–Barsky clip of the segment against each cell of its bounding box, kept
 * when the clipped piece has positive length and its midpoint is strictly inside), plus the
 * cells holding the two endpoints. Returned sorted by the parameter t where the segment enters.
 */
function referenceCells(x0: number, y0: number, x1: number, y1: number): Cell[] {
  const dx = x1 - x0;
  const dy = y1 - y0;
  const found = new Map<string, { cell: Cell; t: number }>();
  const add = (i: number, j: number, t: number) => {
    const k = `${i},${j}`;
    const prev = found.get(k);
    if (!prev || t < prev.t) found.set(k, { cell: [i, j], t });
  };
  for (let i = Math.floor(Math.min(x0, x1)); i <= Math.floor(Math.max(x0, x1)); i++) {
    for (let j = Math.floor(Math.min(y0, y1)); j <= Math.floor(Math.max(y0, y1)); j++) {
      let t0 = 0;
      let t1 = 1;
      let ok = true;
      for (const [p, q] of [[-dx, x0 - i], [dx, i + 1 - x0], [-dy, y0 - j], [dy, j + 1 - y0]]) {
        if (p === 0) {
          if (q < 0) ok = false;
        } else if (p < 0) {
          t0 = Math.max(t0, q / p);
        } else {
          t1 = Math.min(t1, q / p);
        }
      }
      if (!ok || t1 <= t0) continue;
      const mx = x0 + ((t0 + t1) / 2) * dx;
      const my = y0 + ((t0 + t1) / 2) * dy;
      if (mx > i && mx < i + 1 && my > j && my < j + 1) add(i, j, t0);
    }
  }
  add(Math.floor(x0), Math.floor(y0), -1);
  add(Math.floor(x1), Math.floor(y1), 2);
  return [...found.values()].sort((a, b) => a.t - b.t).map((e) => e.cell);
}

describe('forEachCellOnSegment', () => {
  it('when worked by hand with tMax/tDelta as defined by Amanatides & Woo, then the cells come in the published order', () => {
    // Arrange: Amanatides & Woo 1987, "A Fast Voxel Traversal Algorithm for Ray Tracing", §3:
    // step along the axis with the smaller tMax. Segment (0.2, 0.6) → (3.7, 2.3): dx = 3.5, dy = 1.7.
    // tMaxX = 0.8/3.5 = 0.229 < tMaxY = 0.4/1.7 = 0.235 → x: (1,0); tMaxX = 1.8/3.5 = 0.514
    // tMaxY 0.235 < 0.514 → y: (1,1); tMaxY = 1.4/1.7 = 0.824
    // tMaxX 0.514 → x: (2,1); tMaxX = 2.8/3.5 = 0.800 → x: (3,1); tMaxX = 1.086
    // tMaxY 0.824 → y: (3,2) = the end cell.
    // Act
    const cells = cellsOf(0.2, 0.6, 3.7, 2.3);

    // Assert
    expect(cells).toEqual([[0, 0], [1, 0], [1, 1], [2, 1], [3, 1], [3, 2]]);
  });

  it('when run on 4,000 random segments, then the cells equal the brute-force square-intersection set, in entry order, without repeats', () => {
    // Arrange: reference = referenceCells above (segment–square intersection per cell).
    const r = rng(20261103);
    for (let n = 0; n < 4000; n++) {
      const len = n % 4 === 0 ? r() * 0.8 : r() * 40;
      const a = r() * Math.PI * 2;
      const x0 = r() * 60 - 30;
      const y0 = r() * 60 - 30;
      const x1 = x0 + len * Math.cos(a);
      const y1 = y0 + len * Math.sin(a);

      // Act
      const got = cellsOf(x0, y0, x1, y1);

      // Assert
      expect(got.map(key)).toEqual(referenceCells(x0, y0, x1, y1).map(key));
    }
  });

  it('when a segment is sampled at 10,000 points, then every sampled point lies in a visited cell', () => {
    // Arrange: dense sampling reference — each sample's cell (floor) must be visited.
    const r = rng(7);
    for (let n = 0; n < 300; n++) {
      const x0 = r() * 30;
      const y0 = r() * 30;
      const x1 = r() * 30;
      const y1 = r() * 30;

      // Act
      const visited = new Set(cellsOf(x0, y0, x1, y1).map(key));

      // Assert
      for (let s = 0; s <= 10_000; s++) {
        const t = s / 10_000;
        const c: Cell = [Math.floor(x0 + t * (x1 - x0)), Math.floor(y0 + t * (y1 - y0))];
        if (!visited.has(key(c))) throw new Error(`sample ${t} of segment ${[x0, y0, x1, y1]} lies in unvisited cell ${key(c)}`);
      }
    }
  });

  it('when a segment crosses grid vertices exactly, then it steps diagonally and skips the two cells it only touches (our tie rule)', () => {
    // Arrange / Act / Assert — worked by hand: crossings of (0.5, 0.25) → (4.5, 2.25) are x=1 at t=0.125,
    // x=2 and y=1 both at t=0.375 (vertex (2,1)), x=3 at 0.625, x=4 and y=2 both at 0.875 (vertex (4,2)).
    expect(cellsOf(0.5, 0.25, 4.5, 2.25)).toEqual([[0, 0], [1, 0], [2, 1], [3, 1], [4, 2]]);
    expect(cellsOf(0.5, 0.5, 3.5, 3.5)).toEqual([[0, 0], [1, 1], [2, 2], [3, 3]]);
    expect(cellsOf(3.5, 0.5, 0.5, 3.5)).toEqual([[3, 0], [2, 1], [1, 2], [0, 3]]);
    expect(cellsOf(3.5, 3.5, 0.5, 0.5)).toEqual([[3, 3], [2, 2], [1, 1], [0, 0]]);
  });

  it('when a segment runs along a grid line, then it stays in the cells above / right of the line', () => {
    expect(cellsOf(0.5, 2, 3.5, 2)).toEqual([[0, 2], [1, 2], [2, 2], [3, 2]]);
    expect(cellsOf(3.5, 2, 0.5, 2)).toEqual([[3, 2], [2, 2], [1, 2], [0, 2]]);
    expect(cellsOf(3, 4.5, 3, 0.5)).toEqual([[3, 4], [3, 3], [3, 2], [3, 1], [3, 0]]);
  });

  it('when a segment has zero length or ends on a boundary, then the cell holding each end is the floor of its coordinates', () => {
    expect(cellsOf(2.5, 1.5, 2.5, 1.5)).toEqual([[2, 1]]);
    expect(cellsOf(0.5, 0.5, 3, 0.5)).toEqual([[0, 0], [1, 0], [2, 0], [3, 0]]);
    expect(cellsOf(-0.5, -1.5, -2.5, -1.5)).toEqual([[-1, -2], [-2, -2], [-3, -2]]);
  });

  it('when a coordinate is not finite, then nothing is visited', () => {
    expect(cellsOf(NaN, 0, 1, 1)).toEqual([]);
    expect(cellsOf(0, 0, Infinity, 1)).toEqual([]);
  });
});

describe('agreement with bresenham@0.0.4', () => {
  // bresenham@0.0.4 takes integer cell coordinates; we trace between the same cells' centres.
  const bres = (x0: number, y0: number, x1: number, y1: number): Cell[] =>
    (bresenham(x0, y0, x1, y1) as { x: number; y: number }[]).map((p) => [p.x, p.y] as Cell);
  const exact = (x0: number, y0: number, x1: number, y1: number): Cell[] => cellsOf(x0 + 0.5, y0 + 0.5, x1 + 0.5, y1 + 0.5);

  it('when a line is axis-aligned through cell centres, then both give the same cells in the same order', () => {
    // Reference: bresenham@0.0.4
    for (const [a, b, c, d] of [[2, 3, 9, 3], [9, 3, 2, 3], [4, 8, 4, 1], [4, 1, 4, 8], [5, 5, 5, 5]]) {
      expect(exact(a, b, c, d)).toEqual(bres(a, b, c, d));
    }
  });

  it('when a line is an exact 45° diagonal through cell centres, then both give the diagonal cells (corner ties stepped diagonally)', () => {
    // Reference: bresenham@0.0.4; the exact traversal agrees only because of its diagonal tie rule.
    for (const [a, b, c, d] of [[0, 0, 6, 6], [6, 6, 0, 0], [7, 1, 1, 7], [0, 6, 6, 0]]) {
      expect(exact(a, b, c, d)).toEqual(bres(a, b, c, d));
    }
  });

  it('when a shallow line clips a cell corner, then the exact traversal also visits the cell bresenham skips', () => {
    // Arrange: centre line (0.5, 0.5) → (4.5, 1.5) crosses y = 1 at x = 2.5, inside column 2, so it
    // passes through both (2,0) and (2,1); bresenham@0.0.4 (8-connected) keeps one cell per column.
    // Act
    const b = bres(0, 0, 4, 1);
    const e = exact(0, 0, 4, 1);

    // Assert
    expect(b).toEqual([[0, 0], [1, 0], [2, 1], [3, 1], [4, 1]]);
    expect(e).toEqual([[0, 0], [1, 0], [2, 0], [2, 1], [3, 1], [4, 1]]);
  });

  it('when the same line is drawn backwards, then bresenham picks another cell at its tie but the exact traversal visits the same set', () => {
    // Reference: bresenham@0.0.4 is not symmetric at ties (it rounds the half-way column up in the
    // direction of travel): forwards it takes (2,1), backwards (2,0).
    expect(bres(4, 1, 0, 0)).toEqual([[4, 1], [3, 1], [2, 0], [1, 0], [0, 0]]);
    expect(exact(4, 1, 0, 0).map(key).sort()).toEqual(exact(0, 0, 4, 1).map(key).sort());
  });

  it('when run on 2,000 random centre-to-centre lines, then the exact cells contain every bresenham cell and steps are 4-connected except at exact vertex crossings', () => {
    // Reference: bresenham@0.0.4 cells ⊆ exact cells (every bresenham cell holds a point of the line
    // at its column or row centre).
    const r = rng(45);
    for (let n = 0; n < 2000; n++) {
      const [x0, y0, x1, y1] = [0, 0, 0, 0].map(() => Math.floor(r() * 40));

      // Act
      const e = exact(x0, y0, x1, y1);

      // Assert
      const set = new Set(e.map(key));
      for (const c of bres(x0, y0, x1, y1)) expect(set.has(key(c))).toBe(true);
      for (let k = 1; k < e.length; k++) {
        const di = e[k][0] - e[k - 1][0];
        const dj = e[k][1] - e[k - 1][1];
        if (Math.abs(di) + Math.abs(dj) === 1) continue;
        // A diagonal step: the shared vertex must lie exactly on the line (integer cross product,
        // in doubled coordinates so the centres are integers).
        expect(Math.abs(di)).toBe(1);
        expect(Math.abs(dj)).toBe(1);
        const vx = 2 * Math.max(e[k][0], e[k - 1][0]);
        const vy = 2 * Math.max(e[k][1], e[k - 1][1]);
        expect((vx - (2 * x0 + 1)) * (y1 - y0) - (vy - (2 * y0 + 1)) * (x1 - x0)).toBe(0);
      }
    }
  });
});

describe('traceBeam', () => {
  const W = 20;
  const H = 15;
  const counters = () => ({ hits: new Uint32Array(W * H), passes: new Uint32Array(W * H) });
  const sum = (a: Uint32Array) => a.reduce((s, v) => s + v, 0);
  // Compact "index:count" list: compares quickly and prints readably on failure.
  const nonZero = (a: Uint32Array) => Array.from(a, (v, k) => (v ? `${k}:${v}` : '')).filter(Boolean).join(' ');

  it('when the endpoint lies in the grid, then its cell gets one hit and every earlier cell one pass', () => {
    // Arrange
    const { hits, passes } = counters();

    // Act
    const status = traceBeam(0.2, 0.6, 3.7, 2.3, W, H, hits, passes);

    // Assert: cells from the hand-worked example above
    expect(status).toBe(TraceStatus.EndpointInMap);
    expect(hits[2 * W + 3]).toBe(1);
    expect(sum(hits)).toBe(1);
    for (const [i, j] of [[0, 0], [1, 0], [1, 1], [2, 1], [3, 1]]) expect(passes[j * W + i]).toBe(1);
    expect(sum(passes)).toBe(5);
  });

  it('when a beam is shorter than a cell, then only a hit is counted', () => {
    const { hits, passes } = counters();
    expect(traceBeam(5.1, 5.1, 5.4, 5.8, W, H, hits, passes)).toBe(TraceStatus.EndpointInMap);
    expect([sum(hits), sum(passes), hits[5 * W + 5]]).toEqual([1, 0, 1]);
  });

  it('when the endpoint lies outside the grid, then the crossed grid cells get passes and there is no hit', () => {
    // Arrange
    const { hits, passes } = counters();

    // Act: from (17.5, 3.5) to the right, out past x = 20
    const status = traceBeam(17.5, 3.5, 26.5, 3.5, W, H, hits, passes);

    // Assert
    expect(status).toBe(TraceStatus.EndpointOutOfMap);
    expect(sum(hits)).toBe(0);
    expect([passes[3 * W + 17], passes[3 * W + 18], passes[3 * W + 19]]).toEqual([1, 1, 1]);
    expect(sum(passes)).toBe(3);
  });

  it('when the endpoint is exactly on the far edge (x = width), then it counts as out of the grid', () => {
    const { hits, passes } = counters();
    expect(traceBeam(18.5, 0.5, 20, 0.5, W, H, hits, passes)).toBe(TraceStatus.EndpointOutOfMap);
    expect([sum(hits), sum(passes)]).toEqual([0, 2]);
  });

  it('when the segment misses the grid or is not finite, then nothing is counted', () => {
    const { hits, passes } = counters();
    expect(traceBeam(-5, -5, -1, 30, W, H, hits, passes)).toBe(TraceStatus.OutsideMap);
    expect(traceBeam(25, 2, 40, 2, W, H, hits, passes)).toBe(TraceStatus.OutsideMap);
    expect(traceBeam(NaN, 2, 4, 2, W, H, hits, passes)).toBe(TraceStatus.OutsideMap);
    expect(sum(hits) + sum(passes)).toBe(0);
  });

  it('when 3,000 random beams start inside or outside the grid, then the counters equal the brute-force cells restricted to the grid', () => {
    // Arrange: reference = referenceCells (segment–square intersection), keeping in-grid cells.
    const r = rng(99);
    for (let n = 0; n < 3000; n++) {
      const { hits, passes } = counters();
      const x0 = r() * 40 - 10;
      const y0 = r() * 35 - 10;
      const x1 = r() * 40 - 10;
      const y1 = r() * 35 - 10;
      const ref = referenceCells(x0, y0, x1, y1).filter(([i, j]) => i >= 0 && j >= 0 && i < W && j < H);
      const last = [Math.floor(x1), Math.floor(y1)];
      const endInMap = last[0] >= 0 && last[1] >= 0 && last[0] < W && last[1] < H;

      // Act
      const status = traceBeam(x0, y0, x1, y1, W, H, hits, passes);

      // Assert
      const expectedHits = new Uint32Array(W * H);
      const expectedPasses = new Uint32Array(W * H);
      for (const [i, j] of ref) {
        if (endInMap && i === last[0] && j === last[1]) expectedHits[j * W + i]++;
        else expectedPasses[j * W + i]++;
      }
      expect(nonZero(hits)).toEqual(nonZero(expectedHits));
      expect(nonZero(passes)).toEqual(nonZero(expectedPasses));
      expect(status).toBe(endInMap ? TraceStatus.EndpointInMap : ref.length > 0 ? TraceStatus.EndpointOutOfMap : TraceStatus.OutsideMap);
    }
  });
});

describe('tracePass', () => {
  it('when tracing a no-return segment, then every crossed cell, the last included, gets a pass', () => {
    // Arrange
    const passes = new Uint32Array(10 * 10);

    // Act
    const status = tracePass(0.5, 0.5, 3.5, 3.5, 10, 10, passes);

    // Assert
    expect(status).toBe(TraceStatus.EndpointInMap);
    expect([passes[0], passes[11], passes[22], passes[33]]).toEqual([1, 1, 1, 1]);
    expect(passes.reduce((s, v) => s + v, 0)).toBe(4);
  });
});
