import { closeSync, openSync, readSync, rmSync, writeSync } from 'node:fs';

/** Where a packed chunk belongs: robot, site-local day, chunk column and row. */
export interface ChunkKey {
  robotId: string;
  day: string;
  cx: number;
  cy: number;
}

/** A chunk's counters ready to add to the store: deflated encodeChunkCounters bytes. */
export interface PendingChunk extends ChunkKey {
  data: Buffer;
}

/**
 * Packed chunks of a batch, kept in memory or appended to a scratch file so that a long
 * recording's memory stays flat (only a small index per chunk stays in memory).
 */
export class ChunkSpill {
  private readonly index: Array<ChunkKey & { offset: number; length: number }> = [];
  private readonly memory: Buffer[] = [];
  private fd: number | null = null;
  private size = 0;

  /** With a file path the chunks go to disk; without one they stay in memory. */
  constructor(private readonly file?: string) {
    if (file) this.fd = openSync(file, 'w+');
  }

  /** Adds one packed chunk. */
  push(key: ChunkKey, data: Buffer): void {
    if (this.fd !== null) {
      writeSync(this.fd, data, 0, data.length, this.size);
      this.index.push({ ...key, offset: this.size, length: data.length });
    } else {
      this.index.push({ ...key, offset: this.memory.length, length: data.length });
      this.memory.push(data);
    }
    this.size += data.length;
  }

  /** Number of packed chunks. */
  get count(): number {
    return this.index.length;
  }

  /** Reads the chunks back one at a time, in the order they were pushed. */
  *chunks(): Generator<PendingChunk> {
    for (const e of this.index) {
      let data: Buffer;
      if (this.fd !== null) {
        data = Buffer.alloc(e.length);
        readSync(this.fd, data, 0, e.length, e.offset);
      } else {
        data = this.memory[e.offset];
      }
      yield { robotId: e.robotId, day: e.day, cx: e.cx, cy: e.cy, data };
    }
  }

  /** Releases the scratch file. */
  close(): void {
    if (this.fd !== null) {
      closeSync(this.fd);
      this.fd = null;
      rmSync(this.file!, { force: true });
    }
  }
}
