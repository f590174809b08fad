import { mkdirSync, readdirSync, renameSync, rmSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { BackupFigures } from '../../shared/types/jobs.js';
import { exclusive } from '../transaction-lock.js';
import { rawHandle } from './evidence-store.js';

/** Pages copied per backup step of an in-memory database: about 4 MB at SQLite's default 4 KiB page (product choice). */
const PAGES_PER_STEP = 1024;

/** Where the worker thread loads better-sqlite3 from. */
const DRIVER = createRequire(import.meta.url).resolve('better-sqlite3');

// The worker (plain JavaScript, so that it runs the same from source and from the build) copies a
// file database through its own read-only connection holding one read transaction for the whole
// copy: in WAL mode one consistent snapshot, while the server's connection keeps writing (its writes
// neither wait for the copy nor restart it). Then it makes the copy one self-contained file
// (rollback journal instead of WAL), so that it can be opened read-only, moved and restored without
// companion -wal/-shm files, and checks it whole with PRAGMA integrity_check.
const WORKER_SOURCE = `
const { parentPort, workerData } = require('node:worker_threads');
const Database = require(workerData.driver);
(async () => {
  let pages = null;
  if (workerData.source) {
    const source = new Database(workerData.source, { readonly: true, fileMustExist: true });
    try {
      source.exec('BEGIN');
      source.prepare('SELECT count(*) FROM sqlite_master').get();
      pages = (await source.backup(workerData.dest, { progress: () => 16384 })).totalPages;
      source.exec('COMMIT');
    } finally {
      source.close();
    }
  }
  const copy = new Database(workerData.dest, { fileMustExist: true });
  try {
    copy.pragma('journal_mode = DELETE');
    const problems = copy.pragma('integrity_check').map((r) => r.integrity_check).filter((r) => r !== 'ok');
    if (problems.length > 0) throw new Error('The backup copy failed its integrity check: ' + problems.slice(0, 3).join('; ') + '.');
  } finally {
    copy.close();
  }
  parentPort.postMessage({ pages });
})().catch((err) => parentPort.postMessage({ error: err && err.message ? err.message : String(err) }));
`;

/** A backup's file name: `driftline-YYYYMMDDTHHMMSSZ.sqlite`, with `-2`, `-3`… when two are made within one second. */
const BACKUP_NAME = /^driftline-(\d{8}T\d{6}Z)(?:-(\d+))?\.sqlite$/;

/** Returns the UTC stamp of a backup's name for `now`: "20261202T024500Z". */
export function backupStamp(now: Date): string {
  return now.toISOString().replace(/\.\d{3}Z$/, 'Z').replace(/[-:]/g, '');
}

/** Runs WORKER_SOURCE: copies `source` to `dest` when given, then checks `dest`; resolves to the pages copied (null when it only checked). */
function inWorker(job: { source?: string; dest: string }): Promise<number | null> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(WORKER_SOURCE, { eval: true, workerData: { driver: DRIVER, ...job } });
    worker.once('message', (m: { pages: number | null; error?: string }) => (m.error === undefined ? resolve(m.pages) : reject(new Error(m.error))));
    worker.once('error', reject);
    worker.once('exit', (code) => reject(new Error(`The backup worker stopped (exit code ${code}) before it finished.`)));
  });
}

/** One backup file in the backup folder. */
export interface BackupFile {
  name: string;
  bytes: number;
  /** The UTC stamp in its name. */
  stamp: string;
  /** Counter for backups made within the same second (1 for the first). */
  sequence: number;
}

/** Orders backups oldest first: by the stamp in their names, then by their counter. */
const byAge = (a: BackupFile, b: BackupFile) => (a.stamp === b.stamp ? a.sequence - b.sequence : a.stamp < b.stamp ? -1 : 1);

/**
 * Online backups of the SQLite database into `<dataDir>/backups`: a consistent copy taken while the
 * server keeps reading and writing, checked with `PRAGMA integrity_check`, written under a temporary
 * name and renamed, and rotated so that the newest `keep` remain. Evidence chunks, agreement blocks
 * and every other stored row live in the same SQLite file, so one copy holds them all; the scratch
 * files of a batch being counted (chunk-spill) are not stored data and are not copied.
 */
