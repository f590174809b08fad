import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import pino from 'pino';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runRestore } from '../../jobs/commands/restore.js';
import { createApp, type AppBundle } from '../../server/app.js';
import { testConfig } from '../../server/config.js';
import { openDatabase } from '../../server/data-source.js';
import { AuditEvent, JobRun } from '../../server/entities/index.js';
import { knownMigrations, restoreDatabase, RestoreRefused } from '../../server/services/backup-restore.js';
import { seedDemoAccounts } from '../../server/services/demo-seed.service.js';
import { newId } from '../../server/services/ids.js';
import { createTestApp, signIn } from './helpers/test-app.js';

const log = pino({ level: 'silent' });
const sha = (file: string) => createHash('sha256').update(readFileSync(file)).digest('hex');
const rows = (file: string, table: string) => {
  const db = new Database(file, { readonly: true });
  try {
    return (db.prepare(`SELECT count(*) AS n FROM ${table}`).get() as { n: number }).n;
  } finally {
    db.close();
  }
};

/** A file database under `dir` with every migration and the demo accounts, and the app over it. */
async function fileApp(dir: string, backupKeep = 7): Promise<AppBundle & { dataSource: DataSource; databasePath: string }> {
  const databasePath = path.join(dir, 'driftline.sqlite');
  const dataSource = await openDatabase({ database: databasePath });
  await seedDemoAccounts(dataSource, log);
  const config = testConfig({ dataDir: dir, databasePath, backupKeep });
  return { ...createApp({ config, dataSource, log }), dataSource, databasePath };
}

const auditRow = (n: number) => ({ at: new Date(), actorId: null, organizationId: null, action: 'test.write', targetType: 'test', targetId: `t-${n}-${newId()}`, summary: `test row ${n}`, details: null });

