import { mkdirSync, readdirSync, renameSync, rmSync, statSync } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { BackupFigures } from '../../shared/types/jobs.js';
import { exclusive } from '../transaction-lock.js';
import { rawHandle } from './evidence-store.js';

/** Pages copied per backup step: about 4 MB at SQLite's default 4 KiB page, so the event loop is never held for long (product choice). */
const PAGES_PER_STEP = 1024;

/** A backup's file name: `driftline-YYYYMMDDTHHMMSSZ.sqlite`, with `-2`, `-3`… when two are made within one second. */
const BACKUP_NAME = /^driftline-(\d{8}T\d{6}Z)(?:-(\d+))?\.sqlite$/;

/** Returns the UTC stamp of a backup's name for `now`: "20261202T024500Z". */
export function backupStamp(now: Date): string {
  return now.toISOString().replace(/\.\d{3}Z$/, 'Z').replace(/[-:]/g, '');
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
    mkdirSync(this.directory, { recursive: true });
    this.removeLeftovers();
    const name = this.freeName(backupStamp(now));
    const partial = path.join(this.directory, `.${name}.partial`);
    const final = path.join(this.directory, name);
    let pages: number;
    try {
      pages = await this.copyTo(partial);
      this.verify(partial);
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

  // A file database is copied through a second, read-only connection that holds one read transaction
  // for the whole copy: in WAL mode that is one consistent snapshot, while the server's connection
  // keeps writing (its writes are not waited for and do not restart the copy). An in-memory database
  // (tests) can only be read through the server's own connection; the copy then has it to itself.
  private async copyTo(file: string): Promise<number> {
    const progress = () => PAGES_PER_STEP;
    if (this.options.databasePath === ':memory:') {
      const result = await exclusive(this.db, () => rawHandle(this.db).backup(file, { progress }));
      return result.totalPages;
    }
    const source = new Database(this.options.databasePath, { readonly: true, fileMustExist: true });
    try {
      source.exec('BEGIN');
      source.prepare('SELECT count(*) FROM sqlite_master').get();
      const result = await source.backup(file, { progress });
      source.exec('COMMIT');
      return result.totalPages;
    } finally {
      source.close();
    }
  }

  // The copy becomes one self-contained file (rollback journal instead of WAL), so that it can be
  // opened read-only, moved and restored without companion -wal/-shm files; then it is checked whole.
  private verify(file: string): void {
    const copy = new Database(file, { fileMustExist: true });
    try {
      copy.pragma('journal_mode = DELETE');
      const rows = copy.pragma('integrity_check') as Array<{ integrity_check: string }>;
      const problems = rows.map((r) => r.integrity_check).filter((r) => r !== 'ok');
      if (problems.length > 0) throw new Error(`The backup copy failed its integrity check: ${problems.slice(0, 3).join('; ')}.`);
    } finally {
      copy.close();
    }
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
