import { deflateRawSync, inflateRawSync } from 'node:zlib';
import type { Database } from 'better-sqlite3';
import type { DataSource } from 'typeorm';
import { decodeChunkCounters, DEFAULT_CHUNK_SIZE, encodeChunkCounters, mergeChunk } from '../../shared/evidence/chunks.js';
import type { EvidenceCounters } from '../../shared/scan/accumulate.js';
import { exclusive } from '../transaction-lock.js';
import type { PendingChunk, PendingStat } from './scan-accumulator.js';

const CHUNK_CELLS = DEFAULT_CHUNK_SIZE * DEFAULT_CHUNK_SIZE;
const UINT32_MAX = 0xffff_ffff;

/** SQLite datetime text as TypeORM writes it (UTC, no zone suffix). */
export const sqliteDatetime = (d: Date) => d.toISOString().replace('T', ' ').replace('Z', '');

/** The raw better-sqlite3 handle under TypeORM, for synchronous transactions on the ingest path. */
export const rawHandle = (db: DataSource) => (db.driver as unknown as { databaseConnection: Database }).databaseConnection;

/**
 * Evidence chunks and daily figures: adds a batch's counters in one synchronous transaction, so
 * a batch is counted whole or not at all and no other request's query can slip in between.
 */
export class EvidenceStore {
  constructor(private readonly db: DataSource) {}

  /**
   * Runs `guard` then adds chunks and stats, all in one transaction; `guard` returns false to
   * add nothing (e.g. the batch turned out to be a replay). Returns what guard returned.
   */
  async commit(mapVersionId: string, siteId: string, chunks: PendingChunk[], stats: PendingStat[], guard: (raw: Database) => boolean): Promise<boolean> {
    const raw = rawHandle(this.db);
    const select = raw.prepare('SELECT data FROM evidence_chunks WHERE map_version_id = ? AND day = ? AND cx = ? AND cy = ?');
    const upsert = raw.prepare(
      'INSERT INTO evidence_chunks (map_version_id, day, cx, cy, data, updated_at) VALUES (?, ?, ?, ?, ?, ?) ' +
        'ON CONFLICT (map_version_id, day, cx, cy) DO UPDATE SET data = excluded.data, updated_at = excluded.updated_at',
    );
    const addStat = raw.prepare(
      'INSERT INTO daily_stats (site_id, robot_id, scanner, day, map_version_id, scans, beams, returns, out_of_map) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?) ' +
        'ON CONFLICT (site_id, robot_id, scanner, day, map_version_id) DO UPDATE SET scans = scans + excluded.scans, beams = beams + excluded.beams, ' +
        'returns = returns + excluded.returns, out_of_map = out_of_map + excluded.out_of_map',
    );
    const now = sqliteDatetime(new Date());
    const run = raw.transaction(() => {
      if (!guard(raw)) return false;
      for (const c of chunks) {
        const added = decodeChunkCounters(inflateRawSync(c.data), CHUNK_CELLS);
        const stored = select.get(mapVersionId, c.day, c.cx, c.cy) as { data: Buffer } | undefined;
        if (stored) {
          const old = decodeChunkCounters(inflateRawSync(stored.data), CHUNK_CELLS);
          for (let k = 0; k < CHUNK_CELLS; k++) {
            added.hits[k] = Math.min(added.hits[k] + old.hits[k], UINT32_MAX);
            added.passes[k] = Math.min(added.passes[k] + old.passes[k], UINT32_MAX);
          }
        }
        upsert.run(mapVersionId, c.day, c.cx, c.cy, deflateRawSync(encodeChunkCounters(added.hits, added.passes), { level: 1 }), now);
      }
      for (const s of stats) addStat.run(siteId, s.robotId, s.scanner, s.day, mapVersionId, s.scans, s.beams, s.returns, s.outOfMap);
      return true;
    });
    return exclusive(this.db, () => run());
  }

  /** Adds one day's (or several days') stored counters of a map version into full-grid counters. */
  async loadInto(mapVersionId: string, days: string[], width: number, height: number, into: EvidenceCounters): Promise<number> {
    const raw = rawHandle(this.db);
    const rows = raw
      .prepare(`SELECT cx, cy, data FROM evidence_chunks WHERE map_version_id = ? AND day IN (${days.map(() => '?').join(',')})`)
      .all(mapVersionId, ...days) as Array<{ cx: number; cy: number; data: Buffer }>;
    for (const row of rows) {
      const { hits, passes } = decodeChunkCounters(inflateRawSync(row.data), CHUNK_CELLS);
      mergeChunk(width, height, into.hits, into.passes, { cx: row.cx, cy: row.cy, hits, passes });
    }
    return rows.length;
  }
}