describe('database backup', () => {
  let dir: string;
  let bundle: Awaited<ReturnType<typeof fileApp>>;

  beforeAll(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'driftline-backup-'));
    bundle = await fileApp(dir, 3);
  });
  afterAll(async () => {
    if (bundle.dataSource.isInitialized) await bundle.dataSource.destroy();
    rmSync(dir, { recursive: true, force: true });
  });

  it('when rows are inserted while a backup runs, then the copy passes its integrity check and holds every row committed before it began, and no row from after it ended', async () => {
    const repo = bundle.dataSource.getRepository(AuditEvent);
    // Enough rows that the copy takes several steps, so that the writer below runs between them.
    await bundle.dataSource.transaction(async (m) => {
      for (let k = 0; k < 3000; k++) await m.getRepository(AuditEvent).insert({ ...auditRow(k), summary: `padded row ${k} ${'x'.repeat(2000)}` });
    });
    let stop = false;
    let written = 0;
    const writer = (async () => {
      while (!stop) {
        await repo.insert(auditRow(100_000 + written));
        written++;
        await new Promise((r) => setImmediate(r));
      }
    })();
    const before = await repo.count();
    const writtenBefore = written;
    const run = await bundle.services.jobRuns.backup('manual', bundle.services.backups);
    const writtenDuring = written - writtenBefore;
    const after = await repo.count();
    stop = true;
    await writer;

    expect(run).toMatchObject({ job: 'backup', status: 'succeeded', error: null });
    const figures = run!.figures as { file: string; bytes: number; pages: number; durationMs: number; kept: string[]; removed: string[] };
    expect(figures.file).toMatch(/^driftline-\d{8}T\d{6}Z\.sqlite$/);
    const file = path.join(dir, 'backups', figures.file);
    expect(figures.bytes).toBe(readFileSync(file).length);
    expect(figures.pages).toBeGreaterThan(1024);
    expect(figures.kept).toEqual([figures.file]);
    expect(writtenDuring).toBeGreaterThan(0);
    const copy = new Database(file, { readonly: true });
    expect(copy.pragma('integrity_check', { simple: true })).toBe('ok');
    // One self-contained file: the copy is in rollback-journal mode, with no -wal beside it.
    expect(copy.pragma('journal_mode', { simple: true })).toBe('delete');
    copy.close();
    expect(existsSync(`${file}-wal`)).toBe(false);
    const copied = rows(file, 'audit_events');
    expect(copied).toBeGreaterThanOrEqual(before);
    expect(copied).toBeLessThanOrEqual(after);
    expect(readdirSync(path.join(dir, 'backups')).filter((n) => n.endsWith('.partial'))).toEqual([]);
  });

  it('when more backups are made than are kept, then the newest ones stay, the one just made always stays, and other files are never touched', async () => {
    const folder = path.join(dir, 'backups');
    writeFileSync(path.join(folder, 'notes.txt'), 'operator notes');
    const made: string[] = [];
    for (const day of ['2030-11-20', '2030-11-21', '2030-11-22', '2030-11-23']) {
      made.push((await bundle.services.backups.create(new Date(`${day}T02:45:00Z`))).file);
    }
    // Two within one second get distinct names.
    const twin = await bundle.services.backups.create(new Date('2030-11-23T02:45:00Z'));
    expect(twin.file).toBe('driftline-20301123T024500Z-2.sqlite');
    // The clock went back: the backup just made has the oldest name, and still stays.
    const old = await bundle.services.backups.create(new Date('2026-01-01T00:00:00Z'));
    const names = bundle.services.backups.list().map((b) => b.name);

    expect(names).toEqual(['driftline-20260101T000000Z.sqlite', 'driftline-20301123T024500Z.sqlite', 'driftline-20301123T024500Z-2.sqlite']);
    expect(old.kept).toEqual(['driftline-20260101T000000Z.sqlite', 'driftline-20301123T024500Z-2.sqlite', 'driftline-20301123T024500Z.sqlite']);
    expect(old.removed).toEqual(['driftline-20301122T024500Z.sqlite']);
    expect(readFileSync(path.join(folder, 'notes.txt'), 'utf8')).toBe('operator notes');
    expect(made).toHaveLength(4);
  });

  it('when a backup is restored into a fresh data directory, then the app opened on it sees the data and the migrations are up to date', async () => {
    const marker = auditRow(424242);
    await bundle.dataSource.getRepository(AuditEvent).insert(marker);
    const run = await bundle.services.jobRuns.backup('manual', bundle.services.backups, new Date('2031-01-01T02:45:00Z'));
    const { file } = run!.figures as { file: string };
    const fresh = mkdtempSync(path.join(os.tmpdir(), 'driftline-restore-'));
    try {
      const target = path.join(fresh, 'driftline.sqlite');
      const result = restoreDatabase({ file: path.join(dir, 'backups', file), databasePath: target });
      expect(result).toMatchObject({ databasePath: target, kept: [], pending: [], migrationsInBackup: knownMigrations().length });

      const restored = await openDatabase({ database: target });
      try {
        const app = createApp({ config: testConfig({ dataDir: fresh, databasePath: target }), dataSource: restored, log }).app;
        const cookie = await signIn(app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
        const sites = await request(app).get('/api/sites').set('Cookie', cookie);
        expect(sites.status).toBe(200);
        expect(sites.body.sites.length).toBe(5);
        expect(await restored.getRepository(AuditEvent).countBy({ targetId: marker.targetId })).toBe(1);
        // The run that made the backup was under way in the copy; the restore says so instead of leaving it 'running'.
        expect(await restored.getRepository(JobRun).countBy({ status: 'running' })).toBe(0);
        expect(await restored.getRepository(JobRun).findOneByOrFail({ id: run!.id })).toMatchObject({ status: 'failed', error: 'This run was under way when the backup was taken; its outcome is not in this copy.' });
      } finally {
        await restored.destroy();
      }
    } finally {
      rmSync(fresh, { recursive: true, force: true });
    }
  });

  it('when the database is held by a running server, then the restore refuses and says to stop the server first', async () => {
    const [backup] = bundle.services.backups.list();
    const before = sha(bundle.databasePath);
    expect(() => restoreDatabase({ file: path.join(dir, 'backups', backup.name), databasePath: bundle.databasePath })).toThrow(/in use by a running Driftline server.*Stop the server first/);
    expect(sha(bundle.databasePath)).toBe(before);
    expect(readdirSync(dir).filter((n) => n.includes('before-restore') || n.includes('restoring'))).toEqual([]);
  });

  it('when the server is stopped and a backup is restored over the current database, then the current one is kept beside it, and the restored one is the backup', async () => {
    const newest = bundle.services.backups.list().at(-1)!;
    const backupFile = path.join(dir, 'backups', newest.name);
    await bundle.dataSource.getRepository(AuditEvent).insert(auditRow(777));
    const liveRows = await bundle.dataSource.getRepository(AuditEvent).count();
    await bundle.dataSource.destroy();

    const result = restoreDatabase({ file: backupFile, databasePath: bundle.databasePath, now: new Date('2026-12-02T07:00:00Z') });

    expect(result.kept[0]).toBe(`${bundle.databasePath}.before-restore-20261202T070000Z`);
    expect(rows(result.kept[0], 'audit_events')).toBe(liveRows);
    expect(rows(bundle.databasePath, 'audit_events')).toBe(rows(backupFile, 'audit_events'));
    expect(existsSync(`${bundle.databasePath}-wal`)).toBe(false);
  });
});

