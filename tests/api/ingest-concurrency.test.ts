import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCounters } from '../../shared/scan/accumulate.js';
import { Robot } from '../../server/entities/index.js';
import { EvidenceStore } from '../../server/services/evidence-store.js';
import { roomMap, ROOM, scanLine } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// The store sums a batch with the stored chunks before its transaction and checks inside it that
// nothing changed meanwhile: batches of one robot and day posted at once must still add up exactly.
describe('robot batches posted at the same moment', () => {
  let t: TestApp;
  let site: string;
  let mapVersionId: string;
  let secret: string;
  let tomas: string;

  beforeAll(async () => {
    t = await createTestApp();
    const ids = await demoIds(t.dataSource);
    site = ids.ambergateSite;
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    await t.dataSource.getRepository(Robot).update(ids.ambergateRobot, { mounts: [{ name: 'front', x: 0, y: 0, yaw: 0 }] });
    secret = (await t.services.robots.createToken(ids.admin, site, ids.ambergateRobot, 'test')).secret;
    const { pgm, yaml } = roomMap();
    const upload = await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas).field('kind', 'floor').field('label', 'test room').attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml');
    mapVersionId = upload.body.mapVersion.id;
    await request(t.app).post(`/api/sites/${site}/map-versions/${mapVersionId}/activate`).set('Cookie', tomas);
  });
  afterAll(() => t.close());

  const post = (body: string, key: string) => request(t.app).post('/api/ingest/scans').set('Authorization', `Bearer ${secret}`).set('Content-Type', 'application/x-ndjson').set('Idempotency-Key', key).send(body);

  it('when eight batches of one robot and day arrive at once, then every pass and hit is counted once', async () => {
    // Batch k: k + 1 single-beam scans a second apart along row 20, 1.0 m from (0.525, 1.025):
    // 20 passes (cells 10…29) and a hit in cell (30, 20) each (hand-computed as in maps-ingest).
    const batches = Array.from({ length: 8 }, (_, k) =>
      Array.from({ length: k + 1 }, (_, q) => scanLine({ t: `2026-11-03T09:${String(k).padStart(2, '0')}:${String(q).padStart(2, '0')}.000Z` })).join('\n'),
    );
    const answers = await Promise.all(batches.map((body, k) => post(body, `same-moment-${k}`)));
    expect(answers.map((a) => a.status)).toEqual(batches.map(() => 201));
    const scans = batches.reduce((a, _, k) => a + k + 1, 0);
    const counters = createCounters({ width: ROOM.width, height: ROOM.height, resolution: ROOM.resolution, origin: { x: 0, y: 0, yaw: 0 } });
    await new EvidenceStore(t.dataSource).loadInto(mapVersionId, ['2026-11-03'], ROOM.width, ROOM.height, counters);
    const at = (i: number, j: number) => j * ROOM.width + i;
    expect(counters.hits[at(30, 20)]).toBe(scans);
    for (let i = 10; i < 30; i++) expect(counters.passes[at(i, 20)]).toBe(scans);
    expect(counters.hits.reduce((a, b) => a + b, 0)).toBe(scans);
    expect(counters.passes.reduce((a, b) => a + b, 0)).toBe(20 * scans);
    const [stat] = await t.dataSource.query("SELECT scans, returns FROM daily_stats WHERE day = '2026-11-03'");
    expect(stat).toEqual({ scans, returns: scans });
  });

  it('when paths were read and the robot then drives on, then the next paths answer shows the new poses (the remembered one is not served)', async () => {
    const path = () => request(t.app).get(`/api/sites/${site}/paths?hours=1`).set('Cookie', tomas);
    const before = await path();
    expect(before.status).toBe(200);
    // Poses a minute apart on the same day, after the earlier batches: a drive along row 20, then on up the room.
    const drive = [0.3, 0.6, 0.9, 1.2].map((y, k) => JSON.stringify({ t: `2026-11-03T10:0${k}:00.000Z`, robot: 'AMR-01', pose: [1.0, y, 0] }));
    expect((await post(drive.join('\n'), 'drive-on')).status).toBe(201);
    const after = await path();
    expect(after.body.paths.to).toBe('2026-11-03T10:03:00.000Z');
    expect(after.body.paths.to).not.toBe(before.body.paths.to);
    const points = after.body.paths.robots.flatMap((r: { tracks: number[][][] }) => r.tracks.flat());
    expect(points).toContainEqual([1, 1.2]);
  });
});
