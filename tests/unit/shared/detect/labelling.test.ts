import { describe, expect, it } from 'vitest';
import { Mask, fromMask } from 'image-js';
import { labelComponents, type Connectivity } from '../../../../shared/detect/labelling.js';
import { randomMask } from './random-mask.js';

/** Reference labelling by breadth-first flood fill from each unlabelled set cell in scan order (common practice). */
function floodFill(mask: Uint8Array, width: number, height: number, connectivity: Connectivity): { labels: Int32Array; count: number } {
  const labels = new Int32Array(width * height);
  const queue = new Int32Array(width * height);
  const offsets =
    connectivity === 8
      ? [[1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [1, -1], [-1, 1], [-1, -1]]
      : [[1, 0], [-1, 0], [0, 1], [0, -1]];
  let count = 0;
  for (let start = 0; start < mask.length; start++) {
    if (mask[start] === 0 || labels[start] !== 0) continue;
    count++;
    labels[start] = count;
    let head = 0;
    let tail = 0;
    queue[tail++] = start;
    while (head < tail) {
      const k = queue[head++];
      const i = k % width;
      const j = (k - i) / width;
      for (const [di, dj] of offsets) {
        const ni = i + di;
        const nj = j + dj;
        if (ni < 0 || nj < 0 || ni >= width || nj >= height) continue;
        const n = nj * width + ni;
        if (mask[n] !== 0 && labels[n] === 0) {
          labels[n] = count;
          queue[tail++] = n;
        }
      }
    }
  }
  return { labels, count };
}

/** True when two labellings split the cells into the same components (labels may be numbered differently). */
function samePartition(a: Int32Array, b: Int32Array): boolean {
  const aToB = new Map<number, number>();
  const bToA = new Map<number, number>();
  for (let k = 0; k < a.length; k++) {
    if ((a[k] === 0) !== (b[k] <= 0)) return false;
    if (a[k] === 0) continue;
    if ((aToB.get(a[k]) ?? b[k]) !== b[k] || (bToA.get(b[k]) ?? a[k]) !== a[k]) return false;
    aToB.set(a[k], b[k]);
    bToA.set(b[k], a[k]);
  }
  return true;
}

describe('connected-component labelling', () => {
  it('when a small hand-drawn mask is labelled, then 8- and 4-connectivity give the hand-counted components', () => {
    // Arrange: rows listed from j = 0 (bottom). Two cells touch only at a corner at (2,1)–(3,2).
    const rows = ['11000', '01100', '00010', '10011'];
    const width = 5;
    const height = 4;
    const mask = new Uint8Array(rows.join('').split('').map(Number));
    // Act
    const eight = labelComponents(mask, width, height, 8);
    const four = labelComponents(mask, width, height, 4);
    // Assert: hand-labelled. 8-connected: {bottom-left snake + right group}, {(0,3)} → 2.
    expect(eight.count).toBe(2);
    expect(Array.from(eight.labels)).toEqual([1, 1, 0, 0, 0, 0, 1, 1, 0, 0, 0, 0, 0, 1, 0, 2, 0, 0, 1, 1]);
    // 4-connected: the corner contact splits the snake: {(0,0),(1,0),(1,1),(2,1)}, {(3,2),(3,3),(4,3)}, {(0,3)} → 3.
    expect(four.count).toBe(3);
    expect(Array.from(four.labels)).toEqual([1, 1, 0, 0, 0, 0, 1, 1, 0, 0, 0, 0, 0, 2, 0, 3, 0, 0, 2, 2]);
    // Stats of 8-connected component 1: 7 cells, bbox i 0…4, j 0…3, centroid mean(i)+0.5, mean(j)+0.5.
    expect(eight.stats.cellCount[1]).toBe(7);
    expect([eight.stats.minI[1], eight.stats.minJ[1], eight.stats.maxI[1], eight.stats.maxJ[1]]).toEqual([0, 0, 4, 3]);
    expect(eight.stats.centroidX[1]).toBeCloseTo((0 + 1 + 1 + 2 + 3 + 3 + 4) / 7 + 0.5, 12);
    expect(eight.stats.centroidY[1]).toBeCloseTo((0 + 0 + 1 + 1 + 2 + 3 + 3) / 7 + 0.5, 12);
    expect(eight.stats.firstCell[2]).toBe(15);
  });

  it('when random masks are labelled, then components and their figures equal a BFS flood fill', () => {
    for (const [width, height, density, seed] of [
      [40, 30, 0.3, 1],
      [64, 64, 0.45, 2],
      [1, 50, 0.5, 3],
      [50, 1, 0.5, 4],
      [33, 21, 0.6, 5],
    ] as const) {
      for (const connectivity of [4, 8] as const) {
        // Arrange
        const mask = randomMask(width, height, density, seed);
        const reference = floodFill(mask, width, height, connectivity);
        // Act
        const result = labelComponents(mask, width, height, connectivity);
        // Assert: scan-order flood fill numbers components by first cell, exactly like the labelling.
        expect(result.count).toBe(reference.count);
        expect(Array.from(result.labels)).toEqual(Array.from(reference.labels));
        for (let c = 1; c <= result.count; c++) {
          let cells = 0;
          let sumI = 0;
          let maxJ = -1;
          for (let k = 0; k < mask.length; k++) {
            if (reference.labels[k] !== c) continue;
            cells++;
            sumI += k % width;
            maxJ = Math.floor(k / width);
          }
          expect(result.stats.cellCount[c]).toBe(cells);
          expect(result.stats.centroidX[c]).toBeCloseTo(sumI / cells + 0.5, 10);
          expect(result.stats.maxJ[c]).toBe(maxJ);
          expect(reference.labels[result.stats.firstCell[c]]).toBe(c);
        }
      }
    }
  });

  it('when compared with image-js on random masks, then the same cells form the same components with the same sizes and boxes', () => {
    for (const [width, height, density, seed] of [
      [50, 40, 0.35, 21],
      [80, 60, 0.5, 22],
    ] as const) {
      for (const allowCorners of [false, true]) {
        // Arrange. Reference: image-js@1.7.0, fromMask(mask, { allowCorners }).getRois(); its ROI map gives
        // positive ids to set pixels. Row r of the image is our row j, so the layout is identical.
        const mask = randomMask(width, height, density, seed);
        const manager = fromMask(new Mask(width, height, { data: Uint8Array.from(mask) }), { allowCorners });
        const rois = manager.getRois();
        // Act
        const result = labelComponents(mask, width, height, allowCorners ? 8 : 4);
        // Assert
        expect(result.count).toBe(rois.length);
        expect(samePartition(result.labels, manager.getMap().data)).toBe(true);
        const ours = [];
        for (let c = 1; c <= result.count; c++) {
          const s = result.stats;
          ours.push([s.cellCount[c], s.minI[c], s.minJ[c], s.maxI[c] - s.minI[c] + 1, s.maxJ[c] - s.minJ[c] + 1].join(','));
        }
        const theirs = rois.map((r) => [r.surface, r.origin.column, r.origin.row, r.width, r.height].join(','));
        expect(ours.sort()).toEqual(theirs.sort());
      }
    }
  });

  it('when a checkerboard needs more provisional labels than the first buffer, then labelling still matches BFS', () => {
    // Arrange: 4-connected checkerboard = one component per set cell (1 250 of them).
    const width = 50;
    const height = 50;
    const mask = new Uint8Array(width * height);
    for (let k = 0; k < mask.length; k++) mask[k] = ((k % width) + Math.floor(k / width)) % 2;
    // Act
    const four = labelComponents(mask, width, height, 4);
    const eight = labelComponents(mask, width, height, 8);
    // Assert: diagonal neighbours join every set cell into one 8-component.
    expect(four.count).toBe(1250);
    expect(eight.count).toBe(1);
    expect(Array.from(four.labels)).toEqual(Array.from(floodFill(mask, width, height, 4).labels));
  });

  it('when the mask is empty or its size is wrong, then there are no components or a RangeError', () => {
    expect(labelComponents(new Uint8Array(12), 4, 3).count).toBe(0);
    expect(() => labelComponents(new Uint8Array(11), 4, 3)).toThrow(/needs 12/);
  });
});