export class BackupService {
  constructor(
    private readonly db: DataSource,
    private readonly options: { dataDir: string; databasePath: string; backupKeep: number },
    private readonly log: Logger,
  ) {}

  /** The folder that holds the backups. */
  get directory(): string {
    return path.join(this.options.dataDir, 'backups');
  }

  /** The backups in the folder, oldest first; other files there are not listed and never touched. */
  list(): BackupFile[] {
    let names: string[];
    try {
      names = readdirSync(this.directory);
    } catch {
      return [];
    }
    const out: BackupFile[] = [];
    for (const name of names) {
      const m = BACKUP_NAME.exec(name);
      if (!m) continue;
      out.push({ name, bytes: statSync(path.join(this.directory, name)).size, stamp: m[1], sequence: m[2] ? Number(m[2]) : 1 });
    }
    return out.sort(byAge);
  }

  /** Makes one verified backup and rotates the folder; returns what it did (file, bytes, pages, duration in ms, kept and removed files). */
  async create(now = new Date()): Promise<BackupFigures> {
    const started = performance.now();
    try {
      mkdirSync(this.directory, { recursive: true });
    } catch (err) {
      throw new Error(`The backup folder ${this.directory} cannot be made (${(err as Error).message}).`);
    }
    this.removeLeftovers();
    const name = this.freeName(backupStamp(now));
    const partial = path.join(this.directory, `.${name}.partial`);
    const final = path.join(this.directory, name);
    let pages: number;
    try {
      pages = await this.copyAndCheck(partial);
      renameSync(partial, final);
    } catch (err) {
      rmSync(partial, { force: true });
      throw err;
    }
    const { kept, removed } = this.rotate(name);
    const bytes = statSync(final).size;
    const durationMs = Math.round(performance.now() - started);
    this.log.info({ file: name, bytes, durationMs, removed }, 'database backup made');
    return { file: name, bytes, pages, durationMs, integrity: 'ok', keep: this.options.backupKeep, kept, removed };
  }

  // A file database is copied and checked in a worker thread, so that neither the copy nor the
  // integrity check (most of a backup's time) holds up the server's requests. An in-memory database
  // (tests) can only be read through the server's own connection, which then has it to itself for
  // the copy; the worker checks that copy.
  private async copyAndCheck(file: string): Promise<number> {
    if (this.options.databasePath !== ':memory:') return (await inWorker({ source: this.options.databasePath, dest: file }))!;
    const { totalPages } = await exclusive(this.db, () => rawHandle(this.db).backup(file, { progress: () => PAGES_PER_STEP }));
    await inWorker({ dest: file });
    return totalPages;
  }

  private freeName(stamp: string): string {
    const taken = new Set(this.list().map((b) => b.name));
    let name = `driftline-${stamp}.sqlite`;
    for (let n = 2; taken.has(name); n++) name = `driftline-${stamp}-${n}.sqlite`;
    return name;
  }

  // Keeps the newest `keep` backups and always the one just made, even when the clock has gone back
  // and older-named files look newer; removes only files with our backup name pattern.
  private rotate(justMade: string): { kept: string[]; removed: string[] } {
    const all = this.list().reverse();
    const others = all.filter((b) => b.name !== justMade);
    const keepOthers = Math.max(0, this.options.backupKeep - 1);
    const kept = [justMade, ...others.slice(0, keepOthers).map((b) => b.name)];
    const removed = others.slice(keepOthers).map((b) => b.name);
    for (const name of removed) rmSync(path.join(this.directory, name), { force: true });
    return { kept, removed };
  }

  // A copy left half-written by a stopped process is not a backup; it is dropped before the next one.
  private removeLeftovers(): void {
    for (const name of readdirSync(this.directory)) {
      if (name.startsWith('.driftline-') && name.endsWith('.partial')) rmSync(path.join(this.directory, name), { force: true });
    }
  }
}
