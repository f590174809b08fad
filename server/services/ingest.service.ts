import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { open, rm, stat } from 'node:fs/promises';
import { createInterface } from 'node:readline';
import { pipeline, Transform } from 'node:stream';
import { createGunzip, gunzipSync } from 'node:zlib';
import type { Database } from 'better-sqlite3';
import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import type { OccupancyGrid } from '../../shared/types/grid.js';
import { MapVersion, Robot, ScanBatch, Site } from '../entities/index.js';
import type { BatchSource } from '../entities/scan-batch.entity.js';
import { conflict, HttpError, notFound } from '../http-error.js';
import { EvidenceStore, rawHandle, sqliteDatetime } from './evidence-store.js';
import { newId } from './ids.js';
import type { MapVersionsService } from './map-versions.service.js';
import { lineLengthGuard, readLogHead } from './log-precheck.js';
import { ScanAccumulator } from './scan-accumulator.js';
import { siteSettings } from './site-settings.js';
import type { SitesService } from './sites.service.js';

/** Largest decompressed robot batch, bytes: guards against gzip bombs (product choice). */
export const ROBOT_BATCH_MAX_BYTES = 32 * 1024 * 1024;
/** Longest stretch of a robot batch's tracing between two yields to other requests, ms (product choice: well under the dashboards' 100 ms). */
const ROBOT_BATCH_SLICE_MS = 10;
/** Largest uploaded scan log, bytes as uploaded (product choice). */
export const UPLOAD_MAX_BYTES = 2 * 1024 * 1024 * 1024;
/** Largest decompressed size of an uploaded log, bytes. */
const UPLOAD_MAX_INFLATED_BYTES = 8 * 1024 * 1024 * 1024;
/** Bytes at the start of an uploaded log looked at to tell text from a binary file. */
const LOG_SNIFF_BYTES = 4096;

function batchView(b: ScanBatch) {
  return {
    id: b.id,
    siteId: b.siteId,
    robotId: b.robotId,
    mapVersionId: b.mapVersionId,
    source: b.source,
    fileName: b.fileName,
    idempotencyKey: b.idempotencyKey,
    status: b.status,
    receivedAt: new Date(b.receivedAt).toISOString(),
    finishedAt: b.finishedAt ? new Date(b.finishedAt).toISOString() : null,
    progress: b.bytesTotal ? Math.min(1, b.bytesRead / b.bytesTotal) : b.status === 'processing' ? 0 : 1,
    bytesRead: b.bytesRead,
    bytesTotal: b.bytesTotal,
    lines: b.lines,
    scans: b.scans,
    poses: b.poses,
    beams: b.beams,
    returns: b.returns,
    explained: b.explained,
    agreement: b.returns > 0 ? b.explained / b.returns : null,
    outOfMap: b.outOfMap,
    rejectedCount: b.rejectedCount,
    rejectedLines: b.rejectedLines,
    days: b.days,
    error: b.error,
  };
}
export type BatchView = ReturnType<typeof batchView>;

/**
 * Scan ingest: robot batches and uploaded logs become evidence. Policy: good lines are counted,
 * refused lines are reported with line number and reason; a batch with no good line counts
 * nothing. A replay (same Idempotency-Key, or same content) counts nothing and says so.
 */
