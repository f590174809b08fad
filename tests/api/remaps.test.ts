import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { AuditEvent, HourlyTraffic, RemapRequest, Robot, Site, Zone } from '../../server/entities/index.js';
import { insertZone, roomMap } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// Remap requests on the hand-made test room (2 m × 2 m, 5 cm cells) of the demo site Fennick Cross DC:
// who may move a request where, what is refused and why, and that a refusal stores nothing.
const NOW = new Date('2026-11-09T12:00:00Z');
const HOUR = 3_600_000;

describe('remap requests', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let site: string;
  let mapId: string;
  let iris: string;
  let tomas: string;
  let nadia: string;
  let owen: string;
  let priya: string;
  let tomasId: string;
  let owenId: string;
  let zoneNumber = 1;
  const base = () => `/api/sites/${site}/remaps`;
  const zone = async (status: 'open' | 'acknowledged' | 'dismissed' = 'open', versionId = mapId) => {
    const id = await insertZone(t.dataSource, site, versionId, zoneNumber++);
    if (status !== 'open') await t.dataSource.getRepository(Zone).update(id, { status });
    return id;
  };
  const zoneStatus = async (id: string) => (await t.dataSource.getRepository(Zone).findOneByOrFail({ id })).status;
  const upload = async () => {
    const { pgm, yaml } = roomMap();
    return (await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml')).body.mapVersion.id as string;
  };

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    site = ids.ambergateSite;
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
    owen = await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
    priya = await signIn(t.app, 'priya.manager@corvane.example', 'demo-manager-2026');
    tomasId = (await request(t.app).get('/api/auth/me').set('Cookie', tomas)).body.user.id;
    owenId = (await request(t.app).get('/api/auth/me').set('Cookie', owen)).body.user.id;
    mapId = await upload();
    await request(t.app).post(`/api/sites/${site}/map-versions/${mapId}/activate`).set('Cookie', tomas).send({});
  });
  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
  });

  it('when a site manager requests a remap of an open and an acknowledged zone, then it is approved at once, the zones are planned, and area, estimate and history follow', async () => {
    const [a, b] = [await zone('open'), await zone('acknowledged')];
    const res = await request(t.app).post(base()).set('Cookie', nadia).send({ zoneIds: [a, b], note: 'aisle 3 pallets gone' });
    expect(res.status).toBe(201);
    const r = res.body.remap;
    expect(r).toMatchObject({ number: 1, label: 'R-1', status: 'proposed', requestedBy: { name: 'Nadia Okonkwo-Hale' }, approvedBy: { name: 'Nadia Okonkwo-Hale' }, window: null, mapVersionBefore: { id: mapId, version: 1, status: 'active' }, mapVersionAfter: null, verification: null, note: 'aisle 3 pallets gone' });
    expect(r.title).toBe('Re-map Z-1, Z-2');
    expect(r.zones.map((z: { label: string; status: string }) => [z.label, z.status])).toEqual([['Z-1', 'planned'], ['Z-2', 'planned']]);
    // Both zones are the same cell grown by the 2 m default margin, clipped to the 2 m room: one part.
    expect(r.area.outlines).toHaveLength(1);
    expect(r.area.marginM).toBe(2);
    expect(r.area.areaM2).toBeGreaterThan(1);
    expect(r.area.areaM2).toBeLessThanOrEqual(4);
    // The coverage rule on the product defaults (shared/remap/coverage.ts): area / 8 m / 0.8 m/s + 30 min, no transit for one part.
    expect(r.estimate).toMatchObject({ sweepWidthM: 8, driveSpeedMps: 0.8, transitM: 0, overheadMinutes: 30 });
    expect(r.estimate.totalMinutes).toBeCloseTo(r.area.areaM2 / 8 / 0.8 / 60 + 30, 1);
    expect(['high', 'medium', 'low']).toContain(r.priority.label);
    const detail = (await request(t.app).get(`${base()}/${r.id}`).set('Cookie', owen)).body.remap;
    expect(detail.history).toHaveLength(1);
    expect(detail.history[0]).toMatchObject({ action: 'remap.create', actor: { name: 'Nadia Okonkwo-Hale' } });
    expect(detail.history[0].summary).toMatch(/^Nadia Okonkwo-Hale requested remap R-1 of Z-1, Z-2 at Fennick Cross DC: \d+\.\d m² to re-drive, about \d+ min incl\. setup\.$/);
    expect(detail.history[0].summary).toContain(`about ${r.estimate.windowMinutes} min incl. setup`);
    const zoneDetail = (await request(t.app).get(`/api/sites/${site}/zones/${a}`).set('Cookie', owen)).body.zone;
    expect(zoneDetail.history.at(-1)).toMatchObject({ action: 'zone.plan' });
    expect((await request(t.app).get(base()).set('Cookie', owen)).body).toMatchObject({ total: 1, page: 1, pageSize: 25 });
  });

  it('when a request is made of bad input or of zones that cannot join, then 400 or 409 says why and nothing is stored', async () => {
    const planned = (await t.dataSource.getRepository(Zone).findOneByOrFail({ number: 1 })).id;
    const dismissed = await zone('dismissed');
    const open = await zone('open');
    const draft = await upload();
    const onDraft = await zone('open', draft);
    const before = await t.dataSource.getRepository(RemapRequest).count();
    const cases: Array<[unknown, number, RegExp]> = [
      [{ zoneIds: [] }, 400, /zoneIds: name at least one zone/],
      [{ zoneIds: [open, open] }, 400, /name each zone once/],
      [{ zoneIds: ['Z-1'] }, 400, /must be a valid id/],
      [{ zoneIds: [open], colour: 'red' }, 400, /Unrecognized key/i],
      [{ zoneIds: [open], title: 'x'.repeat(201) }, 400, /title: must have at most 200 characters/],
      [{ zoneIds: [open, crypto.randomUUID()] }, 400, /One zone is not zones of Fennick Cross DC/],
      [{ zoneIds: [open, planned] }, 409, /Z-1 is already planned in remap request R-1/],
      [{ zoneIds: [dismissed] }, 409, /is dismissed; only open or acknowledged zones can join/],
      [{ zoneIds: [onDraft] }, 409, /earlier map version, not on the active version 1/],
    ];
    for (const [body, status, message] of cases) {
      const res = await request(t.app).post(base()).set('Cookie', nadia).send(body as object);
      expect(res.status, JSON.stringify(body)).toBe(status);
      expect(res.body.error.message).toMatch(message);
    }
    expect(await t.dataSource.getRepository(RemapRequest).count()).toBe(before);
    expect(await zoneStatus(open)).toBe('open');
    // Another organization's site and its requests are not there for Priya; the viewer may not request.
    expect((await request(t.app).get(base()).set('Cookie', priya)).status).toBe(404);
    expect((await request(t.app).post(base()).set('Cookie', owen).send({ zoneIds: [open] })).status).toBe(403);
  });

  it('when a mapper proposes, then it waits for the customer: scheduling is refused until a site manager approves, and approving twice is refused', async () => {
    const created = (await request(t.app).post(base()).set('Cookie', tomas).send({ zoneIds: [await zone()] })).body.remap;
    expect(created).toMatchObject({ status: 'proposed', approvedBy: null, approvedAt: null, requestedBy: { name: 'Tomas Ferreira-Lund' } });
    const start = new Date(NOW.getTime() + 26 * HOUR).toISOString();
    const early = await request(t.app).post(`${base()}/${created.id}/schedule`).set('Cookie', tomas).send({ start, assigneeId: tomasId });
    expect(early.status).toBe(409);
    expect(early.body.error.message).toMatch(/^R-\d+ is waiting for the customer’s approval: a site manager of Ambergate Provisions \(or an admin\) approves it/);
    expect((await request(t.app).post(`${base()}/${created.id}/approve`).set('Cookie', tomas).send({})).status).toBe(403);
    expect((await request(t.app).post(`${base()}/${created.id}/approve`).set('Cookie', owen).send({})).status).toBe(403);
    expect((await request(t.app).post(`${base()}/${created.id}/approve`).set('Cookie', priya).send({})).status).toBe(404);
    const approved = await request(t.app).post(`${base()}/${created.id}/approve`).set('Cookie', nadia).send({});
    expect(approved.status).toBe(200);
    expect(approved.body.remap).toMatchObject({ status: 'proposed', approvedBy: { name: 'Nadia Okonkwo-Hale' }, approvedAt: NOW.toISOString() });
    expect(approved.body.remap.history.at(-1)).toMatchObject({ action: 'remap.approve', summary: `Nadia Okonkwo-Hale approved ${created.label}.` });
    const again = await request(t.app).post(`${base()}/${created.id}/approve`).set('Cookie', iris).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/was already approved by Nadia Okonkwo-Hale on 2026-11-09/);
  });

  it('when a request is scheduled, started, given its new map and cancelled, then each move is checked by role and state, stored in the site’s time zone and audited', async () => {
    const [a, b] = [await zone('acknowledged'), await zone('open')];
    const r = (await request(t.app).post(base()).set('Cookie', iris).send({ zoneIds: [a, b], title: 'Dock area' })).body.remap;
    const act = (cookie: string, action: string, body: object = {}) => request(t.app).post(`${base()}/${r.id}/${action}`).set('Cookie', cookie).send(body);
    const start = '2026-11-10T01:00:00Z';
    // Wrong state first: nothing to start before it is scheduled.
    expect((await act(tomas, 'start')).status).toBe(409);
    // Bad windows and assignees.
    const bad: Array<[object, RegExp]> = [
      [{ start: '2026-11-09T11:00:00Z', assigneeId: tomasId }, /The window must start in the future/],
      [{ start, end: '2026-11-10T00:30:00Z', assigneeId: tomasId }, /must end after it starts/],
      [{ start, end: '2026-11-11T02:00:00Z', assigneeId: tomasId }, /at most 24 hours/],
      [{ start: '10 Nov 2026 01:00', assigneeId: tomasId }, /start: must be an ISO date-time with its offset/],
      [{ start, assigneeId: owenId }, /Owen Marchetti cannot be assigned: remaps are performed by active mappers or admins/],
      [{ start, assigneeId: crypto.randomUUID() }, /The assignee was not found/],
      [{ start }, /assigneeId/],
    ];
    for (const [body, message] of bad) {
      const res = await act(tomas, 'schedule', body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.message).toMatch(message);
    }
    expect((await act(nadia, 'schedule', { start, assigneeId: tomasId })).status).toBe(403);
    expect((await t.dataSource.getRepository(RemapRequest).findOneByOrFail({ id: r.id })).windowStart).toBeNull();

    const scheduled = await act(tomas, 'schedule', { start, assigneeId: tomasId });
    expect(scheduled.status).toBe(200);
    const minutes = r.estimate.windowMinutes;
    expect(scheduled.body.remap).toMatchObject({ status: 'scheduled', assignee: { id: tomasId, name: 'Tomas Ferreira-Lund' } });
    // Without an end the window lasts the estimate, rounded up to the minute; London keeps GMT (= UTC) in November.
    const end = new Date(Date.parse(start) + minutes * 60_000).toISOString();
    expect(scheduled.body.remap.window).toEqual({ start: '2026-11-10T01:00:00.000Z', end, timezone: 'Europe/London', localStart: '2026-11-10 01:00', localEnd: end.slice(0, 16).replace('T', ' ') });
    // Rescheduling into summer time shows the local clock an hour ahead of UTC.
    const moved = await act(iris, 'schedule', { start: '2027-04-06T00:30:00Z', end: '2027-04-06T02:30:00Z', assigneeId: tomasId });
    expect(moved.body.remap.window).toMatchObject({ localStart: '2027-04-06 01:30', localEnd: '2027-04-06 03:30', timezone: 'Europe/London' });
    expect(moved.body.remap.history.at(-1)).toMatchObject({ action: 'remap.reschedule', summary: 'Iris Achterberg moved R-' + r.number + ' to 2027-04-06 01:30 – 2027-04-06 03:30 (Europe/London), assigned to Tomas Ferreira-Lund.' });

    expect((await act(owen, 'start')).status).toBe(403);
    expect((await act(tomas, 'start')).body.remap.status).toBe('in_progress');
    const reschedule = await act(tomas, 'schedule', { start, assigneeId: tomasId });
    expect(reschedule.status).toBe(409);
    expect(reschedule.body.error.message).toMatch(/is in progress; only proposed or scheduled requests can be given a window/);

    // The new map: only a newer floor version uploaded after the request; a station model is refused.
    expect((await act(tomas, 'attach-map', { mapVersionId: mapId })).body.error.message).toMatch(/Version 1 is not newer than version 1/);
    expect((await act(tomas, 'attach-map', { mapVersionId: crypto.randomUUID() })).status).toBe(400);
    expect((await act(tomas, 'attach-map', {})).status).toBe(400);
    const next = await upload();
    expect((await act(nadia, 'attach-map', { mapVersionId: next })).status).toBe(403);
    const attached = await act(tomas, 'attach-map', { mapVersionId: next });
    expect(attached.status).toBe(200);
    expect(attached.body.remap).toMatchObject({ status: 'map_uploaded', mapVersionAfter: { id: next, status: 'draft' } });
    expect(attached.body.remap.history.at(-1).summary).toMatch(/attached floor map version \d+ to R-\d+; activating it starts the verification/);
    // While the attached map is not active it may be replaced by a corrected upload, not attached twice.
    expect((await act(tomas, 'attach-map', { mapVersionId: next })).body.error.message).toMatch(/is already attached to R-\d+/);
    const corrected = await upload();
    expect((await act(tomas, 'attach-map', { mapVersionId: corrected })).body.remap.mapVersionAfter.id).toBe(corrected);

    // Cancelling: a reason is needed; the zones go back to where they were; a cancelled request stays cancelled.
    expect((await act(nadia, 'cancel', { reason: '' })).status).toBe(400);
    expect((await act(owen, 'cancel', { reason: 'no' })).status).toBe(403);
    const cancelled = await act(nadia, 'cancel', { reason: 'the racks come back next week' });
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.remap).toMatchObject({ status: 'cancelled', cancelReason: 'the racks come back next week' });
    expect(await zoneStatus(a)).toBe('acknowledged');
    expect(await zoneStatus(b)).toBe('open');
    const again = await act(iris, 'cancel', { reason: 'twice' });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/is cancelled; it can no longer be cancelled/);
    expect((await act(tomas, 'start')).status).toBe(409);
    const actions = (await request(t.app).get(`${base()}/${r.id}`).set('Cookie', owen)).body.remap.history.map((h: { action: string }) => h.action);
    expect(actions).toEqual(['remap.create', 'remap.schedule', 'remap.reschedule', 'remap.start', 'remap.attach_map', 'remap.attach_map', 'remap.cancel']);
    expect(await t.dataSource.getRepository(AuditEvent).countBy({ action: 'zone.unplan' })).toBe(2);
  });

  it('when the calendar is asked for a range, then it lists windows overlapping it across visible sites only, and refuses bad ranges', async () => {
    const r = (await request(t.app).post(base()).set('Cookie', iris).send({ zoneIds: [await zone()] })).body.remap;
    await request(t.app).post(`${base()}/${r.id}/schedule`).set('Cookie', tomas).send({ start: '2026-11-12T02:00:00Z', end: '2026-11-12T03:00:00Z', assigneeId: tomasId });
    const range = (from: string, to: string) => `/api/remaps?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`;
    const week = await request(t.app).get(range('2026-11-09T00:00:00Z', '2026-11-16T00:00:00Z')).set('Cookie', nadia);
    expect(week.status).toBe(200);
    expect(week.body.remaps.map((x: { id: string; siteName: string }) => [x.id, x.siteName])).toEqual([[r.id, 'Fennick Cross DC']]);
    // [from, to) overlaps: a range that ends when the window starts leaves it out.
    expect((await request(t.app).get(range('2026-11-11T00:00:00Z', '2026-11-12T02:00:00Z')).set('Cookie', nadia)).body.remaps).toEqual([]);
    expect((await request(t.app).get(range('2026-11-09T00:00:00Z', '2026-11-16T00:00:00Z')).set('Cookie', priya)).body.remaps).toEqual([]);
    expect((await request(t.app).get(range('2026-11-16T00:00:00Z', '2026-11-09T00:00:00Z')).set('Cookie', nadia)).body.error.message).toMatch(/"to" must be after "from"/);
    expect((await request(t.app).get(range('2026-11-01T00:00:00Z', '2027-03-01T00:00:00Z')).set('Cookie', nadia)).body.error.message).toMatch(/at most 93 days/);
    expect((await request(t.app).get('/api/remaps?from=yesterday&to=tomorrow').set('Cookie', nadia)).status).toBe(400);
    expect((await request(t.app).get('/api/remaps').set('Cookie', nadia)).status).toBe(400);
  });

  it('when the site has hourly traffic, then the quiet windows fall in its quiet local hours; without any, none is proposed', async () => {
    const r = (await request(t.app).post(base()).set('Cookie', iris).send({ zoneIds: [await zone()] })).body.remap;
    const path = `${base()}/${r.id}/quiet-windows`;
    const empty = (await request(t.app).get(path).set('Cookie', owen)).body.quietWindows;
    expect(empty).toMatchObject({ windows: [], historyFrom: null, weeks: 0, timezone: 'Europe/London' });
    // Two weeks of traffic: 400 returns an hour, except local 00:00–04:00, when no robot runs (GMT = UTC in November).
    const rows = [];
    for (let h = NOW.getTime() - 14 * 24 * HOUR; h < NOW.getTime(); h += HOUR) if (new Date(h).getUTCHours() >= 4) rows.push({ siteId: site, hourStartMs: h, scans: 10, returns: 400 });
    await t.dataSource.getRepository(HourlyTraffic).insert(rows);
    const res = await request(t.app).get(`${path}?days=7&count=3`).set('Cookie', owen);
    expect(res.status).toBe(200);
    const q = res.body.quietWindows;
    expect(q.durationMinutes).toBe(r.estimate.windowMinutes);
    // History starts at local midnight of the first scans' day (Monday 2026-10-26): 14.5 days, 2.1 weeks.
    expect(q.historyFrom).toBe('2026-10-26T00:00:00.000Z');
    expect(q.weeks).toBe(2.1);
    expect(q.hourOfWeek).toHaveLength(168);
    expect(q.hourOfWeek[2]).toEqual({ dow: 1, hour: 2, meanReturns: 0 });
    expect(q.hourOfWeek[12]).toEqual({ dow: 1, hour: 12, meanReturns: 400 });
    // Three nights, each window inside 00:00–04:00 local and expecting nothing.
    expect(q.windows).toHaveLength(3);
    for (const w of q.windows) {
      expect(w.expectedReturns).toBe(0);
      expect(Number(w.localStart.slice(11, 13))).toBeLessThan(4);
    }
    expect(new Set(q.windows.map((w: { localStart: string }) => w.localStart.slice(0, 10))).size).toBe(3);
    expect(q.windows.map((w: { rank: number }) => w.rank)).toEqual([1, 2, 3]);
    for (const query of ['days=0', 'days=29', 'count=abc', 'hours=3']) expect((await request(t.app).get(`${path}?${query}`).set('Cookie', owen)).status, query).toBe(400);
  });

  it('when an admin changes the remap settings, then new requests use them and values out of range are refused', async () => {
    const settings = `/api/sites/${site}/settings`;
    for (const body of [{ remapSweepWidthM: 0 }, { remapDriveSpeedMps: 5 }, { remapSetupMinutes: 2.5 }, { remapMarginM: -1 }]) {
      const res = await request(t.app).patch(settings).set('Cookie', iris).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
    }
    const ok = await request(t.app).patch(settings).set('Cookie', iris).send({ remapSetupMinutes: 45, remapMarginM: 0.5 });
    expect(ok.body.settings.values).toMatchObject({ remapSetupMinutes: 45, remapMarginM: 0.5, remapSweepWidthM: 8, remapDriveSpeedMps: 0.8 });
    const r = (await request(t.app).post(base()).set('Cookie', nadia).send({ zoneIds: [await zone()] })).body.remap;
    expect(r.estimate.overheadMinutes).toBe(45);
    expect(r.area.marginM).toBe(0.5);
    // One cell grown by 0.5 m = 10 cells: the disc of radius 10 cells holds 317 cells (hand count of i² + j² ≤ 100), 0.7925 m².
    expect(r.area.areaM2).toBeCloseTo(0.79, 2);
  });

  it('when the new map is activated and a recorded drive of the last days is counted against it, then the next nightly run verifies the request and resolves its zone', async () => {
    const zoneId = await zone();
    const r = (await request(t.app).post(base()).set('Cookie', nadia).send({ zoneIds: [zoneId] })).body.remap;
    const act = (action: string, body: object = {}) => request(t.app).post(`${base()}/${r.id}/${action}`).set('Cookie', tomas).send(body);
    await act('schedule', { start: '2026-11-09T13:00:00Z', assigneeId: tomasId });
    await act('start');
    const next = await upload();
    await act('attach-map', { mapVersionId: next });
    expect((await request(t.app).post(`/api/sites/${site}/map-versions/${next}/activate`).set('Cookie', tomas).send({})).status).toBe(200);
    // A commissioning drive of the three days before, uploaded after the activation: AMR-01 turns its
    // front scanner full circle at 25 places in the room; each beam ends in the middle of the wall
    // ring (x or y = 0.025 or 1.975 m), so every return is explained by the map.
    const robot = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    const mount = robot.mounts.find((m) => m.name === 'front') ?? { x: 0, y: 0, yaw: 0 };
    const lines: string[] = [];
    const beams = 720;
    for (const day of ['2026-11-06', '2026-11-07', '2026-11-08']) {
      for (let k = 0; k < 25; k++) {
        const [sx, sy] = [0.3 + 0.35 * (k % 5), 0.3 + 0.35 * Math.floor(k / 5)];
        // The base pose that puts the scanner at (sx, sy) facing +x: heading −yaw of the mount, and the
        // mount's offset turned by that heading taken off (scanner pose = base pose ∘ mount, DESIGN.md §4.2).
        const heading = -mount.yaw;
        const [c, sn] = [Math.cos(heading), Math.sin(heading)];
        const pose: [number, number, number] = [sx - (c * mount.x - sn * mount.y), sy - (sn * mount.x + c * mount.y), heading];
        const ranges: number[] = [];
        for (let b = 0; b < beams; b++) {
          const a = -Math.PI + (b * 2 * Math.PI) / beams;
          const [dx, dy] = [Math.cos(a), Math.sin(a)];
          const tx = dx > 0 ? (1.975 - sx) / dx : dx < 0 ? (0.025 - sx) / dx : Infinity;
          const ty = dy > 0 ? (1.975 - sy) / dy : dy < 0 ? (0.025 - sy) / dy : Infinity;
          ranges.push(Math.round(Math.min(tx, ty) * 1000) / 1000);
        }
        lines.push(JSON.stringify({ t: `${day}T10:${String(k).padStart(2, '0')}:00.000Z`, robot: 'AMR-01', scanner: 'front', pose, angleMin: -Math.PI, angleIncrement: (2 * Math.PI) / beams, rangeMin: 0.05, rangeMax: 30, ranges }));
      }
    }
    const siteRow = await t.dataSource.getRepository(Site).findOneByOrFail({ id: site });
    await t.services.ingest.countLines(siteRow, lines, 'commissioning.jsonl', NOW);
    const [run] = await t.services.jobRuns.detect('manual', site, NOW);
    expect(run.figures).toMatchObject({ remaps: { checked: 1, verified: 1, notFixed: 0 } });
    const after = (await request(t.app).get(`${base()}/${r.id}`).set('Cookie', nadia)).body.remap;
    expect(after).toMatchObject({ status: 'verified', verification: { state: 'verified', evidenceDays: 3, zonesStillFlagging: 0 }, zones: [{ id: zoneId, status: 'resolved' }] });
    // Every return ends on mapped structure: the new map explains all of them.
    expect(after.verification.after.agreement).toBe(1);
  });
});
