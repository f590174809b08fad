import { closeSync, copyFileSync, existsSync, mkdirSync, openSync, readSync, renameSync, rmSync, statSync } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { migrations } from '../migrations/index.js';
import { backupStamp } from './backup.service.js';

/** A restore that was refused, with a sentence saying why; nothing was changed. */
export class RestoreRefused extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'RestoreRefused';
  }
}

/** What a restore did: the backup it used, where it went, what it kept, and the migrations still to run. */
export interface RestoreResult {
  file: string;
  bytes: number;
  databasePath: string;
  /** The replaced database's files, renamed `<name>.before-restore-<stamp>[-wal|-shm]`; empty when there was none. */
  kept: string[];
  /** Migrations recorded in the backup. */
  migrationsInBackup: number;
  /** Migrations of this version that the backup has not run: the server runs them when it next starts. */
  pending: string[];
}

/** The error of a job run that was under way when its backup was taken, written by the restore. */
export const INTERRUPTED_BY_BACKUP = 'This run was under way when the backup was taken; its outcome is not in this copy.';

/** The 16 bytes every SQLite 3 database file starts with (SQLite file format, section 1.3.1). */
const SQLITE_HEADER = Buffer.from('SQLite format 3\0', 'latin1');

/** Migration names this version knows, oldest first, as TypeORM records them in the migrations table. */
export function knownMigrations(): string[] {
  return migrations.map((m) => (new (m as new () => { name?: string })().name ?? m.name));
}

// A missing file, a folder, a non-SQLite file or one shorter than its header says are told apart
// before SQLite opens it, so the message says what is wrong with the file, not what SQLite tripped on.
function checkFile(file: string): number {
  if (!existsSync(file)) throw new RestoreRefused(`There is no file at ${file}.`);
  const stat = statSync(file);
  if (!stat.isFile()) throw new RestoreRefused(`${file} is not a file.`);
  const header = Buffer.alloc(100);
  const fd = openSync(file, 'r');
  let read: number;
  try {
    read = readSync(fd, header, 0, 100, 0);
  } finally {
    closeSync(fd);
  }
  if (read < 100 || !header.subarray(0, 16).equals(SQLITE_HEADER)) {
    throw new RestoreRefused(`${file} is not a SQLite database (it does not begin with the SQLite file header), so it cannot be a Driftline backup.`);
  }
  // Page size at offset 16 (1 stands for 65536), page count at 28, valid while the "version-valid-for"
  // number at 92 equals the change counter at 24 (SQLite file format, section 1.3).
  const raw = header.readUInt16BE(16);
  const pageSize = raw === 1 ? 65536 : raw;
  const pages = header.readUInt32BE(28);
  if (header.readUInt32BE(92) === header.readUInt32BE(24) && pages > 0 && stat.size < pageSize * pages) {
    throw new RestoreRefused(`${file} is truncated: its header describes ${pageSize * pages} bytes but the file holds ${stat.size}.`);
  }
  if (existsSync(`${file}-wal`)) {
    throw new RestoreRefused(`${file} has a write-ahead log beside it (${path.basename(file)}-wal): it is a database in use, not a backup. Use a file from the backups folder, or stop the server that uses it first.`);
  }
  return stat.size;
}

// Checks the staged copy (never the caller's file): whole and sound, a Driftline database, and not
// from a newer version; leaves it as one self-contained file. Returns the migrations it has run.
function checkStaged(staged: string, file: string): string[] {
  let db: Database.Database | null = null;
  try {
    db = new Database(staged, { fileMustExist: true });
    db.pragma('journal_mode = DELETE');
    const problems = (db.pragma('integrity_check') as Array<{ integrity_check: string }>).map((r) => r.integrity_check).filter((r) => r !== 'ok');
    if (problems.length > 0) throw new RestoreRefused(`${file} is damaged; SQLite's integrity check says: ${problems.slice(0, 3).join('; ')}.`);
    const table = db.prepare(`SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'migrations'`).get();
    if (!table) throw new RestoreRefused(`${file} is a SQLite database but not a Driftline one: it has no migrations table.`);
    const applied = (db.prepare('SELECT name FROM migrations ORDER BY id').all() as Array<{ name: string }>).map((r) => r.name);
    // A run under way when the backup was taken (at least the backup's own) has no outcome in the copy.
    if (db.prepare(`SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'job_runs'`).get()) {
      db.prepare(`UPDATE job_runs SET status = 'failed', finished_at = started_at, error = ? WHERE status = 'running'`).run(INTERRUPTED_BY_BACKUP);
    }
    return applied;
  } catch (err) {
    if (err instanceof RestoreRefused) throw err;
    throw new RestoreRefused(`${file} is damaged: SQLite cannot read it (${(err as Error).message}).`);
  } finally {
    db?.close();
  }
}

