import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { EvidenceChunk, JobRun, Site, Zone } from '../../server/entities/index.js';
import { simulatedSite } from './helpers/simulated-site.js';
import { createTestApp, signIn, type TestApp } from './helpers/test-app.js';

// A small simulated site of our own (the warehouse simulator, fixed seed) whose AMR-02 front
// scanner is turned 1.4° on purpose, counted through the ingest service and then analysed by
// the nightly job: the robot must be flagged with its mount error, the building's changes
// tracked as zones that do not reappear as new ones on the next run.
const DAYS = 16;
const NOW = new Date('2026-11-20T03:00:00Z');
const TURN_DEG = 1.4;

describe('map health, scanner check and zone tracking on a simulated site', () => {
  let t: TestApp;
  let site: Site;
  let nadia: string;
  let tomas: string;
  let owen: string;

  beforeAll(async () => {
    // The routes read the clock; only Date is faked, so timers and sockets run as usual.
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    t = await createTestApp();
    site = await simulatedSite(t, {
      seed: 4242, days: DAYS, startDate: '2026-11-04', siteTimezone: 'Europe/London', robots: 4, beamStep: 4, scansPerRobotPerDay: 60,
      site: { width: 40, depth: 30 }, changes: { missingFromDay: 4, fenceFromDay: 6, unmappedFromDay: null },
      mountErrors: [{ robot: 'AMR-02', scanner: 'front', dyaw: (TURN_DEG * Math.PI) / 180 }],
    }, NOW);
    nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    owen = await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
  }, 240_000);
  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
  });

  it('when the nightly job runs, then the turned scanner is flagged with its mount error and left out, and zones are found', async () => {
    const [run] = await t.services.jobRuns.detect('manual', site.id, NOW);
    expect(run.status).toBe('succeeded');
    expect(run.figures).toMatchObject({ flagged: ['AMR-02/front'], excludedRobots: 1, days: 14 });
    const robots = (await request(t.app).get(`/api/sites/${site.id}/robots`).set('Cookie', nadia)).body.robots as Array<{ name: string; flags: Array<{ status: string; summary: string; mount: { dyawDeg: number } }> }>;
    const flagged = robots.filter((r) => r.flags.some((f) => f.status === 'active'));
    expect(flagged.map((r) => r.name)).toEqual(['AMR-02']);
    // The simulator's truth: the front scanner is turned +1.4° (anticlockwise) against its configured mount.
    expect(flagged[0].flags[0].mount.dyawDeg).toBeGreaterThan(TURN_DEG - 0.3);
    expect(flagged[0].flags[0].mount.dyawDeg).toBeLessThan(TURN_DEG + 0.3);
    expect(flagged[0].flags[0].summary).toMatch(/mount appears turned 1\.\d° anticlockwise/);
    const zones = (await request(t.app).get(`/api/sites/${site.id}/zones`).set('Cookie', owen)).body;
    expect(zones.total).toBeGreaterThan(0);
  });

  it('when the site is read, then the health score, band, sentence and series come from the counted scans', async () => {
    const res = await request(t.app).get(`/api/sites/${site.id}`).set('Cookie', owen);
    const h = res.body.site.health;
    expect(h.score).toBeGreaterThan(50);
    expect(h.score).toBeLessThanOrEqual(100);
    expect(['good', 'watch', 'remap_advised']).toContain(h.band);
    expect(h.sentence).toBe(`The map explains ${h.score.toFixed(1)} % of laser returns over the last 7 days.`);
    expect(h.series).toHaveLength(30);
    expect(h.series.at(-1)).toMatchObject({ day: '2026-11-19' });
    expect(h.flaggedRobots).toBe(1);
    const agreement = (await request(t.app).get(`/api/sites/${site.id}/agreement`).set('Cookie', owen)).body.agreement;
    expect(agreement.blockM).toBeCloseTo(2, 6);
    expect(agreement.returns.length).toBe(agreement.cols * agreement.rows);
    expect(agreement.agreement.some((a: number | null) => a !== null && a > 0.9)).toBe(true);
  });

  it('when the job runs again on the same evidence, then no zone is new: the known ones are updated', async () => {
    const before = await t.dataSource.getRepository(Zone).countBy({ siteId: site.id });
    const [run] = await t.services.jobRuns.detect('manual', site.id, NOW);
    expect(run.figures).toMatchObject({ zonesNew: 0, flagged: [] });
    expect(await t.dataSource.getRepository(Zone).countBy({ siteId: site.id })).toBe(before);
  });

  it('when a site manager acknowledges and a mapper dismisses, then the statuses and history change; the viewer may do neither', async () => {
    const [first, second] = (await request(t.app).get(`/api/sites/${site.id}/zones?status=open`).set('Cookie', nadia)).body.zones;
    expect((await request(t.app).post(`/api/sites/${site.id}/zones/${first.id}/acknowledge`).set('Cookie', owen).send({ note: 'x' })).status).toBe(403);
    const ack = await request(t.app).post(`/api/sites/${site.id}/zones/${first.id}/acknowledge`).set('Cookie', nadia).send({ note: 'seen on the walk-round' });
    expect(ack.body.zone.status).toBe('acknowledged');
    expect(ack.body.zone.history.at(-1).summary).toMatch(/acknowledged Z-\d+: seen on the walk-round/);
    expect((await request(t.app).post(`/api/sites/${site.id}/zones/${second.id}/dismiss`).set('Cookie', tomas).send({ reason: '' })).status).toBe(400);
    const dismissed = await request(t.app).post(`/api/sites/${site.id}/zones/${second.id}/dismiss`).set('Cookie', tomas).send({ reason: 'volatile area' });
    expect(dismissed.body.zone).toMatchObject({ status: 'dismissed', statusNote: 'volatile area' });
    // A dismissed zone does not come back as a new one on the next run.
    const [run] = await t.services.jobRuns.detect('manual', site.id, NOW);
    expect(run.figures).toMatchObject({ zonesNew: 0 });
    expect((await t.dataSource.getRepository(Zone).findOneByOrFail({ id: second.id })).status).toBe('dismissed');
  });

  it('when the flag is cleared with a note, then the robot counts again from then on, is not re-flagged on its old days, and its old scans stay out', async () => {
    const robots = (await request(t.app).get(`/api/sites/${site.id}/robots`).set('Cookie', nadia)).body.robots as Array<{ id: string; name: string; flags: Array<{ id: string; status: string }> }>;
    const amr = robots.find((r) => r.name === 'AMR-02')!;
    const noNote = await request(t.app).post(`/api/sites/${site.id}/robots/${amr.id}/flags/${amr.flags[0].id}/clear`).set('Cookie', nadia).send({ note: '' });
    expect(noNote.status).toBe(400);
    const cleared = await request(t.app).post(`/api/sites/${site.id}/robots/${amr.id}/flags/${amr.flags[0].id}/clear`).set('Cookie', nadia).send({ note: 'mount re-aligned' });
    expect(cleared.body.flag).toMatchObject({ status: 'cleared', note: 'mount re-aligned' });
    vi.setSystemTime(new Date(NOW.getTime() + 3_600_000));
    const [run] = await t.services.jobRuns.detect('manual', site.id, new Date());
    // Its scans from before the clearing still hold the fault: they stay out, so no ghost zone appears.
    expect(run.figures).toMatchObject({ flagged: [], excludedRobots: 0, zonesNew: 0 });
  });

  it('when retention runs with a short retention, then evidence older than it is deleted and newer kept', async () => {
    await t.dataSource.getRepository(Site).update(site.id, { settings: { retentionDays: 5 } });
    const before = await t.dataSource.getRepository(EvidenceChunk).count();
    const run = await t.services.jobRuns.retention('manual', NOW);
    expect(run!.status).toBe('succeeded');
    const after = await t.dataSource.getRepository(EvidenceChunk).find({ select: { day: true } });
    expect(after.length).toBeLessThan(before);
    expect(after.every((c) => c.day >= '2026-11-15')).toBe(true);
    expect(await t.dataSource.getRepository(JobRun).countBy({ job: 'retention', status: 'succeeded' })).toBe(1);
  });
});

