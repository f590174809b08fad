import { promisify } from 'node:util';
import { deflateRaw, deflateRawSync, inflateRaw, inflateRawSync } from 'node:zlib';
import type { Database } from 'better-sqlite3';
import type { DataSource } from 'typeorm';
import { decodeChunkCounters, DEFAULT_CHUNK_SIZE, encodeChunkCounters, mergeChunk } from '../../shared/evidence/chunks.js';
import type { EvidenceCounters } from '../../shared/scan/accumulate.js';
import { exclusive } from '../transaction-lock.js';
import { encodeTrail } from '../../shared/scan/trail.js';
import { newId } from './ids.js';
import type { BatchChunk, PendingBlocks, PendingHour, PendingSample, PendingStat, PendingTrail } from './scan-accumulator.js';

const CHUNK_CELLS = DEFAULT_CHUNK_SIZE * DEFAULT_CHUNK_SIZE;
const UINT32_MAX = 0xffff_ffff;

/** SQLite datetime text as TypeORM writes it (UTC, no zone suffix). */
export const sqliteDatetime = (d: Date) => d.toISOString().replace('T', ' ').replace('Z', '');

/** The raw better-sqlite3 handle under TypeORM, for synchronous transactions on the ingest path. */
export const rawHandle = (db: DataSource) => (db.driver as unknown as { databaseConnection: Database }).databaseConnection;

/** What one batch adds to the store. */
export interface BatchEvidence {
  chunks: Iterable<BatchChunk>;
  stats: PendingStat[];
  blocks: PendingBlocks[];
  blockCells: number;
  samples: PendingSample[];
  trails: PendingTrail[];
  hours: PendingHour[];
}

/** Most raw scans kept per robot, scanner and day for mount estimation (product choice). */
export const SAMPLE_MAX = 48;

function addSaturating(into: Uint32Array, from: Uint32Array) {
  for (let k = 0; k < into.length; k++) into[k] = Math.min(into[k] + from[k], UINT32_MAX);
}

/**
 * Chunks of a batch whose sum with the stored chunk is worked out before the transaction, on
 * zlib's worker threads (product choice: enough for a robot's batch; a long upload's further
 * chunks are summed inside the transaction, so memory stays bounded).
 */
const PREPARED_MAX = 256;
/**
 * Chunks summed at once off the main thread. More than libuv's four pool threads: every zlib call
 * comes back as one event-loop turn, and while the dashboards keep the loop busy few turns come,
 * so each turn should bring back as many finished chunks as it can.
 */
const PREPARE_PARALLEL = 64;
const inflateRawAsync = promisify(inflateRaw);
const deflateRawAsync = promisify(deflateRaw);

/** A batch's chunk summed with the chunk stored when it was read: right only while the stored bytes are still `base`. */
interface PreparedChunk {
  chunk: BatchChunk;
  base: Buffer | null;
  data: Buffer;
}

/** A batch chunk's counters, unpacked (a packed one is inflated). */
function countersOf(c: BatchChunk, raw: Buffer | null) {
  if ('hits' in c) return { hits: c.hits.slice(), passes: c.passes.slice() };
  return decodeChunkCounters(raw ?? inflateRawSync(c.data), CHUNK_CELLS);
}

/** The stored bytes of a chunk summed with a batch's counters: the batch's counters are changed in place. */
function sumCounters(added: { hits: Uint32Array; passes: Uint32Array }, stored: Buffer | null, inflated: Buffer | null) {
  if (stored) {
    const old = decodeChunkCounters(inflated ?? inflateRawSync(stored), CHUNK_CELLS);
    addSaturating(added.hits, old.hits);
    addSaturating(added.passes, old.passes);
  }
  return encodeChunkCounters(added.hits, added.passes);
}

/** Reads stored agreement-block counts (deflated little-endian uint32). */
export function decodeCounts(data: Buffer): Uint32Array {
  const raw = inflateRawSync(data);
  const out = new Uint32Array(raw.length / 4);
  for (let k = 0; k < out.length; k++) out[k] = raw.readUInt32LE(4 * k);
  return out;
}

function encodeCounts(counts: Uint32Array): Buffer {
  const raw = Buffer.alloc(counts.length * 4);
  for (let k = 0; k < counts.length; k++) raw.writeUInt32LE(counts[k], 4 * k);
  return deflateRawSync(raw, { level: 1 });
}

/**
 * Evidence chunks, agreement blocks and daily figures: adds a batch in one synchronous
 * transaction, so a batch is counted whole or not at all and no other query slips in between.
 */
