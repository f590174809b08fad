import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MapVersion, Robot } from '../../server/entities/index.js';
import { roomMap, scanLine } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

describe('job runs', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let iris: string;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
  });
  afterAll(() => t.close());

  it('when a site has no active map, then its detection run succeeds and says why it did nothing', async () => {
    const [run] = await t.services.jobRuns.detect('manual', ids.corvaneSite);
    expect(run).toMatchObject({ status: 'succeeded', figures: { skipped: 'The site has no active floor map.' } });
  });

  it('when detection fails on one site, then the run is recorded as failed with its error, the other sites still run, and the server answers', async () => {
    const { pgm, yaml } = roomMap();
    const map = await t.services.mapVersions.upload(ids.admin, ids.ambergateSite, { kind: 'floor', label: '', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
    await t.services.mapVersions.activate(ids.admin, ids.ambergateSite, map.id);
    const robot = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    await t.dataSource.getRepository(Robot).update(robot.id, { mounts: [] });
    await t.services.ingest.ingestRobotBatch({ ...robot, mounts: [] }, Buffer.from(scanLine({ t: new Date(Date.now() - 86_400_000).toISOString() })), 'k1');
    // A damaged stored grid (and an empty cache, as after a restart) makes this site's run throw.
    await t.dataSource.getRepository(MapVersion).update(map.id, { grid: Buffer.from([1, 2, 3]) });
    (t.services.mapVersions as unknown as { grids: Map<string, unknown>; fields: Map<string, unknown> }).grids.clear();
    (t.services.mapVersions as unknown as { fields: Map<string, unknown> }).fields.clear();
    const all = await t.services.jobRuns.detect('manual');
    const failed = all.find((r) => r.siteId === ids.ambergateSite)!;
    expect(failed.status).toBe('failed');
    expect(failed.error).toBeTruthy();
    expect(all.filter((r) => r.siteId !== ids.ambergateSite).every((r) => r.status === 'succeeded')).toBe(true);
    const list = await request(t.app).get('/api/job-runs?job=detection').set('Cookie', iris);
    expect(list.status).toBe(200);
    expect(list.body.runs.find((r: { id: string }) => r.id === failed.id)).toMatchObject({ status: 'failed', siteName: 'Fennick Cross DC' });
  });

  it('when an admin asks to run retention now, then it starts in the background and shows up in the list', async () => {
    const res = await request(t.app).post('/api/job-runs').set('Cookie', iris).send({ job: 'retention' });
    expect(res.status).toBe(202);
    await new Promise((r) => setTimeout(r, 200));
    const list = await request(t.app).get('/api/job-runs?job=retention').set('Cookie', iris);
    expect(list.body.runs[0]).toMatchObject({ job: 'retention', trigger: 'manual', status: 'succeeded' });
    expect((await request(t.app).post('/api/job-runs').set('Cookie', iris).send({ job: 'everything' })).status).toBe(400);
  });
});
