import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { insertZone, roomMap } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// The site header's remap figures (requests waiting to be scheduled, the next window) come from
// one read of the site's open requests.
const NOW = new Date('2026-11-09T12:00:00Z');
const HOUR = 3_600_000;

describe('site health: remap figures', () => {
  let t: TestApp;
  let site: string;
  let tomas: string;
  let tomasId: string;
  let nadia: string;
  let zoneNumber = 1;

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    t = await createTestApp();
    site = (await demoIds(t.dataSource)).ambergateSite;
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    tomasId = (await request(t.app).get('/api/auth/me').set('Cookie', tomas)).body.user.id;
    nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
    const { pgm, yaml } = roomMap();
    const mapId = (await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml')).body.mapVersion.id as string;
    await request(t.app).post(`/api/sites/${site}/map-versions/${mapId}/activate`).set('Cookie', tomas).send({});
    // Three requests proposed by the mapper, one zone each.
    for (let k = 0; k < 3; k++) {
      const zoneId = await insertZone(t.dataSource, site, mapId, zoneNumber++);
      const res = await request(t.app).post(`/api/sites/${site}/remaps`).set('Cookie', tomas).send({ zoneIds: [zoneId] });
      expect(res.status).toBe(201);
    }
  });
  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
  });

  const health = async () => (await request(t.app).get(`/api/sites/${site}`).set('Cookie', tomas)).body.site.health;
  const remaps = async () => (await request(t.app).get(`/api/sites/${site}/remaps?page=1&pageSize=25`).set('Cookie', tomas)).body.remaps as Array<{ id: string; number: number; status: string }>;
  // A mapper's proposal is approved by the site's manager before it can be scheduled.
  const schedule = async (id: string, startMs: number) => {
    expect((await request(t.app).post(`/api/sites/${site}/remaps/${id}/approve`).set('Cookie', nadia).send({})).status).toBe(200);
    return scheduled(id, startMs);
  };
  const scheduled = (id: string, startMs: number) => request(t.app).post(`/api/sites/${site}/remaps/${id}/schedule`).set('Cookie', tomas).send({ start: new Date(startMs).toISOString(), end: new Date(startMs + 2 * HOUR).toISOString(), assigneeId: tomasId });

  it('when three requests are only proposed, then all three wait and there is no next window', async () => {
    const h = await health();
    expect(h.remapsWaiting).toBe(3);
    expect(h.nextRemap).toBeNull();
  });

  it('when two are scheduled, then one waits and the next window is the earlier of the two, whatever the order of scheduling', async () => {
    const [a, b] = (await remaps()).sort((x, y) => x.number - y.number);
    expect((await schedule(a.id, NOW.getTime() + 48 * HOUR)).status).toBe(200);
    expect((await schedule(b.id, NOW.getTime() + 24 * HOUR)).status).toBe(200);
    const h = await health();
    expect(h.remapsWaiting).toBe(1);
    expect(h.nextRemap).toMatchObject({ id: b.id, number: b.number, status: 'scheduled', start: new Date(NOW.getTime() + 24 * HOUR).toISOString(), end: new Date(NOW.getTime() + 26 * HOUR).toISOString() });
  });

  it('when the earlier window has ended, then the next window is the later one', async () => {
    vi.setSystemTime(new Date(NOW.getTime() + 30 * HOUR));
    const h = await health();
    expect(h.nextRemap.start).toBe(new Date(NOW.getTime() + 48 * HOUR).toISOString());
    vi.setSystemTime(NOW);
  });
});
