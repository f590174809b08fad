import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Writable } from 'node:stream';
import pino from 'pino';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { createApp } from '../../server/app.js';
import { testConfig } from '../../server/config.js';
import { openDatabase } from '../../server/data-source.js';
import { JobRun } from '../../server/entities/index.js';
import { newId } from '../../server/services/ids.js';
import { SystemStatusService } from '../../server/services/system-status.service.js';
import { seedDemoAccounts } from '../../server/services/demo-seed.service.js';
import { createTestApp, demoAccount, demoIds, signIn, type TestApp } from './helpers/test-app.js';

const failedRun = (job: JobRun['job'], error: string, startedAt: Date, siteId: string | null = null) => ({
  id: newId(),
  job,
  siteId,
  trigger: 'schedule' as const,
  startedAt,
  finishedAt: new Date(startedAt.getTime() + 1000),
  status: 'failed' as const,
  error,
  figures: null,
});

/** Within a describe: a test app whose data directory is a fresh temporary folder, with an admin's session; closed and removed after the suite. */
function appWithDataDir(prefix: string) {
  const ctx = {} as { t: TestApp; dir: string; admin: string };
  beforeAll(async () => {
    ctx.dir = mkdtempSync(path.join(os.tmpdir(), prefix));
    ctx.t = await createTestApp({ config: { dataDir: ctx.dir } });
    ctx.admin = await signIn(ctx.t.app, demoAccount('admin').email, demoAccount('admin').password);
  });
  afterAll(async () => {
    if (ctx.t.dataSource.isInitialized) await ctx.t.close();
    rmSync(ctx.dir, { recursive: true, force: true });
  });
  return ctx;
}