export class EvidenceStore {
  constructor(private readonly db: DataSource) {}

  /**
   * Runs `guard` then adds the batch's evidence, all in one transaction; `guard` returns false to
   * add nothing (e.g. the batch turned out to be a replay). Returns what guard returned.
   */
  async commit(mapVersionId: string, siteId: string, evidence: BatchEvidence, guard: (raw: Database) => boolean): Promise<boolean> {
    const raw = rawHandle(this.db);
    const selectChunk = raw.prepare('SELECT data FROM evidence_chunks WHERE map_version_id = ? AND day = ? AND robot_id = ? AND cx = ? AND cy = ?');
    const storedChunk = (c: BatchChunk) => (selectChunk.get(mapVersionId, c.day, c.robotId, c.cx, c.cy) as { data: Buffer } | undefined)?.data ?? null;
    // The zlib work of summing chunks (most of a robot batch's cost) runs before the transaction
    // and off the main thread, so other requests are answered meanwhile; the transaction then only
    // checks that each stored chunk is still the one summed with, and sums again any that changed.
    const chunks = evidence.chunks[Symbol.iterator]();
    const prepared: PreparedChunk[] = [];
    const prepareNext = async (): Promise<void> => {
      while (prepared.length < PREPARED_MAX) {
        const next = chunks.next();
        if (next.done) return;
        const slot = prepared.push({ chunk: next.value, base: null, data: Buffer.alloc(0) }) - 1;
        const c = next.value;
        const base = storedChunk(c);
        const [addedRaw, storedRaw] = await Promise.all(['hits' in c ? null : inflateRawAsync(c.data), base ? inflateRawAsync(base) : null]);
        prepared[slot] = { chunk: c, base, data: await deflateRawAsync(sumCounters(countersOf(c, addedRaw), base, storedRaw), { level: 1 }) };
      }
    };
    await Promise.all(Array.from({ length: PREPARE_PARALLEL }, prepareNext));
    const upsertChunk = raw.prepare(
      'INSERT INTO evidence_chunks (map_version_id, day, robot_id, cx, cy, data, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?) ' +
        'ON CONFLICT (map_version_id, day, robot_id, cx, cy) DO UPDATE SET data = excluded.data, updated_at = excluded.updated_at',
    );
    const addStat = raw.prepare(
      'INSERT INTO daily_stats (site_id, robot_id, scanner, day, map_version_id, scans, beams, returns, explained, out_of_map) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?) ' +
        'ON CONFLICT (site_id, robot_id, scanner, day, map_version_id) DO UPDATE SET scans = scans + excluded.scans, beams = beams + excluded.beams, ' +
        'returns = returns + excluded.returns, explained = explained + excluded.explained, out_of_map = out_of_map + excluded.out_of_map',
    );
    const selectBlocks = raw.prepare('SELECT data, block_cells AS blockCells FROM agreement_blocks WHERE map_version_id = ? AND day = ? AND robot_id = ?');
    const upsertBlocks = raw.prepare(
      'INSERT INTO agreement_blocks (map_version_id, day, robot_id, block_cells, data) VALUES (?, ?, ?, ?, ?) ' +
        'ON CONFLICT (map_version_id, day, robot_id) DO UPDATE SET data = excluded.data, block_cells = excluded.block_cells',
    );
    const selectSample = raw.prepare('SELECT count, data FROM scan_samples WHERE map_version_id = ? AND robot_id = ? AND scanner = ? AND day = ?');
    const upsertSample = raw.prepare(
      'INSERT INTO scan_samples (map_version_id, robot_id, scanner, day, count, data) VALUES (?, ?, ?, ?, ?, ?) ' +
        'ON CONFLICT (map_version_id, robot_id, scanner, day) DO UPDATE SET count = excluded.count, data = excluded.data',
    );
    const addTrail = raw.prepare('INSERT INTO pose_trails (id, map_version_id, robot_id, day, first_ms, last_ms, count, data) VALUES (?, ?, ?, ?, ?, ?, ?, ?)');
    const addHour = raw.prepare(
      'INSERT INTO hourly_traffic (site_id, hour_start_ms, scans, returns) VALUES (?, ?, ?, ?) ' +
        'ON CONFLICT (site_id, hour_start_ms) DO UPDATE SET scans = scans + excluded.scans, returns = returns + excluded.returns',
    );
    const now = sqliteDatetime(new Date());
    const run = raw.transaction(() => {
      if (!guard(raw)) return false;
      for (const p of prepared) {
        const c = p.chunk;
        const stored = storedChunk(c);
        const same = stored === null ? p.base === null : p.base !== null && stored.equals(p.base);
        upsertChunk.run(mapVersionId, c.day, c.robotId, c.cx, c.cy, same ? p.data : deflateRawSync(sumCounters(countersOf(c, null), stored, null), { level: 1 }), now);
      }
      for (let next = chunks.next(); !next.done; next = chunks.next()) {
        const c = next.value;
        upsertChunk.run(mapVersionId, c.day, c.robotId, c.cx, c.cy, deflateRawSync(sumCounters(countersOf(c, null), storedChunk(c), null), { level: 1 }), now);
      }
      for (const s of evidence.stats) addStat.run(siteId, s.robotId, s.scanner, s.day, mapVersionId, s.scans, s.beams, s.returns, s.explained, s.outOfMap);
      for (const b of evidence.blocks) {
        const counts = b.counts.slice();
        const stored = selectBlocks.get(mapVersionId, b.day, b.robotId) as { data: Buffer; blockCells: number } | undefined;
        // Counts taken with another block size (the setting changed) are replaced, not mixed.
        if (stored && stored.blockCells === evidence.blockCells) {
          const old = decodeCounts(stored.data);
          if (old.length === counts.length) addSaturating(counts, old);
        }
        upsertBlocks.run(mapVersionId, b.day, b.robotId, evidence.blockCells, encodeCounts(counts));
      }
      for (const smp of evidence.samples) {
        const stored = selectSample.get(mapVersionId, smp.robotId, smp.scanner, smp.day) as { count: number; data: Buffer } | undefined;
        const have = stored?.count ?? 0;
        if (have >= SAMPLE_MAX) continue;
        const take = smp.lines.slice(0, SAMPLE_MAX - have);
        const text = (stored ? inflateRawSync(stored.data).toString('utf8') + '\n' : '') + take.join('\n');
        upsertSample.run(mapVersionId, smp.robotId, smp.scanner, smp.day, have + take.length, deflateRawSync(Buffer.from(text), { level: 6 }));
      }
      for (const h of evidence.hours) addHour.run(siteId, h.hourStartMs, h.scans, h.returns);
      for (const trail of evidence.trails) {
        const { t } = trail.points;
        if (t.length === 0) continue;
        const first = t.reduce((a, b) => Math.min(a, b));
        const last = t.reduce((a, b) => Math.max(a, b));
        addTrail.run(newId(), mapVersionId, trail.robotId, trail.day, first, last, t.length, deflateRawSync(encodeTrail(trail.points), { level: 6 }));
      }
      return true;
    });
    return exclusive(this.db, () => run());
  }

