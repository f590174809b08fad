import { Buffer } from 'node:buffer';
import { describe, expect, it } from 'vitest';
import {
  decodeChunkCounters,
  encodeChunkCounters,
  mergeChunk,
  splitIntoChunks,
} from '../../../../shared/evidence/chunks.js';
import { createRng } from '../../../../shared/sim/random.js';

/** Seeded uniform numbers in [0, 1) (the simulator's generator) so every run draws the same values. */
function rng(seed: number): () => number {
  const g = createRng(seed);
  return () => g.next();
}

describe('splitIntoChunks', () => {
  it('when one cell has evidence, then exactly its chunk is returned with the cell at the local index', () => {
    // Arrange: 300 × 200 grid, cell (130, 5) → chunk (1, 0), local (2, 5) → index 5·128 + 2.
    const w = 300;
    const h = 200;
    const hits = new Uint32Array(w * h);
    const passes = new Uint32Array(w * h);
    hits[5 * w + 130] = 7;
    passes[5 * w + 130] = 3;

    // Act
    const chunks = splitIntoChunks(w, h, hits, passes);

    // Assert
    expect(chunks).toHaveLength(1);
    expect([chunks[0].cx, chunks[0].cy]).toEqual([1, 0]);
    expect(chunks[0].hits.length).toBe(128 * 128);
    expect([chunks[0].hits[5 * 128 + 2], chunks[0].passes[5 * 128 + 2]]).toEqual([7, 3]);
    expect(chunks[0].hits.reduce((s, v) => s + v, 0)).toBe(7);
  });

  it('when the counters are all zero, then no chunk is returned', () => {
    expect(splitIntoChunks(300, 200, new Uint32Array(60_000), new Uint32Array(60_000))).toEqual([]);
  });

  it('when a grid is not a multiple of the chunk size, then edge chunks are full-size and padded with zeros, ordered by row then column', () => {
    // Arrange: 5 × 3 grid, chunk 2 → 3 × 2 chunks; fill every cell with 1
    const hits = new Uint32Array(15).fill(1);
    const passes = new Uint32Array(15).fill(2);

    // Act
    const chunks = splitIntoChunks(5, 3, hits, passes, 2);

    // Assert
    expect(chunks.map((c) => [c.cx, c.cy])).toEqual([[0, 0], [1, 0], [2, 0], [0, 1], [1, 1], [2, 1]]);
    expect(Array.from(chunks[5].hits)).toEqual([1, 0, 0, 0]); // only cell (4, 2) is inside the grid
    expect(Array.from(chunks[3].passes)).toEqual([2, 2, 0, 0]); // cells (0, 2), (1, 2)
  });

  it('when splitting random sparse counters and merging every chunk back, then the counters come back unchanged', () => {
    // Arrange
    const r = rng(3);
    const w = 301;
    const h = 259;
    const hits = new Uint32Array(w * h);
    const passes = new Uint32Array(w * h);
    for (let n = 0; n < 500; n++) {
      const k = Math.floor(r() * w * h);
      hits[k] += Math.floor(r() * 5);
      passes[k] += Math.floor(r() * 50);
    }

    // Act
    const chunks = splitIntoChunks(w, h, hits, passes, 64);
    const backHits = new Uint32Array(w * h);
    const backPasses = new Uint32Array(w * h);
    for (const c of chunks) mergeChunk(w, h, backHits, backPasses, c, 64);

    // Assert
    expect(backHits).toEqual(hits);
    expect(backPasses).toEqual(passes);
  });

  it('when counters do not match width × height, then it refuses', () => {
    expect(() => splitIntoChunks(10, 10, new Uint32Array(99), new Uint32Array(100))).toThrow(RangeError);
  });
});

describe('mergeChunk', () => {
  it('when merging the same chunk twice, then counts add up (days pooled)', () => {
    // Arrange
    const hits = new Uint32Array(4 * 4);
    const passes = new Uint32Array(4 * 4);
    const chunk = { cx: 1, cy: 1, hits: Uint32Array.from([1, 2, 3, 4]), passes: Uint32Array.from([5, 6, 7, 8]) };

    // Act
    mergeChunk(4, 4, hits, passes, chunk, 2);
    mergeChunk(4, 4, hits, passes, chunk, 2);

    // Assert: chunk (1, 1) covers cells i 2..3, j 2..3
    expect([hits[2 * 4 + 2], hits[2 * 4 + 3], hits[3 * 4 + 2], hits[3 * 4 + 3]]).toEqual([2, 4, 6, 8]);
    expect(passes[3 * 4 + 3]).toBe(16);
    expect(hits[0]).toBe(0);
  });

  it('when a sum would exceed 2³² − 1, then it saturates instead of wrapping', () => {
    const hits = new Uint32Array([0xffff_fff0]);
    const passes = new Uint32Array(1);
    mergeChunk(1, 1, hits, passes, { cx: 0, cy: 0, hits: Uint32Array.from([0x20]), passes: Uint32Array.from([1]) }, 1);
    expect(hits[0]).toBe(0xffff_ffff);
  });

  it('when a chunk has the wrong size, then it refuses', () => {
    expect(() =>
      mergeChunk(4, 4, new Uint32Array(16), new Uint32Array(16), { cx: 0, cy: 0, hits: new Uint32Array(3), passes: new Uint32Array(4) }, 2),
    ).toThrow(/must hold 4 cells/);
  });
});

describe('encodeChunkCounters / decodeChunkCounters', () => {
  it('when encoding, then the bytes equal hits then passes written with Buffer.writeUInt32LE', () => {
    // Arrange: reference is Node's Buffer.writeUInt32LE (Node.js buffer API, little-endian uint32).
    const hits = Uint32Array.from([1, 0x01020304, 0xffffffff]);
    const passes = Uint32Array.from([0, 256, 0x80000000]);
    const ref = Buffer.alloc(24);
    [...hits, ...passes].forEach((v, k) => ref.writeUInt32LE(v, 4 * k));

    // Act
    const bytes = encodeChunkCounters(hits, passes);

    // Assert
    expect(Array.from(bytes)).toEqual(Array.from(ref));
    expect(Array.from(bytes.subarray(4, 8))).toEqual([4, 3, 2, 1]);
  });

  it('when decoding what was encoded, also from an offset inside a larger buffer, then the counters come back', () => {
    // Arrange
    const hits = Uint32Array.from({ length: 128 * 128 }, (_, k) => (k * 2654435761) >>> 0);
    const passes = Uint32Array.from({ length: 128 * 128 }, (_, k) => k);
    const enc = encodeChunkCounters(hits, passes);
    const padded = new Uint8Array(enc.length + 3);
    padded.set(enc, 3);

    // Act
    const back = decodeChunkCounters(padded.subarray(3), 128 * 128);

    // Assert
    expect(back.hits).toEqual(hits);
    expect(back.passes).toEqual(passes);
  });

  it('when stored bytes are not whole cells or not the expected count, then decoding refuses with a sentence', () => {
    expect(() => decodeChunkCounters(new Uint8Array(12))).toThrow(/12 bytes long, which is not a whole number of cells/);
    expect(() => decodeChunkCounters(new Uint8Array(16), 4)).toThrow(/hold 2 cells where 4 were expected/);
    expect(() => encodeChunkCounters(new Uint32Array(2), new Uint32Array(3))).toThrow(RangeError);
  });
});
