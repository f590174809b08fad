import { gzipSync } from 'node:zlib';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { Robot } from '../../server/entities/index.js';
import { createRng } from '../../shared/sim/random.js';
import { roomMap } from './helpers/fixtures.js';
import { dockingCounts, dockingLine, uploadStationModel } from './helpers/docking-fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

const DAY = 86_400_000;
// The clock of these tests: 06:00 UTC on 29 Nov 2026; the dockings span 1–28 Nov, 07:00–16:00.
const NOW = new Date('2026-11-29T06:00:00Z');
const START = Date.UTC(2026, 10, 1);

describe('docking stations', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let secret: string;
  let corvaneSecret: string;
  let cookies: Record<'admin' | 'mapper' | 'nadia' | 'owen' | 'priya', string>;
  let bay1: string;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    secret = (await t.services.robots.createToken(ids.admin, ids.ambergateSite, ids.ambergateRobot, 'docking test')).secret;
    corvaneSecret = (await t.services.robots.createToken(ids.admin, ids.corvaneSite, ids.corvaneRobot, 'docking test')).secret;
    cookies = {
      admin: await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026'),
      mapper: await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026'),
      nadia: await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026'),
      owen: await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026'),
      priya: await signIn(t.app, 'priya.manager@corvane.example', 'demo-manager-2026'),
    };
    bay1 = (await t.services.docking.create(ids.admin, ids.ambergateSite, { name: 'Charger bay 1' })).id;
    await t.services.docking.create(ids.admin, ids.ambergateSite, { name: 'Charger bay 2' });
  });
  afterAll(() => t.close());
  afterEach(() => vi.useRealTimers());

  const post = (body: string | Buffer, key?: string, token = secret) => {
    let req = request(t.app).post('/api/ingest/docking').set('Authorization', `Bearer ${token}`).set('Content-Type', 'application/x-ndjson');
    if (key) req = req.set('Idempotency-Key', key);
    return req.send(body);
  };
  const stations = (cookie: string, site = ids.ambergateSite, rest = '') => request(t.app).get(`/api/sites/${site}/stations${rest}`).set('Cookie', cookie);

  it('when a robot posts good and bad lines, then the good ones are counted and each bad one is refused with its reason', async () => {
    // Arrange
    const future = new Date(Date.now() + 3_600_000).toISOString();
    const body = [
      dockingLine({ t: '2026-11-03T08:00:00Z' }),
      dockingLine({ t: '2026-11-03T09:00:00Z', station: 'Charger bay 2', robot: 'AMR-01' }),
      dockingLine({ t: '2026-11-03T10:00:00Z', station: 'Bay 9' }),
      '{"t":"2026-11-03T11:00:00Z","station":"Charger bay 1","dx":1e999,"dy":0,"dyaw":0}',
      dockingLine({ t: '2026-11-03T12:00:00Z', dx: 0.62 }),
      dockingLine({ t: '2026-11-03T13:00:00Z', dyaw: -0.7 }),
      dockingLine({ t: future }),
      '',
    ].join('\n');
    // Act
    const res = await post(body, 'dock-1');
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.status).toBe('counted');
    expect(res.body.batch).toMatchObject({ lines: 7, counted: 2, rejectedCount: 5, idempotencyKey: 'dock-1' });
    const reasons = res.body.batch.rejectedLines.map((r: { line: number; reason: string }) => [r.line, r.reason]);
    expect(reasons[0]).toEqual([3, 'The station "Bay 9" is not registered at this site (registered: Charger bay 1, Charger bay 2).']);
    expect(reasons[1]).toEqual([4, 'The docking\'s "dx" must be a finite number.']);
    expect(reasons[2][1]).toMatch(/"dx" \(0.62\) lies beyond ±0.5 m/);
    expect(reasons[3][1]).toMatch(/"dyaw" \(-0.7\) lies beyond ±0.5 rad/);
    expect(reasons[4][1]).toMatch(/in the future/);
    expect(await dockingCounts(t.dataSource)).toEqual({ batches: 1, results: 2 });
  });

  it('when a robot posts one pretty-printed JSON object, then it is one docking', async () => {
    const res = await post(JSON.stringify(JSON.parse(dockingLine({ t: '2026-11-04T08:00:00Z' })), null, 2));
    expect(res.status).toBe(201);
    expect(res.body.batch).toMatchObject({ lines: 1, counted: 1, rejectedCount: 0 });
  });

  it('when the same batch comes again, by key, by content or gzipped, then it is "already received" and nothing is added; a reused key with other content is refused', async () => {
    const body = [dockingLine({ t: '2026-11-05T08:00:00Z' }), dockingLine({ t: '2026-11-05T09:00:00Z' })].join('\n');
    expect((await post(body, 'dock-2')).status).toBe(201);
    const before = await dockingCounts(t.dataSource);
    for (const res of [await post(body, 'dock-2'), await post(body), await post(gzipSync(body))]) {
      expect(res.status).toBe(200);
      expect(res.body.status).toBe('already_received');
      expect(res.body.batch.counted).toBe(2);
    }
    const reused = await post(dockingLine({ t: '2026-11-05T10:00:00Z' }), 'dock-2');
    expect(reused.status).toBe(409);
    expect(reused.body.error.message).toMatch(/Idempotency-Key was already used/);
    expect(await dockingCounts(t.dataSource)).toEqual(before);
  });

  it('when a new batch repeats dockings already stored, then only the new one counts and the repeats are refused as already received', async () => {
    const before = await dockingCounts(t.dataSource);
    const res = await post([dockingLine({ t: '2026-11-05T08:00:00Z' }), dockingLine({ t: '2026-11-05T11:00:00Z' }), dockingLine({ t: '2026-11-05T11:00:00Z' })].join('\n'));
    expect(res.status).toBe(201);
    expect(res.body.batch).toMatchObject({ counted: 1, rejectedCount: 2 });
    expect(res.body.batch.rejectedLines.map((r: { reason: string }) => r.reason)).toEqual([
      'The docking at Charger bay 1 at 2026-11-05T11:00:00Z repeats line 2; it is counted once.',
      'The docking at Charger bay 1 at 2026-11-05T08:00:00.000Z was already received in an earlier batch; it is counted once.',
    ]);
    expect(await dockingCounts(t.dataSource)).toEqual({ batches: before.batches + 1, results: before.results + 1 });
    // Only repeats, in new content: nothing new, so nothing is stored at all.
    const onlyRepeats = await post(`${dockingLine({ t: '2026-11-05T11:00:00Z' })}\n\n`);
    expect(onlyRepeats.status).toBe(422);
    expect(onlyRepeats.body.error.details.rejectedLines[0].reason).toMatch(/already received in an earlier batch/);
    expect(await dockingCounts(t.dataSource)).toEqual({ batches: before.batches + 1, results: before.results + 1 });
  });

  it('when no line of a batch is good, or the token is missing or of another site, then nothing is stored', async () => {
    const before = await dockingCounts(t.dataSource);
    const bad = await post(['{"t": "broken', dockingLine({ station: 'Bay 9' })].join('\n'));
    expect(bad.status).toBe(422);
    expect(bad.body.error.details.rejectedLines).toHaveLength(2);
    expect((await post('')).status).toBe(422);
    expect((await request(t.app).post('/api/ingest/docking').send(dockingLine({}))).status).toBe(401);
    expect((await post(dockingLine({}), undefined, 'dlr_not-a-real-token')).status).toBe(401);
    // Corvane's robot knows no Ambergate station: its site has none of that name.
    const other = await post(dockingLine({ t: '2026-11-06T08:00:00Z' }), undefined, corvaneSecret);
    expect(other.status).toBe(422);
    expect(other.body.error.details.rejectedLines[0].reason).toBe('The station "Charger bay 1" is not registered at this site (the site has no station yet).');
    expect((await post(dockingLine({ t: '2026-11-06T08:00:00Z', robot: 'AMR-02' }))).status).toBe(422);
    expect(await dockingCounts(t.dataSource)).toEqual(before);
  });

  it('when people of each role manage stations, then site managers add and rename, mappers also attach models, only admins set tolerances', async () => {
    // Site manager of the site's organization: add and rename; attaching a model is the mappers'.
    const created = await request(t.app).post(`/api/sites/${ids.ambergateSite}/stations`).set('Cookie', cookies.nadia).send({ name: 'Tugger dock' });
    expect(created.status).toBe(201);
    const id = created.body.station.id;
    expect(created.body.station).toMatchObject({ name: 'Tugger dock', model: null, createdBy: { name: 'Nadia Okonkwo-Hale' }, verdict: { state: 'insufficient' } });
    expect((await request(t.app).post(`/api/sites/${ids.ambergateSite}/stations`).set('Cookie', cookies.nadia).send({ name: 'Tugger dock' })).status).toBe(409);
    expect((await request(t.app).post(`/api/sites/${ids.ambergateSite}/stations`).set('Cookie', cookies.nadia).send({ name: '  ' })).status).toBe(400);
    expect((await request(t.app).patch(`/api/sites/${ids.ambergateSite}/stations/${id}`).set('Cookie', cookies.nadia).send({ name: 'Charger bay 2' })).status).toBe(409);
    const renamed = await request(t.app).patch(`/api/sites/${ids.ambergateSite}/stations/${id}`).set('Cookie', cookies.nadia).send({ name: 'Tugger dock east' });
    expect(renamed.body.station.name).toBe('Tugger dock east');
    const model = await uploadStationModel(t.services, ids.admin, ids.ambergateSite, 'Tugger dock east');
    expect((await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/model`).set('Cookie', cookies.nadia).send({ mapVersionId: model.id })).status).toBe(403);
    // Mapper: a floor map is refused, another site's version is unknown here, a station model is attached.
    const { pgm, yaml } = roomMap();
    const floor = await t.services.mapVersions.upload(ids.admin, ids.ambergateSite, { kind: 'floor', label: '', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
    const floorAnswer = await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/model`).set('Cookie', cookies.mapper).send({ mapVersionId: floor.id });
    expect(floorAnswer.status).toBe(400);
    expect(floorAnswer.body.error.message).toMatch(/is a floor map/);
    const elsewhere = await uploadStationModel(t.services, ids.admin, ids.corvaneSite, 'Corvane dock');
    expect((await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/model`).set('Cookie', cookies.mapper).send({ mapVersionId: elsewhere.id })).status).toBe(404);
    const attached = await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/model`).set('Cookie', cookies.mapper).send({ mapVersionId: model.id });
    expect(attached.status).toBe(200);
    expect(attached.body.station.model).toMatchObject({ id: model.id, resolution: 0.005, width: 160, height: 120, widthM: 0.8, heightM: 0.6 });
    expect((await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/model`).set('Cookie', cookies.mapper).send({ mapVersionId: model.id })).status).toBe(409);
    // Tolerance: admins only, within the settings' limits; null gives the site setting back.
    expect((await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/tolerance`).set('Cookie', cookies.mapper).send({ toleranceMm: 8, toleranceDeg: null })).status).toBe(403);
    expect((await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/tolerance`).set('Cookie', cookies.admin).send({ toleranceMm: 0, toleranceDeg: null })).status).toBe(400);
    const tol = await request(t.app).put(`/api/sites/${ids.ambergateSite}/stations/${id}/tolerance`).set('Cookie', cookies.admin).send({ toleranceMm: 8, toleranceDeg: null });
    expect(tol.body.station.tolerance).toEqual({ positionMm: 8, yawDeg: 1, positionSource: 'station', yawSource: 'default', stationMm: 8, stationDeg: null });
    // Viewers read only.
    expect((await request(t.app).post(`/api/sites/${ids.ambergateSite}/stations`).set('Cookie', cookies.owen).send({ name: 'Viewer dock' })).status).toBe(403);
    expect((await stations(cookies.owen)).status).toBe(200);
  });

  it('when a customer user asks for another organization’s stations, then 404 and nothing changes', async () => {
    expect((await stations(cookies.priya)).status).toBe(404);
    expect((await stations(cookies.priya, ids.ambergateSite, `/${bay1}`)).status).toBe(404);
    expect((await request(t.app).post(`/api/sites/${ids.ambergateSite}/stations`).set('Cookie', cookies.priya).send({ name: 'Sneaky dock' })).status).toBe(404);
    expect((await request(t.app).patch(`/api/sites/${ids.ambergateSite}/stations/${bay1}`).set('Cookie', cookies.priya).send({ name: 'Sneaky dock' })).status).toBe(404);
    // An Ambergate station id under a Corvane site is unknown there too.
    expect((await stations(cookies.priya, ids.corvaneSite, `/${bay1}`)).status).toBe(404);
    expect((await stations(cookies.nadia, ids.ambergateSite, `/${bay1}`)).body.station.name).toBe('Charger bay 1');
  });

  it('when a station was knocked 20 mm on 22 Nov, then its page shows the step, daily figures and tolerance, and the list counts it drifting', async () => {
    // Arrange: a fresh station with a model; four weeks of 10 dockings a day, 1.5 mm noise per axis,
    // 20 mm further in x from 22 Nov 10:00 (invented data). The site's tolerance is raised to 12 mm.
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    const station = await t.services.docking.create(ids.admin, ids.ambergateSite, { name: 'Charger bay 3' });
    const model = await uploadStationModel(t.services, ids.admin, ids.ambergateSite, 'Charger bay 3');
    await t.services.docking.attachModel(ids.admin, ids.ambergateSite, station.id, model.id);
    expect((await request(t.app).patch(`/api/sites/${ids.ambergateSite}/settings`).set('Cookie', cookies.admin).send({ dockingToleranceMm: 12 })).status).toBe(200);
    const rng = createRng(17);
    const knock = Date.UTC(2026, 10, 22, 10);
    const lines: string[] = [];
    const day3: Array<{ dx: number; dy: number; dyaw: number }> = [];
    for (let d = 0; d < 28; d++) {
      for (let k = 0; k < 10; k++) {
        const tMs = START + d * DAY + (7 + k) * 3_600_000;
        const r = { dx: (tMs < knock ? 0 : 0.02) + rng.gaussian(0.0015), dy: rng.gaussian(0.0015), dyaw: rng.gaussian(0.003) };
        if (d === 2) day3.push(r);
        lines.push(dockingLine({ t: new Date(tMs).toISOString(), station: 'Charger bay 3', ...r }));
      }
    }
    expect((await post(lines.join('\n'))).body.batch.counted).toBe(280);

    // Act
    const res = await stations(cookies.nadia, ids.ambergateSite, `/${station.id}`);
    const list = await stations(cookies.nadia);

    // Assert: the verdict and its figures (Pettitt 1979 for the step).
    expect(res.status).toBe(200);
    const s = res.body.station;
    expect(s.tolerance).toMatchObject({ positionMm: 12, yawDeg: 1, positionSource: 'site', yawSource: 'default' });
    expect(s.verdict).toMatchObject({ state: 'drifting', kind: 'step', channel: 'position', results: 280, days: 28 });
    expect(s.verdict.sentence).toMatch(/^Moved about (19|20|21) mm around 22 Nov \(Pettitt change-point test, p < 0\.001\): the median offset since then is (19|20|21) mm, beyond the 12 mm tolerance\.$/);
    expect(Math.abs(Date.parse(s.drift.position.step.at) - knock)).toBeLessThan(DAY);
    expect(s.drift.position.step.shift).toBeGreaterThan(18.5);
    expect(s.drift.position.step.shift).toBeLessThan(21.5);
    expect(s.drift.heading.state).toBe('steady');
    expect(s.results).toHaveLength(280);
    expect(s.model).toMatchObject({ id: model.id, resolution: 0.005 });
    // Daily figures of 3 Nov (site-local Europe/London is UTC in November), computed here by hand.
    const d3 = s.daily.find((d: { day: string }) => d.day === '2026-11-03');
    const meanDx = day3.reduce((a, r) => a + r.dx, 0) / 10;
    const within = day3.filter((r) => Math.hypot(r.dx, r.dy) <= 0.012 && Math.abs(r.dyaw) <= Math.PI / 180).length / 10;
    expect(d3.count).toBe(10);
    expect(d3.meanDxMm).toBeCloseTo(meanDx * 1000, 1);
    expect(d3.withinShare).toBeCloseTo(within, 12);
    // The last week (22–28 Nov) sits 20 mm off: none of it is within 12 mm.
    expect(s.latest.count).toBe(70);
    expect(s.latest.withinShare).toBeLessThan(0.1);
    expect(list.body.summary.drifting).toBeGreaterThanOrEqual(1);
    expect(list.body.stations.find((x: { id: string }) => x.id === station.id).verdict.state).toBe('drifting');

    // A new model starts the check afresh: earlier dockings are shown but not judged.
    const redone = await uploadStationModel(t.services, ids.admin, ids.ambergateSite, 'Charger bay 3, redone');
    await t.services.docking.attachModel(ids.admin, ids.ambergateSite, station.id, redone.id);
    const after = (await stations(cookies.nadia, ids.ambergateSite, `/${station.id}`)).body.station;
    expect(after.verdict.state).toBe('insufficient');
    expect(after.earlierModelResults).toBe(280);
    expect(after.results.every((r: { currentModel: boolean }) => !r.currentModel)).toBe(true);
  });
});