describe('an unchanged building seen by a fleet with one turned scanner', () => {
  let t: TestApp;
  let site: Site;

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    t = await createTestApp();
    site = await simulatedSite(t, {
      seed: 5150, days: DAYS, startDate: '2026-11-04', siteTimezone: 'Europe/London', robots: 4, beamStep: 4, scansPerRobotPerDay: 60,
      site: { width: 40, depth: 30 }, changes: { missingFromDay: null, fenceFromDay: null, palletDays: null, unmappedFromDay: null },
      mountErrors: [{ robot: 'AMR-03', scanner: 'front', dyaw: (-TURN_DEG * Math.PI) / 180 }],
    }, NOW);
  }, 240_000);
  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
  });

  it('when the nightly job runs, then the robot is flagged, the building is not, and the map explains at least 95 % of returns', async () => {
    const [run] = await t.services.jobRuns.detect('manual', site.id, NOW);
    expect(run.figures).toMatchObject({ flagged: ['AMR-03/front'] });
    // The turned scanner's ghosts stay out: no zone at all in a building that did not change.
    expect(await t.dataSource.getRepository(Zone).countBy({ siteId: site.id })).toBe(0);
    const health = await t.services.health.siteHealth(site, NOW);
    // Stated bound for an unchanged building with people and forklift traffic (product choice, see README).
    expect(health.score).toBeGreaterThan(95);
    expect(health.band === 'good' || health.band === 'watch').toBe(true);
    const flag = (await t.services.scannerCheck.flagsOf(site.id))[0];
    expect((flag.mount!.dyaw * 180) / Math.PI).toBeCloseTo(-TURN_DEG, 0);
  });
});