export class IngestService {
  private readonly store: EvidenceStore;

  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly mapVersions: MapVersionsService,
    private readonly log: Logger,
  ) {
    this.store = new EvidenceStore(db);
  }

  private async activeMap(site: Site) {
    const version = await this.mapVersions.activeFloor(site.id);
    if (!version) throw conflict(`${site.name} has no active floor map yet: a mapper must upload and activate one before scans can be counted.`);
    return { version, grid: await this.mapVersions.grid(version) };
  }

  /** A fresh accumulator for a batch counted against the site's active map version. */
  private async accumulator(site: Site, map: { version: MapVersion; grid: OccupancyGrid }, opts: { robotsByName?: Map<string, Robot>; expectedRobot?: string; now: Date; spillFile?: string }) {
    const settings = siteSettings(site);
    const res = map.grid.resolution;
    return new ScanAccumulator({
      grid: map.grid,
      agreement: {
        distance: (await this.mapVersions.distanceField(map.version)).values,
        toleranceCells: settings.agreementToleranceM / res,
        blockCells: Math.max(1, Math.round(settings.agreementBlockM / res)),
      },
      timezone: site.timezone,
      robotsByName: opts.robotsByName ?? (await this.robotsByName(site.id)),
      expectedRobot: opts.expectedRobot,
      countNoReturnAsPass: settings.countNoReturnAsPass,
      maxNoReturnTraceM: settings.maxNoReturnTraceM,
      now: opts.now,
      spillFile: opts.spillFile,
    });
  }

  private commitAccumulated(version: MapVersion, site: Site, acc: ScanAccumulator, guard: (raw: Database) => boolean) {
    const { stats, blocks, samples, trails, hours } = acc.finish();
    const blockCells = Math.max(1, Math.round(siteSettings(site).agreementBlockM / version.resolution));
    return this.store.commit(version.id, site.id, { chunks: acc.chunks(), stats, blocks, blockCells, samples, trails, hours }, guard).finally(() => acc.spill.close());
  }

  private async robotsByName(siteId: string) {
    const robots = await this.db.getRepository(Robot).findBy({ siteId });
    return new Map(robots.map((r) => [r.name, r]));
  }

  private findReplay(raw: Database, siteId: string, key: string | null, hash: string) {
    const byKey = key ? (raw.prepare("SELECT id, content_hash AS hash FROM scan_batches WHERE site_id = ? AND idempotency_key = ? AND status = 'counted'").get(siteId, key) as { id: string; hash: string } | undefined) : undefined;
    if (byKey) return byKey;
    return raw.prepare("SELECT id, content_hash AS hash FROM scan_batches WHERE site_id = ? AND content_hash = ? AND status = 'counted'").get(siteId, hash) as { id: string; hash: string } | undefined;
  }

  /** Counts a robot's posted batch (JSON Lines, plain or gzip); returns the receipt. */
  async ingestRobotBatch(robot: Robot, body: Buffer, idempotencyKey: string | null, now = new Date()) {
    const text = this.inflateRobotBody(body);
    const hash = createHash('sha256').update(text).digest('hex');
    const site = await this.db.getRepository(Site).findOneByOrFail({ id: robot.siteId });
    const replayed = this.findReplay(rawHandle(this.db), site.id, idempotencyKey, hash);
    if (replayed) return this.replayAnswer(replayed, hash);

    const map = await this.activeMap(site);
    const { version } = map;
    const acc = await this.accumulator(site, map, { robotsByName: new Map([[robot.name, robot]]), expectedRobot: robot.name, now });
    const lines = text.toString('utf8').split('\n');
    let lastYield = Date.now();
    for (let k = 0; k < lines.length; k++) {
      acc.addLine(k + 1, lines[k].replace(/\r$/, ''));
      // Tracing a batch of full scans takes tens of milliseconds: let other requests in between.
      if (Date.now() - lastYield > ROBOT_BATCH_SLICE_MS) {
        await new Promise((resolve) => setImmediate(resolve));
        lastYield = Date.now();
      }
    }
    const f = acc.figures;
    if (f.scans === 0 && f.poses === 0) {
      acc.spill.close();
      throw new HttpError(422, 'no_valid_scans', f.lines === 0 ? 'The batch holds no scan lines.' : `None of the batch's ${f.lines} lines could be counted; nothing was stored.`, { rejectedCount: f.rejectedCount, rejectedLines: f.rejectedLines });
    }
    const id = newId();
    let replay: { id: string; hash: string } | undefined;
    await this.commitAccumulated(version, site, acc, (raw) => {
      // Checked again inside the transaction: two copies posted at once count once.
      replay = this.findReplay(raw, site.id, idempotencyKey, hash);
      if (replay) return false;
      this.insertBatch(raw, { id, siteId: site.id, robotId: robot.id, mapVersionId: version.id, source: 'robot', fileName: null, idempotencyKey, hash, receivedAt: now, figures: f });
      return true;
    });
    if (replay) return this.replayAnswer(replay, hash);
    return { status: 'counted' as const, batch: batchView(await this.db.getRepository(ScanBatch).findOneByOrFail({ id })) };
  }

  /**
   * Counts recorded scan lines (the demo seed, the command line) against the site's active floor
   * map as one batch of source 'upload'; returns its figures. Same policy as uploads. `lines` may
   * be an async iterable (a file streamed line by line); if it fails part-way, nothing is counted.
   */
  async countLines(site: Site, lines: Iterable<string> | AsyncIterable<string>, fileName: string, now = new Date(), receivedAt = now) {
    const map = await this.activeMap(site);
    const { version } = map;
    const acc = await this.accumulator(site, map, { now });
    const hash = createHash('sha256');
    let lineNo = 0;
    let lastYield = Date.now();
    try {
      for await (const line of lines) {
        hash.update(line).update('\n');
        acc.addLine(++lineNo, line);
        // Sync lines and database calls resolve at once, so without this the event loop would
        // starve and the server could not answer requests while a long recording is counted.
        if (Date.now() - lastYield > 50) {
          await new Promise((resolve) => setImmediate(resolve));
          lastYield = Date.now();
        }
      }
    } catch (e) {
      // A source that breaks off (a damaged file) leaves nothing behind.
      acc.spill.close();
      throw e;
    }
    const id = newId();
    const contentHash = hash.digest('hex');
    const counted = await this.commitAccumulated(version, site, acc, (raw) => {
      if (this.findReplay(raw, site.id, null, contentHash)) return false;
      this.insertBatch(raw, { id, siteId: site.id, robotId: null, mapVersionId: version.id, source: 'upload', fileName, idempotencyKey: null, hash: contentHash, receivedAt, figures: acc.figures });
      return true;
    });
    return { counted, figures: acc.figures };
  }

  private async replayAnswer(replayed: { id: string; hash: string }, hash: string) {
    if (replayed.hash !== hash) throw conflict('This Idempotency-Key was already used for a batch with different content; use a new key for new scans.');
    return { status: 'already_received' as const, batch: batchView(await this.db.getRepository(ScanBatch).findOneByOrFail({ id: replayed.id })) };
  }

  private inflateRobotBody(body: Buffer): Buffer {
    if (body.length >= 2 && body[0] === 0x1f && body[1] === 0x8b) {
      try {
        return gunzipSync(body, { maxOutputLength: ROBOT_BATCH_MAX_BYTES });
      } catch (e) {
        const code = (e as { code?: string }).code;
        if (code === 'ERR_BUFFER_TOO_LARGE') throw new HttpError(413, 'payload_too_large', `The batch unpacks to more than ${ROBOT_BATCH_MAX_BYTES / 1024 / 1024} MB; send smaller batches.`);
        throw new HttpError(400, 'invalid_gzip', 'The batch looks gzip-compressed but could not be unpacked.');
      }
    }
    return body;
  }

  private insertBatch(raw: Database, b: { id: string; siteId: string; robotId: string | null; mapVersionId: string; source: BatchSource; fileName: string | null; idempotencyKey: string | null; hash: string; receivedAt: Date; figures: ScanAccumulator['figures'] }) {
    const f = b.figures;
    raw
      .prepare(
        'INSERT INTO scan_batches (id, site_id, robot_id, map_version_id, source, file_name, idempotency_key, content_hash, status, received_at, finished_at, bytes_read, bytes_total, lines, scans, poses, beams, returns, explained, out_of_map, rejected_count, rejected_lines, days, error) ' +
          "VALUES (?, ?, ?, ?, ?, ?, ?, ?, 'counted', ?, ?, 0, NULL, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, NULL)",
      )
      .run(b.id, b.siteId, b.robotId, b.mapVersionId, b.source, b.fileName, b.idempotencyKey, b.hash, sqliteDatetime(b.receivedAt), sqliteDatetime(new Date()), f.lines, f.scans, f.poses, f.beams, f.returns, f.explained, f.outOfMap, f.rejectedCount, JSON.stringify(f.rejectedLines), JSON.stringify(f.days));
  }

  /**
   * Registers an uploaded log (already on disk) as a processing batch and reads it in the
   * background; the returned batch is polled for progress. The file is removed afterwards.
   */
  async startUpload(actor: Actor, siteId: string, file: { path: string; originalname: string }) {
    let site: Site;
    let map: Awaited<ReturnType<IngestService['activeMap']>>;
    try {
      site = await this.sites.getVisible(actor, siteId);
      map = await this.activeMap(site);
      // Text never holds a NUL byte, while images, archives and other binaries soon do.
      const head = await readHead(file.path, LOG_SNIFF_BYTES);
      if (!(head[0] === 0x1f && head[1] === 0x8b) && head.includes(0)) {
        throw new HttpError(415, 'unsupported_log_type', `"${file.originalname}" is not a scan log: send JSON Lines (.jsonl) or gzip-compressed JSON Lines (.jsonl.gz).`);
      }
      await this.refuseUncountableLog(site, map, file.path, head[0] === 0x1f && head[1] === 0x8b);
    } catch (e) {
      // A refused upload leaves nothing behind, not even the file.
      await rm(file.path, { force: true });
      throw e;
    }
    const { version } = map;
    const size = (await stat(file.path)).size;
    const batch = this.db.getRepository(ScanBatch).create({
      id: newId(),
      siteId: site.id,
      robotId: null,
      mapVersionId: version.id,
      source: 'upload',
      fileName: file.originalname,
      idempotencyKey: null,
      contentHash: null,
      status: 'processing',
      receivedAt: new Date(),
      bytesRead: 0,
      bytesTotal: size,
      rejectedLines: [],
      days: [],
    });
    await this.db.getRepository(ScanBatch).save(batch);
    const acc = await this.accumulator(site, map, { now: new Date(), spillFile: `${file.path}.chunks` });
    const done = this.processUpload(batch, site, version, file.path, acc)
      .catch(async (e) => {
        this.log.error({ err: e, batch: batch.id }, 'scan log processing failed');
        await this.db.getRepository(ScanBatch).update(batch.id, { status: 'failed', error: 'The log could not be read to the end; nothing was counted.', finishedAt: new Date() });
      })
      .finally(() => rm(file.path, { force: true }));
    this.pending.add(done);
    void done.finally(() => this.pending.delete(done));
    return batchView(batch);
  }

  /**
   * Refuses up front (422, nothing stored) a log none of whose lines in its first megabyte unpacked
   * could be counted — for a small log that is every line — or that is not readable gzip, or whose
   * first line is absurdly long (a bomb). Anything else is accepted and read in the background.
   */
  private async refuseUncountableLog(site: Site, map: Awaited<ReturnType<IngestService['activeMap']>>, path: string, gzipped: boolean) {
    const head = await readLogHead(path, gzipped);
    const acc = await this.accumulator(site, map, { now: new Date() });
    try {
      head.lines.forEach((line, k) => acc.addLine(k + 1, line));
      const f = acc.figures;
      if (f.scans > 0 || f.poses > 0) return;
      const details = { rejectedCount: f.rejectedCount, rejectedLines: f.rejectedLines };
      if (head.complete) throw new HttpError(422, 'no_valid_scans', f.lines === 0 ? 'The file holds no scan lines; nothing was stored.' : `None of the file's ${f.lines} lines could be counted; nothing was stored.`, details);
      throw new HttpError(422, 'no_valid_scans', f.lines === 0 ? 'The first megabyte of the file (unpacked) holds no scan line, so it is not a scan log; nothing was stored.' : `None of the first ${f.lines} lines of the file could be counted, so the log was refused; nothing was stored.`, details);
    } finally {
      acc.spill.close();
    }
  }

  /** Uploads still being processed; tests and shutdown wait on them. */
  readonly pending = new Set<Promise<unknown>>();

  private async processUpload(batch: ScanBatch, site: Site, version: MapVersion, path: string, acc: ScanAccumulator) {
    const repo = this.db.getRepository(ScanBatch);
    const hash = createHash('sha256');
    let bytesRead = 0;
    let inflated = 0;
    const head = await readHead(path);
    const rawCounter = new Transform({
      transform(chunk: Buffer, _enc, cb) {
        bytesRead += chunk.length;
        cb(null, chunk);
      },
    });
    const inflatedCounter = new Transform({
      transform(chunk: Buffer, _enc, cb) {
        inflated += chunk.length;
        if (inflated > UPLOAD_MAX_INFLATED_BYTES) return cb(new HttpError(413, 'payload_too_large', 'The log unpacks to more than 8 GB.'));
        hash.update(chunk);
        cb(null, chunk);
      },
    });
    const gzipped = head[0] === 0x1f && head[1] === 0x8b;
    let readError: unknown = null;
    // pipeline destroys every stage when one fails, so the line reader ends instead of waiting.
    const guard = lineLengthGuard();
    const stages = [createReadStream(path), rawCounter, ...(gzipped ? [createGunzip()] : []), inflatedCounter, guard] as const;
    const piped = new Promise<unknown>((resolve) => pipeline([...stages], (e) => resolve(e ?? null)));
    const reader = createInterface({ input: guard, crlfDelay: Infinity });
    let lineNo = 0;
    let lastReport = Date.now();
    try {
      for await (const line of reader) {
        acc.addLine(++lineNo, line);
        if (Date.now() - lastReport > 500) {
          lastReport = Date.now();
          await repo.update(batch.id, { bytesRead, lines: acc.figures.lines, scans: acc.figures.scans, rejectedCount: acc.figures.rejectedCount });
        }
      }
    } catch (e) {
      readError = e;
    }
    readError ??= await piped;
    if (readError) {
      acc.spill.close();
      const tooLarge = readError instanceof HttpError;
      await repo.update(batch.id, { status: 'failed', bytesRead, error: tooLarge ? (readError as HttpError).message : 'The file is damaged (it could not be unpacked to the end); nothing was counted.', finishedAt: new Date() });
      return;
    }
    const f = acc.figures;
    const contentHash = hash.digest('hex');
    const figures = { bytesRead, lines: f.lines, scans: f.scans, poses: f.poses, beams: f.beams, returns: f.returns, explained: f.explained, outOfMap: f.outOfMap, rejectedCount: f.rejectedCount, rejectedLines: f.rejectedLines, days: f.days };
    if (f.scans === 0 && f.poses === 0) {
      acc.spill.close();
      await repo.update(batch.id, { ...figures, status: 'rejected', error: f.lines === 0 ? 'The file holds no scan lines.' : 'No line of the file could be counted; nothing was stored.', finishedAt: new Date() });
      return;
    }
    let duplicateOf: string | null = null;
    await this.commitAccumulated(version, site, acc, (raw) => {
      const replay = this.findReplay(raw, batch.siteId, null, contentHash);
      if (replay) {
        duplicateOf = replay.id;
        return false;
      }
      raw
        .prepare("UPDATE scan_batches SET status = 'counted', content_hash = ?, bytes_read = ?, lines = ?, scans = ?, poses = ?, beams = ?, returns = ?, explained = ?, out_of_map = ?, rejected_count = ?, rejected_lines = ?, days = ?, finished_at = ? WHERE id = ?")
        .run(contentHash, bytesRead, f.lines, f.scans, f.poses, f.beams, f.returns, f.explained, f.outOfMap, f.rejectedCount, JSON.stringify(f.rejectedLines), JSON.stringify(f.days), sqliteDatetime(new Date()), batch.id);
      return true;
    });
    if (duplicateOf) {
      await repo.update(batch.id, { ...figures, status: 'duplicate', contentHash, error: 'This log was already received and counted; nothing was added.', finishedAt: new Date() });
    }
  }

  /** Batches of a visible site, newest first. */
  async listBatches(actor: Actor, siteId: string, limit = 50) {
    const site = await this.sites.getVisible(actor, siteId);
    const rows = await this.db.getRepository(ScanBatch).find({ where: { siteId: site.id }, order: { receivedAt: 'DESC' }, take: limit });
    return rows.map(batchView);
  }

  /** One batch of a visible site. */
  async getBatch(actor: Actor, siteId: string, id: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const row = await this.db.getRepository(ScanBatch).findOneBy({ id, siteId: site.id });
    if (!row) throw notFound('The scan batch');
    return batchView(row);
  }

  /** Marks uploads left 'processing' by a stopped server as failed (nothing of them was counted). */
  async failInterrupted() {
    await this.db.getRepository(ScanBatch).update({ status: 'processing' }, { status: 'failed', error: 'The server stopped while this log was being read; nothing was counted. Upload it again.', finishedAt: new Date() });
  }
}

async function readHead(path: string, length = 2): Promise<Buffer> {
  const fh = await open(path, 'r');
  try {
    const buf = Buffer.alloc(length);
    const { bytesRead } = await fh.read(buf, 0, length, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}
