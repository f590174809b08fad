import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PoseTrail, Robot } from '../../server/entities/index.js';
import { roomMap, scanLine } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// Scans of AMR-01 in the 2 m test room, one a second: 08:00–08:03 creeping east, nothing for five
// minutes, then 08:08–08:10 creeping north; one early scan at 05:00.
function drive() {
  const lines: string[] = [];
  const at = (h: number, m: number, s: number) => new Date(Date.UTC(2026, 10, 3, h, m, s)).toISOString();
  lines.push(scanLine({ t: at(5, 0, 0), pose: [1, 1, 0] }));
  for (let s = 0; s <= 180; s++) lines.push(scanLine({ t: at(8, 0, s), pose: [0.2 + (1.6 * s) / 180, 0.5, 0] }));
  for (let s = 0; s <= 120; s++) lines.push(scanLine({ t: at(8, 8, s), pose: [1.5, 0.2 + (1.6 * s) / 120, 0] }));
  return Buffer.from(lines.join('\n'));
}

describe('robot paths', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let owen: string;
  let priya: string;
  const pathsOf = (site: string, query = '') => `/api/sites/${site}/paths${query}`;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    owen = await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
    priya = await signIn(t.app, 'priya.manager@corvane.example', 'demo-manager-2026');
    const { pgm, yaml } = roomMap();
    const map = await t.services.mapVersions.upload(ids.admin, ids.ambergateSite, { kind: 'floor', label: 'paths room', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
    await t.services.mapVersions.activate(ids.admin, ids.ambergateSite, map.id);
    const robot = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    await t.services.ingest.ingestRobotBatch(robot, drive(), 'paths-drive');
  });
  afterAll(() => t.close());

  it('when a batch is counted, then its poses are kept thinned: one a heartbeat (30 s) while creeping under 1 m', async () => {
    const trails = await t.dataSource.getRepository(PoseTrail).find();
    // Every scan falls on 3 Nov in Europe/London: one robot, one day, one trail row for the batch.
    expect(trails).toHaveLength(1);
    // 05:00, then 08:00 … 08:03 every 30 s (7) — 1.6 m in 180 s moves 0.27 m per heartbeat — then 08:08 … 08:10 (5).
    expect(trails[0].count).toBe(1 + 7 + 5);
  });

  it('when a viewer asks for the last hour, then the window ends at the newest pose and the gap splits two tracks', async () => {
    const res = await request(t.app).get(pathsOf(ids.ambergateSite, '?hours=1')).set('Cookie', owen);
    expect(res.status).toBe(200);
    const { paths } = res.body;
    expect(paths.to).toBe('2026-11-03T08:10:00.000Z');
    expect(paths.from).toBe('2026-11-03T07:10:00.000Z');
    expect(paths.robots).toHaveLength(1);
    expect(paths.robots[0].name).toBe('AMR-01');
    const [east, north] = paths.robots[0].tracks;
    expect(paths.robots[0].tracks).toHaveLength(2);
    expect(east[0]).toEqual([0.2, 0.5]);
    expect(east[east.length - 1]).toEqual([1.8, 0.5]);
    expect(north[0]).toEqual([1.5, 0.2]);
    expect(north[north.length - 1]).toEqual([1.5, 1.8]);
  });

  it('when the window reaches back to 05:00, then the lone early pose still draws nothing (a track needs two poses)', async () => {
    const res = await request(t.app).get(pathsOf(ids.ambergateSite, '?hours=4')).set('Cookie', owen);
    expect(res.body.paths.robots[0].tracks).toHaveLength(2);
  });

  it('when hours is not a whole number from 1 to 168, then 400 says so', async () => {
    for (const q of ['?hours=0', '?hours=169', '?hours=2.5', '?hours=a', '?days=2']) {
      const res = await request(t.app).get(pathsOf(ids.ambergateSite, q)).set('Cookie', owen);
      expect(res.status, q).toBe(400);
      expect(res.body.error.message).toMatch(/hours|days/);
    }
  });

  it('when a site has no active map, then paths is null; another organization’s site is 404', async () => {
    const none = await request(t.app).get(pathsOf(ids.corvaneSite)).set('Cookie', priya);
    expect(none.status).toBe(200);
    expect(none.body.paths).toBeNull();
    const other = await request(t.app).get(pathsOf(ids.corvaneSite)).set('Cookie', owen);
    expect(other.status).toBe(404);
  });
});

describe('pose reports', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    const { pgm, yaml } = roomMap();
    const map = await t.services.mapVersions.upload(ids.admin, ids.ambergateSite, { kind: 'floor', label: 'pose room', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
    await t.services.mapVersions.activate(ids.admin, ids.ambergateSite, map.id);
  });
  afterAll(() => t.close());

  it('when a batch holds only pose reports, then it is counted for the paths with no evidence, and a bad report is refused with its line', async () => {
    const robot = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    const pose = (s: number, x: number) => JSON.stringify({ t: new Date(Date.UTC(2026, 10, 3, 9, 0, s)).toISOString(), robot: 'AMR-01', pose: [x, 1, 0] });
    const body = [pose(0, 0.2), pose(2, 1.3), pose(4, 1.8), JSON.stringify({ t: '2026-11-03T09:00:06Z', robot: 'AMR-01', pose: [1, 'a', 0] })].join('\n');
    const { batch } = await t.services.ingest.ingestRobotBatch(robot, Buffer.from(body), 'poses-only');
    expect(batch).toMatchObject({ scans: 0, poses: 3, beams: 0, rejectedCount: 1 });
    expect(batch.rejectedLines[0]).toMatchObject({ line: 4, reason: expect.stringMatching(/pose/) });
    const paths = await t.services.paths.recent(ids.admin, ids.ambergateSite, 24);
    // 1.3 → 1.8 m is under the 1 m step and 2 s under the 30 s heartbeat, so the third pose is thinned away.
    expect(paths!.robots[0].tracks).toEqual([[[0.2, 1], [1.3, 1]]]);
  });
});
