import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Robot, RobotToken } from '../../server/entities/index.js';
import { createTestApp, demoAccount, demoIds, signIn, type TestApp } from './helpers/test-app.js';

describe('organization scoping', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let nadia: string;
  let owen: string;
  let tomas: string;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    nadia = await signIn(t.app, demoAccount('site_manager').email, demoAccount('site_manager').password);
    owen = await signIn(t.app, demoAccount('viewer').email, demoAccount('viewer').password);
    tomas = await signIn(t.app, demoAccount('mapper').email, demoAccount('mapper').password);
  });
  afterAll(() => t.close());

  it('when a customer site manager lists sites, then only their organization’s sites come back', async () => {
    const res = await request(t.app).get('/api/sites').set('Cookie', nadia);
    expect(res.status).toBe(200);
    expect(res.body.sites.map((s: { name: string }) => s.name)).toEqual(['Fennick Cross DC', 'Tarrow Heath Cold Store']);
    expect(new Set(res.body.sites.map((s: { organization: { name: string } }) => s.organization.name))).toEqual(new Set(['Ambergate Provisions']));
  });

  it('when a mapper lists sites, then every customer’s sites come back', async () => {
    const res = await request(t.app).get('/api/sites').set('Cookie', tomas);
    expect(res.body.sites).toHaveLength(5);
  });

  it('when a customer user reads another organization’s site or robots, then the answer is 404, not 403', async () => {
    const paths = [
      `/api/sites/${ids.corvaneSite}`,
      `/api/sites/${ids.corvaneSite}/robots`,
      `/api/sites/${ids.corvaneSite}/robots/${ids.corvaneRobot}/tokens`,
    ];
    for (const p of paths) {
      const res = await request(t.app).get(p).set('Cookie', nadia);
      expect(res.status, p).toBe(404);
      expect(res.body.error.code).toBe('not_found');
    }
    expect((await request(t.app).get(`/api/sites/${ids.corvaneSite}`).set('Cookie', owen)).status).toBe(404);
  });

  it('when a customer site manager tries to change another organization’s robots or tokens, then 404 and nothing changes', async () => {
    const before = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.corvaneRobot });
    const base = `/api/sites/${ids.corvaneSite}/robots`;
    expect((await request(t.app).post(base).set('Cookie', nadia).send({ name: 'SNEAK-1', model: 'x' })).status).toBe(404);
    expect((await request(t.app).patch(`${base}/${ids.corvaneRobot}`).set('Cookie', nadia).send({ model: 'hijacked' })).status).toBe(404);
    expect((await request(t.app).delete(`${base}/${ids.corvaneRobot}`).set('Cookie', nadia)).status).toBe(404);
    expect((await request(t.app).post(`${base}/${ids.corvaneRobot}/tokens`).set('Cookie', nadia).send({ label: 'sneak' })).status).toBe(404);
    // Mixing an own site id with a foreign robot id must not work either.
    expect((await request(t.app).patch(`/api/sites/${ids.ambergateSite}/robots/${ids.corvaneRobot}`).set('Cookie', nadia).send({ model: 'hijacked' })).status).toBe(404);
    const after = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.corvaneRobot });
    expect(after).toEqual(before);
    expect(await t.dataSource.getRepository(RobotToken).countBy({ robotId: ids.corvaneRobot })).toBe(0);
    expect(await t.dataSource.getRepository(Robot).countBy({ name: 'SNEAK-1' })).toBe(0);
  });

  it('when a customer user lists organizations, then only their own comes back', async () => {
    const res = await request(t.app).get('/api/organizations').set('Cookie', owen);
    expect(res.body.organizations.map((o: { name: string }) => o.name)).toEqual(['Ambergate Provisions']);
  });

  it('when a robot token is created, then its secret is shown once and only a hash is stored', async () => {
    const res = await request(t.app).post(`/api/sites/${ids.ambergateSite}/robots/${ids.ambergateRobot}/tokens`).set('Cookie', nadia).send({ label: 'AMR-01 main' });
    expect(res.status).toBe(201);
    expect(res.body.secret).toMatch(/^dlr_[A-Za-z0-9_-]{43}$/);
    const list = await request(t.app).get(`/api/sites/${ids.ambergateSite}/robots/${ids.ambergateRobot}/tokens`).set('Cookie', nadia);
    expect(JSON.stringify(list.body)).not.toContain(res.body.secret);
    const stored = await t.dataSource.getRepository(RobotToken).findOneByOrFail({ id: res.body.token.id });
    expect(stored.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(stored.tokenHash).not.toContain(res.body.secret);
    // Revoked tokens stop authenticating at once.
    expect((await t.services.robots.robotForToken(res.body.secret)).id).toBe(ids.ambergateRobot);
    await request(t.app).delete(`/api/sites/${ids.ambergateSite}/robots/${ids.ambergateRobot}/tokens/${res.body.token.id}`).set('Cookie', nadia).expect(204);
    await expect(t.services.robots.robotForToken(res.body.secret)).rejects.toMatchObject({ status: 401 });
  });
});
