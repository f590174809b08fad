/**
 * Evidence is stored per map version, per site-local day, in fixed-size square chunks of the
 * grid's hit/pass counters (DESIGN §4.2). A chunk always holds chunkSize × chunkSize cells; cells
 * of edge chunks that fall outside the grid stay 0 (they deflate to almost nothing).
 * Memory: 8 bytes per cell (two Uint32 counters), 128 KB per 128 × 128 chunk before compression.
 */

/** Default chunk side in cells (128 cells = 6.4 m at 5 cm per cell). A product choice. */
export const DEFAULT_CHUNK_SIZE = 128;

/** One chunk of counters: chunk column cx and row cy, and chunkSize² counters each, row-major from the chunk's bottom row. */
export interface EvidenceChunk {
  cx: number;
  cy: number;
  hits: Uint32Array;
  passes: Uint32Array;
}

const UINT32_MAX = 0xffff_ffff;
/** True when typed arrays on this machine hold numbers in little-endian order, the stored order. */
const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1;

function checkCounters(width: number, height: number, hits: Uint32Array, passes: Uint32Array, chunkSize: number): void {
  if (hits.length !== width * height || passes.length !== width * height) {
    throw new RangeError(`Counters must hold ${width * height} cells (width × height) each.`);
  }
  if (!Number.isInteger(chunkSize) || chunkSize < 1) throw new RangeError('The chunk size must be a whole number of cells ≥ 1.');
}

/**
 * Splits full-grid counters (index j·width + i) into chunkSize × chunkSize chunks, keeping only
 * chunks with at least one non-zero counter; returns them ordered by cy, then cx.
 */
export function splitIntoChunks(
  width: number,
  height: number,
  hits: Uint32Array,
  passes: Uint32Array,
  chunkSize = DEFAULT_CHUNK_SIZE,
): EvidenceChunk[] {
  checkCounters(width, height, hits, passes, chunkSize);
  const chunks: EvidenceChunk[] = [];
  const nx = Math.ceil(width / chunkSize);
  const ny = Math.ceil(height / chunkSize);
  for (let cy = 0; cy < ny; cy++) {
    for (let cx = 0; cx < nx; cx++) {
      const i0 = cx * chunkSize;
      const j0 = cy * chunkSize;
      const iEnd = Math.min(i0 + chunkSize, width);
      const jEnd = Math.min(j0 + chunkSize, height);
      // Test for emptiness before allocating: most chunks of a day are untouched.
      if (!anyNonZero(width, hits, passes, i0, j0, iEnd, jEnd)) continue;
      const ch = new Uint32Array(chunkSize * chunkSize);
      const cp = new Uint32Array(chunkSize * chunkSize);
      for (let j = j0; j < jEnd; j++) {
        const src = j * width;
        const dst = (j - j0) * chunkSize - i0;
        for (let i = i0; i < iEnd; i++) {
          ch[dst + i] = hits[src + i];
          cp[dst + i] = passes[src + i];
        }
      }
      chunks.push({ cx, cy, hits: ch, passes: cp });
    }
  }
  return chunks;
}

function anyNonZero(
  width: number,
  hits: Uint32Array,
  passes: Uint32Array,
  i0: number,
  j0: number,
  iEnd: number,
  jEnd: number,
): boolean {
  for (let j = j0; j < jEnd; j++) {
    const row = j * width;
    for (let i = i0; i < iEnd; i++) {
      if (hits[row + i] !== 0 || passes[row + i] !== 0) return true;
    }
  }
  return false;
}

/**
 * Adds one chunk's counters into full-grid counters (index j·width + i), saturating at 2³² − 1
 * rather than wrapping; chunk cells outside the grid are ignored. Returns nothing.
 */
export function mergeChunk(
  width: number,
  height: number,
  hits: Uint32Array,
  passes: Uint32Array,
  chunk: EvidenceChunk,
  chunkSize = DEFAULT_CHUNK_SIZE,
): void {
  checkCounters(width, height, hits, passes, chunkSize);
  if (chunk.hits.length !== chunkSize * chunkSize || chunk.passes.length !== chunkSize * chunkSize) {
    throw new RangeError(`A chunk must hold ${chunkSize * chunkSize} cells (${chunkSize} × ${chunkSize}) of each counter.`);
  }
  const i0 = chunk.cx * chunkSize;
  const j0 = chunk.cy * chunkSize;
  const iEnd = Math.min(i0 + chunkSize, width);
  const jEnd = Math.min(j0 + chunkSize, height);
  for (let j = Math.max(j0, 0); j < jEnd; j++) {
    const dst = j * width;
    const src = (j - j0) * chunkSize - i0;
    for (let i = Math.max(i0, 0); i < iEnd; i++) {
      hits[dst + i] = Math.min(hits[dst + i] + chunk.hits[src + i], UINT32_MAX);
      passes[dst + i] = Math.min(passes[dst + i] + chunk.passes[src + i], UINT32_MAX);
    }
  }
}

/**
 * Serialises a chunk's counters for storage: n hits then n passes, each a little-endian uint32,
 * 8 bytes per cell (the server deflates the result). Returns the bytes.
 */
export function encodeChunkCounters(hits: Uint32Array, passes: Uint32Array): Uint8Array {
  if (hits.length !== passes.length) throw new RangeError('Hits and passes must hold the same number of cells.');
  const n = hits.length;
  const out = new Uint8Array(8 * n);
  if (LITTLE_ENDIAN) {
    // The machine's own order is the stored one: two block copies instead of 2n calls.
    out.set(new Uint8Array(hits.buffer, hits.byteOffset, 4 * n), 0);
    out.set(new Uint8Array(passes.buffer, passes.byteOffset, 4 * n), 4 * n);
    return out;
  }
  // DataView fixes the byte order; a typed-array view would follow the machine's.
  const view = new DataView(out.buffer);
  for (let k = 0; k < n; k++) {
    view.setUint32(4 * k, hits[k], true);
    view.setUint32(4 * (n + k), passes[k], true);
  }
  return out;
}

/**
 * Reads counters written by encodeChunkCounters (8 bytes per cell, little-endian); when
 * expectedCells is given the byte count must match it. Returns hits and passes.
 */
export function decodeChunkCounters(bytes: Uint8Array, expectedCells?: number): { hits: Uint32Array; passes: Uint32Array } {
  if (bytes.length % 8 !== 0) {
    throw new RangeError(`Stored chunk counters are ${bytes.length} bytes long, which is not a whole number of cells (8 bytes each).`);
  }
  const n = bytes.length / 8;
  if (expectedCells !== undefined && n !== expectedCells) {
    throw new RangeError(`Stored chunk counters hold ${n} cells where ${expectedCells} were expected.`);
  }
  const hits = new Uint32Array(n);
  const passes = new Uint32Array(n);
  if (LITTLE_ENDIAN) {
    new Uint8Array(hits.buffer).set(bytes.subarray(0, 4 * n));
    new Uint8Array(passes.buffer).set(bytes.subarray(4 * n, 8 * n));
    return { hits, passes };
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let k = 0; k < n; k++) {
    hits[k] = view.getUint32(4 * k, true);
    passes[k] = view.getUint32(4 * (n + k), true);
  }
  return { hits, passes };
}