describe('a backup that cannot be made', () => {
  it('when the backup folder cannot be made, then the run is recorded as failed with the reason, and the server keeps answering', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'driftline-nobackup-'));
    writeFileSync(path.join(dir, 'backups'), 'a file where the folder should be');
    const t = await createTestApp({ config: { dataDir: dir } });
    try {
      const run = await t.services.jobRuns.backup('schedule', t.services.backups);
      expect(run).toMatchObject({ job: 'backup', status: 'failed', figures: null });
      expect(run!.error).toMatch(/^The backup folder .*backups cannot be made \(EEXIST/);
      expect(readFileSync(path.join(dir, 'backups'), 'utf8')).toBe('a file where the folder should be');
      const health = await request(t.app).get('/api/health');
      expect(health.body).toMatchObject({ status: 'warn', jobs: { backup: { status: 'failed' } } });
    } finally {
      await t.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('restore refusals', () => {
  let dir: string;
  let good: string;
  let current: string;
  let currentSha: string;

  beforeAll(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'driftline-refuse-'));
    // In-memory database (as the API tests run): its backup goes to the configured data directory.
    const t = await createTestApp({ config: { dataDir: dir } });
    try {
      const run = await t.services.jobRuns.backup('manual', t.services.backups);
      expect(run?.status).toBe('succeeded');
      good = path.join(dir, 'backups', (run!.figures as { file: string }).file);
      expect(rows(good, 'users')).toBeGreaterThan(0);
      // The backup run itself is in the copy, still under way.
      expect(rows(good, 'job_runs')).toBe(1);
    } finally {
      await t.close();
    }
    current = path.join(dir, 'live', 'driftline.sqlite');
    restoreDatabase({ file: good, databasePath: current });
    currentSha = sha(current);
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  const refused = (file: string) => {
    try {
      restoreDatabase({ file, databasePath: current });
    } catch (err) {
      expect(err).toBeInstanceOf(RestoreRefused);
      return (err as Error).message;
    }
    throw new Error('the restore was not refused');
  };
  const untouched = () => {
    expect(sha(current)).toBe(currentSha);
    expect(readdirSync(path.dirname(current)).sort()).toEqual(['driftline.sqlite']);
  };

  it('when the file is not SQLite, then the restore says so and leaves the current database untouched', () => {
    const text = path.join(dir, 'notes.sqlite');
    writeFileSync(text, 'these are not the pages you are looking for\n'.repeat(20));
    expect(refused(text)).toBe(`${text} is not a SQLite database (it does not begin with the SQLite file header), so it cannot be a Driftline backup.`);
    untouched();
  });

  it('when the backup is truncated, then the restore says so and leaves the current database untouched', () => {
    const bytes = readFileSync(good);
    const cut = path.join(dir, 'cut.sqlite');
    writeFileSync(cut, bytes.subarray(0, Math.floor(bytes.length / 2)));
    expect(refused(cut)).toBe(`${cut} is truncated: its header describes ${bytes.length} bytes but the file holds ${Math.floor(bytes.length / 2)}.`);
    untouched();
  });

  it('when pages inside the backup are damaged, then the integrity check refuses it and the current database is untouched', () => {
    const bytes = Buffer.from(readFileSync(good));
    // Overwrite every page after the schema page with noise: the length and header still look right.
    for (let k = 4096; k < bytes.length; k++) bytes[k] = (k * 131) & 0xff;
    const damaged = path.join(dir, 'damaged.sqlite');
    writeFileSync(damaged, bytes);
    expect(refused(damaged)).toMatch(new RegExp(`^${damaged.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} is damaged`));
    untouched();
  });

  it('when the file is missing, another SQLite database, or from a newer version, then each refusal names the problem', () => {
    expect(refused(path.join(dir, 'nope.sqlite'))).toBe(`There is no file at ${path.join(dir, 'nope.sqlite')}.`);
    const other = path.join(dir, 'other.sqlite');
    const db = new Database(other);
    db.exec('CREATE TABLE things (id INTEGER PRIMARY KEY)');
    db.close();
    expect(refused(other)).toBe(`${other} is a SQLite database but not a Driftline one: it has no migrations table.`);
    const newer = path.join(dir, 'newer.sqlite');
    writeFileSync(newer, readFileSync(good));
    const n = new Database(newer);
    n.prepare('INSERT INTO migrations (timestamp, name) VALUES (?, ?)').run(9999999999999, 'FromTheFuture9999999999999');
    n.close();
    expect(refused(newer)).toMatch(/was made by a newer Driftline: it ran migrations this version does not know \(FromTheFuture9999999999999\)/);
    untouched();
  });

  it('when the command is run with a bad file or no file, then it exits non-zero with the reason and "Nothing was changed"', async () => {
    const errors: string[] = [];
    const write = process.stderr.write.bind(process.stderr);
    process.stderr.write = ((chunk: string) => {
      errors.push(String(chunk));
      return true;
    }) as typeof process.stderr.write;
    try {
      const env = { DRIFTLINE_DATA_DIR: path.dirname(current), DRIFTLINE_SESSION_SECRET: 'x'.repeat(32), INIT_CWD: dir };
      expect(await runRestore(['notes.sqlite'], env)).toBe(1);
      expect(await runRestore([], env)).toBe(2);
    } finally {
      process.stderr.write = write;
    }
    expect(errors[0]).toBe(`restore: ${path.join(dir, 'notes.sqlite')} is not a SQLite database (it does not begin with the SQLite file header), so it cannot be a Driftline backup.\nNothing was changed.\n`);
    expect(errors[1]).toMatch(/^restore: name exactly one backup file/);
    untouched();
  });
});