describe('health endpoint', () => {
  const ctx = appWithDataDir('driftline-health-');
  let t: TestApp;
  let dir: string;
  let admin: string;
  let manager: string;

  beforeAll(async () => {
    ({ t, dir, admin } = ctx);
    manager = await signIn(t.app, demoAccount('site_manager').email, demoAccount('site_manager').password);
  });

  it('when nothing has run yet, then health is ok with the database, every job kind as never run, the disk and the demo progress', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'ok', database: 'ok', warnings: [], demo: { state: expect.any(String) }, version: expect.any(String) });
    expect(Object.keys(res.body.jobs)).toEqual(['detection', 'retention', 'report', 'backup']);
    expect(res.body.jobs.backup).toEqual({ status: 'never', startedAt: null, finishedAt: null });
    expect(res.body.jobs.detection).toMatchObject({ status: 'never', failedSites: 0 });
    // Without a session: the disk's state, not its bytes.
    expect(res.body.disk).toEqual({ status: 'ok' });
  });

  it('when an admin asks, then the disk answer has the free and total bytes of the data directory', async () => {
    const res = await request(t.app).get('/api/health').set('Cookie', admin);
    expect(res.body.disk.status).toBe('ok');
    expect(res.body.disk.freeBytes).toBeGreaterThan(0);
    expect(res.body.disk.totalBytes).toBeGreaterThanOrEqual(res.body.disk.freeBytes);
  });

  it('when a backup run succeeds, then its kind shows succeeded with its finish time', async () => {
    const run = await t.services.jobRuns.backup('manual', t.services.backups);
    const res = await request(t.app).get('/api/health');
    expect(res.body.jobs.backup).toEqual({ status: 'succeeded', startedAt: run!.startedAt.toISOString(), finishedAt: run!.finishedAt!.toISOString() });
    expect(res.body.status).toBe('ok');
  });

  it('when the last run of a job kind failed, then health warns; the error text goes to admins only', async () => {
    const at = new Date(Date.now() + 60_000);
    await t.dataSource.getRepository(JobRun).insert(failedRun('backup', 'The backup copy failed its integrity check: page 7 is never used.', at));
    const anonymous = await request(t.app).get('/api/health');
    expect(anonymous.status).toBe(200);
    expect(anonymous.body.status).toBe('warn');
    expect(anonymous.body.warnings).toEqual(['The last backup run failed.']);
    expect(anonymous.body.jobs.backup).toEqual({ status: 'failed', startedAt: at.toISOString(), finishedAt: new Date(at.getTime() + 1000).toISOString() });
    expect(anonymous.text).not.toContain('integrity');
    const asManager = await request(t.app).get('/api/health').set('Cookie', manager);
    expect(asManager.text).not.toContain('integrity');
    const asAdmin = await request(t.app).get('/api/health').set('Cookie', admin);
    expect(asAdmin.body.jobs.backup.error).toBe('The backup copy failed its integrity check: page 7 is never used.');

    // The next run succeeds: the warning goes away.
    await t.dataSource.getRepository(JobRun).insert({ ...failedRun('backup', '', new Date(at.getTime() + 60_000)), status: 'succeeded', error: null });
    expect((await request(t.app).get('/api/health')).body.status).toBe('ok');
  });

  it('when the newest successful backup is more than 2 days old, then health warns until a new one is made', async () => {
    const later = new Date(Date.now() + 3 * 86_400_000);
    const status = new SystemStatusService(t.dataSource, dir);
    expect((await status.check(false, later)).warnings).toContain('The newest successful backup is more than 2 days old.');
    expect((await status.check(false)).warnings).not.toContain('The newest successful backup is more than 2 days old.');
  });

  it('when one site’s last detection failed while others succeeded later, then health still warns about that site', async () => {
    const ids = await demoIds(t.dataSource);
    const at = new Date(Date.now() + 10 * 60_000);
    await t.dataSource.getRepository(JobRun).insert(failedRun('detection', 'The stored grid of map v2 cannot be read.', at, ids.ambergateSite));
    await t.dataSource.getRepository(JobRun).insert({ ...failedRun('detection', '', new Date(at.getTime() + 5000), ids.corvaneSite), status: 'succeeded', error: null });
    const res = await request(t.app).get('/api/health').set('Cookie', admin);
    expect(res.body.status).toBe('warn');
    expect(res.body.jobs.detection).toMatchObject({ status: 'failed', failedSites: 1, error: 'The stored grid of map v2 cannot be read.' });
    expect(res.body.warnings).toEqual(['The last change detection run failed.']);
  });

  it('when the disk of the data directory has less free space than the warning level, then the status is warn', async () => {
    // Any real disk has less than a petabyte free.
    const status = await new SystemStatusService(t.dataSource, dir, 1024 ** 5).check(false);
    expect(status.disk).toEqual({ status: 'low' });
    expect(status.warnings).toContain('Less than 1048576 GiB is free on the data directory’s disk.');
    expect(status.status).toBe('warn');
    expect((await new SystemStatusService(t.dataSource, path.join(dir, 'no-such-folder')).check(false)).disk).toEqual({ status: 'unknown' });
  });

  it('when the database is closed, then health answers 503 degraded, and still reports the demo progress', async () => {
    await t.dataSource.destroy();
    const res = await request(t.app).get('/api/health');
    expect(res.status).toBe(503);
    expect(res.body).toMatchObject({ status: 'degraded', database: 'unreachable', jobs: null, warnings: ['The database cannot be reached.'], demo: { state: expect.any(String) } });
  });
});

