import { gzipSync } from 'node:zlib';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCounters } from '../../shared/scan/accumulate.js';
import { MapVersion, Robot, ScanBatch } from '../../server/entities/index.js';
import { EvidenceStore } from '../../server/services/evidence-store.js';
import { roomMap, ROOM, scanLine } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

async function evidenceSnapshot(t: TestApp) {
  return t.dataSource.query('SELECT map_version_id, day, cx, cy, hex(data) AS data FROM evidence_chunks ORDER BY 1, 2, 3, 4');
}

describe('map versions and scan ingest', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let tomas: string;
  let owen: string;
  let site: string;
  let secret: string;
  let mapVersionId: string;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    site = ids.ambergateSite;
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    owen = await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
    // The test room's robot has one scanner at the base origin, so beams start at the pose.
    await t.dataSource.getRepository(Robot).update(ids.ambergateRobot, { mounts: [{ name: 'front', x: 0, y: 0, yaw: 0 }] });
    secret = (await t.services.robots.createToken(ids.admin, site, ids.ambergateRobot, 'test')).secret;
  });
  afterAll(() => t.close());

  const postScans = (body: string | Buffer, key?: string, token = secret) => {
    let req = request(t.app).post('/api/ingest/scans').set('Authorization', `Bearer ${token}`).set('Content-Type', 'application/x-ndjson');
    if (key) req = req.set('Idempotency-Key', key);
    return req.send(body);
  };

  it('when scans arrive before any map is active, then 409 says a map must be activated', async () => {
    const res = await postScans(scanLine({}));
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/no active floor map/);
  });

  it('when a mapper uploads a PGM with its YAML, then a draft version with the right size is stored', async () => {
    const { pgm, yaml } = roomMap();
    const res = await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas).field('kind', 'floor').field('label', 'test room').attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml');
    expect(res.status).toBe(201);
    expect(res.body.mapVersion).toMatchObject({ version: 1, status: 'draft', width: 40, height: 40, resolution: 0.05, widthM: 2, heightM: 2, cells: { occupied: 156, free: 1444, unknown: 0 } });
    mapVersionId = res.body.mapVersion.id;
    const preview = await request(t.app).get(`/api/sites/${site}/map-versions/${mapVersionId}/preview.png`).set('Cookie', owen);
    expect(preview.status).toBe(200);
    expect(preview.headers['content-type']).toBe('image/png');
  });

  it('when map files are bad, then 422 names the problem and nothing is stored', async () => {
    const before = await t.dataSource.getRepository(MapVersion).count();
    const { pgm, yaml } = roomMap();
    const post = () => request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas);
    const truncated = await post().attach('image', pgm.subarray(0, pgm.length - 100), 'room.pgm').attach('metadata', yaml, 'room.yaml');
    expect(truncated.status).toBe(422);
    expect(truncated.body.error.message).toMatch(/pixel data|truncated|bytes/i);
    const otherImage = await post().attach('image', pgm, 'other.pgm').attach('metadata', yaml, 'room.yaml');
    expect(otherImage.status).toBe(422);
    expect(otherImage.body.error.message).toMatch(/names the image "room.pgm"/);
    const notAnImage = await post().attach('image', Buffer.from('hello'), 'room.pgm').attach('metadata', yaml, 'room.yaml');
    expect(notAnImage.status).toBe(422);
    const noMetadata = await post().attach('image', pgm, 'room.pgm');
    expect(noMetadata.status).toBe(422);
    expect(noMetadata.body.error.message).toMatch(/metadata/);
    const badResolution = await post().field('resolution', '-1').attach('image', pgm, 'room.pgm');
    expect(badResolution.status).toBe(400);
    const stationTooCoarse = await post().field('kind', 'station').attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml');
    expect(stationTooCoarse.status).toBe(422);
    expect(stationTooCoarse.body.error.message).toMatch(/station model needs a resolution/);
    expect(await t.dataSource.getRepository(MapVersion).count()).toBe(before);
  });

  it('when a viewer tries to upload or activate, then 403', async () => {
    const { pgm, yaml } = roomMap();
    expect((await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', owen).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml')).status).toBe(403);
    expect((await request(t.app).post(`/api/sites/${site}/map-versions/${mapVersionId}/activate`).set('Cookie', owen)).status).toBe(403);
  });

  it('when the mapper activates the draft, then it becomes the active floor map', async () => {
    const res = await request(t.app).post(`/api/sites/${site}/map-versions/${mapVersionId}/activate`).set('Cookie', tomas);
    expect(res.status).toBe(200);
    expect(res.body.mapVersion.status).toBe('active');
  });

  it('when a robot posts a batch, then hits and passes land on the traversed cells and bad lines are reported', async () => {
    // Beam from (0.525, 1.025) along +x, 1.0 m: endpoint (1.525, 1.025) in cell (30, 20); the
    // segment crosses cells 10…29 of row 20 first (hand-computed from DESIGN §4.1's cell rule).
    const body = [scanLine({}), '{"t": "broken', scanLine({ robot: 'AMR-02' }), ''].join('\n');
    const res = await postScans(body, 'batch-1');
    expect(res.status).toBe(201);
    expect(res.body.status).toBe('counted');
    expect(res.body.batch).toMatchObject({ lines: 3, scans: 1, beams: 1, returns: 1, outOfMap: 0, rejectedCount: 2, days: ['2026-11-03'] });
    expect(res.body.batch.rejectedLines.map((r: { line: number }) => r.line)).toEqual([2, 3]);
    expect(res.body.batch.rejectedLines[1].reason).toMatch(/AMR-02/);

    const counters = createCounters({ width: ROOM.width, height: ROOM.height, resolution: ROOM.resolution, origin: { x: 0, y: 0, yaw: 0 } });
    await new EvidenceStore(t.dataSource).loadInto(mapVersionId, ['2026-11-03'], ROOM.width, ROOM.height, counters);
    const at = (i: number, j: number) => j * ROOM.width + i;
    expect(counters.hits[at(30, 20)]).toBe(1);
    for (let i = 10; i < 30; i++) expect(counters.passes[at(i, 20)]).toBe(1);
    expect(counters.hits.reduce((a, b) => a + b, 0)).toBe(1);
    expect(counters.passes.reduce((a, b) => a + b, 0)).toBe(20);
  });

  it('when returns end on a mapped wall or in open floor, then only the wall returns count as explained', async () => {
    // Endpoint x = 0.525 + 1.45 = 1.975 m lies in cell 39, the wall column; 1.2 m ends in free
    // floor 0.3 m from the wall, outside the 0.10 m tolerance (DESIGN §4.3 default).
    const res = await postScans(scanLine({ t: '2026-11-08T10:00:00Z', ranges: [1.45, 1.2, null] }), 'agreement-1');
    expect(res.status).toBe(201);
    expect(res.body.batch).toMatchObject({ returns: 2, explained: 1, agreement: 0.5 });
    const stat = await t.dataSource.query("SELECT returns, explained FROM daily_stats WHERE day = '2026-11-08'");
    expect(stat).toEqual([{ returns: 2, explained: 1 }]);
  });

  it('when the same batch is posted again, with or without its key, then it answers "already received" and adds nothing', async () => {
    const body = [scanLine({}), '{"t": "broken', scanLine({ robot: 'AMR-02' }), ''].join('\n');
    const before = await evidenceSnapshot(t);
    const again = await postScans(body, 'batch-1');
    expect(again.status).toBe(200);
    expect(again.body.status).toBe('already_received');
    const sameContent = await postScans(body);
    expect(sameContent.body.status).toBe('already_received');
    const gzipped = await postScans(gzipSync(body));
    expect(gzipped.body.status).toBe('already_received');
    expect(await evidenceSnapshot(t)).toEqual(before);
    const reusedKey = await postScans(scanLine({ ranges: [0.5] }), 'batch-1');
    expect(reusedKey.status).toBe(409);
    expect(await evidenceSnapshot(t)).toEqual(before);
  });

  it('when no line of a batch is good, then 422 lists the reasons and nothing is stored', async () => {
    const before = { ev: await evidenceSnapshot(t), batches: await t.dataSource.getRepository(ScanBatch).count() };
    const future = new Date(Date.now() + 3_600_000).toISOString();
    const res = await postScans([scanLine({ t: future }), scanLine({ pose: [0, 0, 0], ranges: 'x' as never }), '[1,2]'].join('\n'));
    expect(res.status).toBe(422);
    expect(res.body.error.details.rejectedLines).toHaveLength(3);
    expect(res.body.error.details.rejectedLines[0].reason).toMatch(/future/);
    expect({ ev: await evidenceSnapshot(t), batches: await t.dataSource.getRepository(ScanBatch).count() }).toEqual(before);
  });

  it('when the store fails in the middle of a batch, then none of the batch is counted', async () => {
    const before = await evidenceSnapshot(t);
    // An injected failure on the last write of the transaction (the per-robot-day figures).
    await t.dataSource.query("CREATE TRIGGER fail_stats BEFORE INSERT ON daily_stats BEGIN SELECT RAISE(ABORT, 'injected failure'); END");
    const res = await postScans([scanLine({ t: '2026-11-04T09:00:00Z' }), scanLine({ t: '2026-11-05T09:00:00Z' })].join('\n'), 'atomic-1');
    await t.dataSource.query('DROP TRIGGER fail_stats');
    expect(res.status).toBe(500);
    expect(res.body.error.message).not.toMatch(/injected|SQLITE/);
    expect(await evidenceSnapshot(t)).toEqual(before);
    expect(await t.dataSource.getRepository(ScanBatch).countBy({ idempotencyKey: 'atomic-1' })).toBe(0);
    // The same batch goes through once the store works again.
    expect((await postScans([scanLine({ t: '2026-11-04T09:00:00Z' }), scanLine({ t: '2026-11-05T09:00:00Z' })].join('\n'), 'atomic-1')).status).toBe(201);
  });

  it('when the token is missing, unknown or revoked, then 401', async () => {
    expect((await request(t.app).post('/api/ingest/scans').send(scanLine({}))).status).toBe(401);
    expect((await postScans(scanLine({}), undefined, 'dlr_not-a-real-token')).status).toBe(401);
  });

  it('when a batch unpacks beyond the limit, then 413 and nothing is stored', async () => {
    const bomb = gzipSync(Buffer.alloc(40 * 1024 * 1024, 0x20));
    const res = await request(t.app).post('/api/ingest/scans').set('Authorization', `Bearer ${secret}`).set('Content-Type', 'application/gzip').send(bomb);
    expect(res.status).toBe(413);
  });

  it('when a mapper uploads a gzip scan log, then it is processed in the background with figures per batch', async () => {
    const lines = Array.from({ length: 50 }, (_, k) => scanLine({ t: `2026-11-06T10:00:${String(k).padStart(2, '0')}.000Z`, ranges: [1.0, 0.9, null] })).join('\n');
    const res = await request(t.app).post(`/api/sites/${site}/scan-batches`).set('Cookie', tomas).attach('log', gzipSync(lines + '\nnot json\n'), 'drive.jsonl.gz');
    expect(res.status).toBe(202);
    expect(res.body.batch.status).toBe('processing');
    await Promise.all(t.services.ingest.pending);
    const done = await request(t.app).get(`/api/sites/${site}/scan-batches/${res.body.batch.id}`).set('Cookie', owen);
    expect(done.body.batch).toMatchObject({ status: 'counted', lines: 51, scans: 50, beams: 150, returns: 100, rejectedCount: 1, progress: 1, days: ['2026-11-06'] });
    expect(done.body.batch.rejectedLines[0]).toMatchObject({ line: 51 });
    // The same file again is recognised and adds nothing.
    const before = await evidenceSnapshot(t);
    const again = await request(t.app).post(`/api/sites/${site}/scan-batches`).set('Cookie', tomas).attach('log', gzipSync(lines + '\nnot json\n'), 'drive-again.jsonl.gz');
    await Promise.all(t.services.ingest.pending);
    const second = await request(t.app).get(`/api/sites/${site}/scan-batches/${again.body.batch.id}`).set('Cookie', tomas);
    expect(second.body.batch.status).toBe('duplicate');
    expect(await evidenceSnapshot(t)).toEqual(before);
  });

  it('when an uploaded gzip log is damaged, then the batch fails with a readable reason and counts nothing', async () => {
    const before = await evidenceSnapshot(t);
    // Damage within the first megabyte unpacked is refused up front (bad-input corpus); this log's
    // damage lies past it (10,000 lines of ~220 bytes), so it shows only while the log is read.
    const good = gzipSync(Array.from({ length: 10_000 }, () => scanLine({ t: '2026-11-07T10:00:00Z' })).join('\n'));
    const res = await request(t.app).post(`/api/sites/${site}/scan-batches`).set('Cookie', tomas).attach('log', good.subarray(0, good.length - 12), 'cut.jsonl.gz');
    await Promise.all(t.services.ingest.pending);
    const batch = (await request(t.app).get(`/api/sites/${site}/scan-batches/${res.body.batch.id}`).set('Cookie', tomas)).body.batch;
    expect(batch.status).toBe('failed');
    expect(batch.error).toMatch(/damaged/);
    expect(await evidenceSnapshot(t)).toEqual(before);
  });

  it('when a customer user reads another organization’s map versions or batches, then 404', async () => {
    const nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
    expect((await request(t.app).get(`/api/sites/${ids.corvaneSite}/map-versions`).set('Cookie', nadia)).status).toBe(404);
    expect((await request(t.app).get(`/api/sites/${ids.corvaneSite}/scan-batches`).set('Cookie', nadia)).status).toBe(404);
  });
});