/**
 * True when another connection holds the database (a running server): an exclusive lock cannot be
 * taken at once. A file that is absent or unreadable is not in use (a damaged database is a reason to
 * restore, not a reason to refuse).
 */
export function databaseInUse(databasePath: string): boolean {
  if (!existsSync(databasePath)) return false;
  let db: Database.Database | null = null;
  try {
    db = new Database(databasePath, { fileMustExist: true, timeout: 0 });
    db.pragma('locking_mode = EXCLUSIVE');
    db.exec('BEGIN EXCLUSIVE');
    db.exec('COMMIT');
    return false;
  } catch (err) {
    return String((err as { code?: string }).code ?? '').startsWith('SQLITE_BUSY') || String((err as { code?: string }).code ?? '').startsWith('SQLITE_LOCKED');
  } finally {
    db?.close();
  }
}

function freeStamp(databasePath: string, now: Date): string {
  const base = backupStamp(now);
  let stamp = base;
  for (let n = 2; existsSync(`${databasePath}.before-restore-${stamp}`); n++) stamp = `${base}-${n}`;
  return stamp;
}

/**
 * Restores `file` (a backup) as the database at `databasePath`: refuses while a server holds the
 * database, checks a staged copy of the file (SQLite header, length, integrity check, our migrations
 * table, no migrations newer than this version), keeps the current database and its -wal/-shm as
 * `<name>.before-restore-<stamp>…` (nothing is lost), and moves the checked copy in place. Throws
 * RestoreRefused, with the current database untouched, when anything is wrong.
 */
export function restoreDatabase({ file, databasePath, now = new Date() }: { file: string; databasePath: string; now?: Date }): RestoreResult {
  const source = path.resolve(file);
  const target = path.resolve(databasePath);
  if (source === target) throw new RestoreRefused(`${source} is the database itself; name a backup file.`);
  const bytes = checkFile(source);
  if (databaseInUse(target)) {
    throw new RestoreRefused(`The database ${target} is in use by a running Driftline server (it could not be locked). Stop the server first, then restore.`);
  }
  mkdirSync(path.dirname(target), { recursive: true });
  const stamp = freeStamp(target, now);
  const staged = `${target}.restoring-${stamp}`;
  let applied: string[];
  try {
    copyFileSync(source, staged);
    applied = checkStaged(staged, source);
  } catch (err) {
    rmSync(staged, { force: true });
    rmSync(`${staged}-journal`, { force: true });
    throw err;
  }
  const known = knownMigrations();
  const unknown = applied.filter((name) => !known.includes(name));
  if (unknown.length > 0) {
    rmSync(staged, { force: true });
    throw new RestoreRefused(`${source} was made by a newer Driftline: it ran migrations this version does not know (${unknown.join(', ')}). Restore it with that version.`);
  }

  const kept: string[] = [];
  try {
    for (const suffix of ['', '-wal', '-shm']) {
      if (!existsSync(target + suffix)) continue;
      const aside = `${target}.before-restore-${stamp}${suffix}`;
      renameSync(target + suffix, aside);
      kept.push(aside);
    }
    renameSync(staged, target);
  } catch (err) {
    // Put back what was moved aside, so a failed restore leaves the database as it was.
    for (const aside of kept) renameSync(aside, target + aside.slice(`${target}.before-restore-${stamp}`.length));
    rmSync(staged, { force: true });
    throw err;
  }
  return { file: source, bytes, databasePath: target, kept, migrationsInBackup: applied.length, pending: known.filter((name) => !applied.includes(name)) };
}