describe('request ids', () => {
  it('when a request carries X-Request-Id, then the answer echoes it; without one, the server makes one', async () => {
    const t = await createTestApp();
    try {
      const given = await request(t.app).get('/api/health').set('X-Request-Id', 'support-ticket-4471');
      expect(given.headers['x-request-id']).toBe('support-ticket-4471');
      const made = await request(t.app).get('/api/health');
      expect(made.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
      const notFound = await request(t.app).get('/api/no-such-thing').set('X-Request-Id', 'support-ticket-4472');
      expect(notFound.status).toBe(404);
      expect(notFound.headers['x-request-id']).toBe('support-ticket-4472');
    } finally {
      await t.close();
    }
  });

  it('when a request fails on the server, then the error body and the error log line carry the same request id', async () => {
    const lines: Array<Record<string, unknown>> = [];
    const sink = new Writable({
      write(chunk, _enc, done) {
        for (const line of String(chunk).split('\n').filter(Boolean)) lines.push(JSON.parse(line));
        done();
      },
    });
    const dataSource = await openDatabase({ database: ':memory:' });
    const log = pino({ level: 'info' }, sink);
    await seedDemoAccounts(dataSource, pino({ level: 'silent' }));
    const { app } = createApp({ config: testConfig(), dataSource, log });
    const admin = await signIn(app, demoAccount('admin').email, demoAccount('admin').password);
    await dataSource.query("CREATE TRIGGER refuse_orgs BEFORE INSERT ON organizations BEGIN SELECT RAISE(ABORT, 'refused for the test'); END");
    try {
      const res = await request(app).post('/api/organizations').set('Cookie', admin).set('X-Request-Id', 'support-ticket-4473').send({ name: 'Refused Holdings', timezone: 'Europe/London' });
      expect(res.status).toBe(500);
      expect(res.body.error.requestId).toBe('support-ticket-4473');
      await new Promise((r) => setImmediate(r));
      const logged = lines.find((l) => l.level === 50 && (l.req as { id?: string } | undefined)?.id === 'support-ticket-4473');
      expect(logged, JSON.stringify(lines.map((l) => l.msg))).toBeDefined();
      expect(JSON.stringify(logged!.err)).toContain('refused for the test');
      // A 4xx keeps its body as it was; its log line and header still carry the id.
      const bad = await request(app).post('/api/organizations').set('Cookie', admin).set('X-Request-Id', 'support-ticket-4474').send({ name: '' });
      expect(bad.status).toBe(400);
      expect(bad.body.error.requestId).toBeUndefined();
      expect(lines.some((l) => l.level === 40 && (l.req as { id?: string } | undefined)?.id === 'support-ticket-4474')).toBe(true);
    } finally {
      await dataSource.destroy();
    }
  });
});

describe('job runs of every kind', () => {
  const ctx = appWithDataDir('driftline-runs-');
  let t: TestApp;
  let admin: string;

  beforeAll(() => {
    ({ t, admin } = ctx);
  });

  it('when an admin runs the backup now, then it starts in the background and its run lists with the file it made', async () => {
    const res = await request(t.app).post('/api/job-runs').set('Cookie', admin).send({ job: 'backup' });
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ started: { job: 'backup', siteId: null } });
    let runs: Array<{ job: string; status: string; figures: { file?: string } | null }> = [];
    for (let k = 0; k < 50 && !(runs[0]?.status === 'succeeded'); k++) {
      await new Promise((r) => setTimeout(r, 100));
      runs = (await request(t.app).get('/api/job-runs?job=backup').set('Cookie', admin)).body.runs;
    }
    expect(runs[0]).toMatchObject({ job: 'backup', trigger: 'manual', status: 'succeeded', figures: { file: expect.stringMatching(/^driftline-\d{8}T\d{6}Z\.sqlite$/), integrity: 'ok', keep: 7 } });
    expect(t.services.backups.list().map((b) => b.name)).toEqual([runs[0].figures!.file]);
  });

  it('when an admin runs the monthly reports now and none is due, then the answer says so and no run is recorded', async () => {
    // Mid-month: no organization's report is due (they go out on the 1st from 07:00 in its zone).
    vi.useFakeTimers({ now: new Date('2026-11-15T12:00:00Z'), toFake: ['Date'] });
    try {
      const res = await request(t.app).post('/api/job-runs').set('Cookie', admin).send({ job: 'report' });
      expect(res.status).toBe(200);
      expect(res.body.started).toBeNull();
      expect(res.body.message).toMatch(/^No monthly report is due now/);
    } finally {
      vi.useRealTimers();
    }
    expect((await request(t.app).get('/api/job-runs?job=report').set('Cookie', admin)).body.runs).toEqual([]);
  });

  it('when a report is due, then "run now" sends it as one recorded report run', async () => {
    // The 1st of the month at 08:00 in every demo customer's zone is after 07:00.
    const now = new Date('2026-12-01T08:00:00Z');
    const reports = { due: async () => [{ month: '2026-11' }], sendDue: async () => [{ organization: 'Ambergate Provisions', month: '2026-11', queued: 2 }] };
    const run = await t.services.jobRuns.report('manual', reports as never, now);
    expect(run).toMatchObject({ job: 'report', status: 'succeeded', figures: { reports: [{ organization: 'Ambergate Provisions', month: '2026-11', queued: 2 }] } });
    const list = await request(t.app).get('/api/job-runs?job=report').set('Cookie', admin);
    expect(list.body.runs).toHaveLength(1);
  });

  it('when run now names a site for a job that is not per site, or an unknown job, then 400 says what is wrong', async () => {
    const ids = await demoIds(t.dataSource);
    const res = await request(t.app).post('/api/job-runs').set('Cookie', admin).send({ job: 'backup', siteId: ids.ambergateSite });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('The request body is not valid: siteId: only change detection runs for one site; leave it out for the other jobs.');
    expect((await request(t.app).post('/api/job-runs').set('Cookie', admin).send({ job: 'everything' })).status).toBe(400);
  });
});
