import { deflateRawSync, inflateRawSync } from 'node:zlib';
import type { Database } from 'better-sqlite3';
import type { DataSource } from 'typeorm';
import { decodeChunkCounters, DEFAULT_CHUNK_SIZE, encodeChunkCounters, mergeChunk } from '../../shared/evidence/chunks.js';
import type { EvidenceCounters } from '../../shared/scan/accumulate.js';
import { exclusive } from '../transaction-lock.js';
import type { PendingChunk } from './chunk-spill.js';
import { encodeTrail } from '../../shared/scan/trail.js';
import { newId } from './ids.js';
import type { PendingBlocks, PendingHour, PendingSample, PendingStat, PendingTrail } from './scan-accumulator.js';

const CHUNK_CELLS = DEFAULT_CHUNK_SIZE * DEFAULT_CHUNK_SIZE;
const UINT32_MAX = 0xffff_ffff;

/** SQLite datetime text as TypeORM writes it (UTC, no zone suffix). */
export const sqliteDatetime = (d: Date) => d.toISOString().replace('T', ' ').replace('Z', '');

/** The raw better-sqlite3 handle under TypeORM, for synchronous transactions on the ingest path. */
export const rawHandle = (db: DataSource) => (db.driver as unknown as { databaseConnection: Database }).databaseConnection;

/** What one batch adds to the store. */
export interface BatchEvidence {
  chunks: Iterable<PendingChunk>;
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
      for (const c of evidence.chunks) {
        const added = decodeChunkCounters(inflateRawSync(c.data), CHUNK_CELLS);
        const stored = selectChunk.get(mapVersionId, c.day, c.robotId, c.cx, c.cy) as { data: Buffer } | undefined;
        if (stored) {
          const old = decodeChunkCounters(inflateRawSync(stored.data), CHUNK_CELLS);
          addSaturating(added.hits, old.hits);
          addSaturating(added.passes, old.passes);
        }
        upsertChunk.run(mapVersionId, c.day, c.robotId, c.cx, c.cy, deflateRawSync(encodeChunkCounters(added.hits, added.passes), { level: 1 }), now);
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