  /**
   * Adds the stored counters of a map version for the given days into full-grid counters,
   * leaving out the listed robots; returns the number of chunks read.
   */
  async loadInto(mapVersionId: string, days: string[], width: number, height: number, into: EvidenceCounters, excludeRobots: string[] = []): Promise<number> {
    return this.loadIntoSync(mapVersionId, days, width, height, into, excludeRobots);
  }

  /** loadInto without a promise, for pull-style iteration inside a computation. */
  loadIntoSync(mapVersionId: string, days: string[], width: number, height: number, into: EvidenceCounters, excludeRobots: string[] = []): number {
    const raw = rawHandle(this.db);
    const rows = raw
      .prepare(
        `SELECT cx, cy, data FROM evidence_chunks WHERE map_version_id = ? AND day IN (${days.map(() => '?').join(',')})` +
          (excludeRobots.length ? ` AND robot_id NOT IN (${excludeRobots.map(() => '?').join(',')})` : ''),
      )
      .all(mapVersionId, ...days, ...excludeRobots) as Array<{ cx: number; cy: number; data: Buffer }>;
    for (const row of rows) {
      const { hits, passes } = decodeChunkCounters(inflateRawSync(row.data), CHUNK_CELLS);
      mergeChunk(width, height, into.hits, into.passes, { cx: row.cx, cy: row.cy, hits, passes });
    }
    return rows.length;
  }

  /** The days of a map version that hold evidence, oldest first. */
  daysWithEvidence(mapVersionId: string, from: string, to: string): string[] {
    const rows = rawHandle(this.db).prepare('SELECT DISTINCT day FROM evidence_chunks WHERE map_version_id = ? AND day >= ? AND day <= ? ORDER BY day').all(mapVersionId, from, to) as Array<{ day: string }>;
    return rows.map((r) => r.day);
  }
}
