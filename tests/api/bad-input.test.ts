import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// Bad input gets a 4xx with a readable sentence and changes nothing.

async function rowCounts(t: TestApp) {
  const tables = ['organizations', 'users', 'invitations', 'sites', 'robots', 'robot_tokens'];
  const out: Record<string, number> = {};
  for (const table of tables) out[table] = (await t.dataSource.query(`SELECT COUNT(*) AS n FROM "${table}"`))[0].n;
  return out;
}

describe('bad input', () => {
  let t: TestApp;
  let iris: string;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
  });
  afterAll(() => t.close());

  const cases = (): Array<[string, string, string, unknown, number, RegExp]> => [
    ['missing fields', 'post', '/api/sites', {}, 400, /name/],
    ['wrong types', 'post', `/api/sites/${ids.ambergateSite}/robots`, { name: 42, model: true }, 400, /not valid/],
    ['unknown field (mass assignment)', 'patch', `/api/users/${ids.priya}`, { role: 'viewer', organizationId: ids.ambergate }, 400, /organizationId|Unrecognized/i],
    ['bad time zone', 'post', '/api/organizations', { name: 'Zoneless', timezone: 'Mars/Olympus' }, 400, /IANA time zone/],
    ['unknown organization', 'post', '/api/sites', { name: 'S', city: 'C', timezone: 'Europe/London', organizationId: '00000000-0000-4000-8000-000000000000' }, 404, /organization was not found/],
    ['malformed id', 'get', '/api/sites/not-an-id', undefined, 400, /valid id/],
    ['unknown id', 'get', '/api/sites/00000000-0000-4000-8000-000000000000', undefined, 404, /site was not found/],
    ['mount out of range', 'post', `/api/sites/${ids.ambergateSite}/robots`, { name: 'AMR-99', model: 'M', mounts: [{ name: 'front', x: 99, y: 0, yaw: 0 }] }, 400, /mounts/],
    ['duplicate mount names', 'post', `/api/sites/${ids.ambergateSite}/robots`, { name: 'AMR-98', model: 'M', mounts: [{ name: 'f', x: 0, y: 0, yaw: 0 }, { name: 'f', x: 0, y: 0, yaw: 0 }] }, 400, /unique/],
    ['duplicate robot name', 'post', `/api/sites/${ids.ambergateSite}/robots`, { name: 'AMR-01', model: 'M' }, 409, /already has a robot named AMR-01/],
    ['bad e-mail', 'post', '/api/invitations', { email: 'not-an-email', name: 'N', role: 'viewer', organizationId: ids.ambergate }, 400, /e-mail/],
    ['unknown role', 'post', '/api/invitations', { email: 'a@b.example', name: 'N', role: 'overlord', organizationId: ids.ambergate }, 400, /role/],
    ['bad limit', 'get', '/api/audit-events?limit=-3', undefined, 400, /limit/],
  ];

  it('when each bad request is sent, then it gets its 4xx with a readable message and no row changes', async () => {
    const before = await rowCounts(t);
    for (const [label, method, path, body, status, message] of cases()) {
      const req = request(t.app)[method as 'get'](path).set('Cookie', iris);
      const res = body === undefined ? await req : await req.send(body as object);
      expect(res.status, label).toBe(status);
      expect(res.body.error.message, label).toMatch(message);
      expect(JSON.stringify(res.body), label).not.toMatch(/at .*\.ts:|SQLITE|QueryFailed/);
    }
    expect(await rowCounts(t)).toEqual(before);
  });

  it('when the body is not JSON, then 400 says so', async () => {
    const res = await request(t.app).post('/api/sites').set('Cookie', iris).set('Content-Type', 'application/json').send('{"name": ');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('The request body is not valid JSON.');
  });

  it('when the body is larger than allowed, then 413', async () => {
    const res = await request(t.app).post('/api/organizations').set('Cookie', iris).send({ name: 'x'.repeat(300_000), timezone: 'Europe/London' });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('when an unsafe request comes from another site, then 403 and nothing changes (CSRF defence)', async () => {
    const before = await rowCounts(t);
    const fromElsewhere = await request(t.app).post('/api/organizations').set('Cookie', iris).set('Origin', 'https://evil.example').send({ name: 'Forged', timezone: 'Europe/London' });
    expect(fromElsewhere.status).toBe(403);
    const crossSite = await request(t.app).post('/api/organizations').set('Cookie', iris).set('Sec-Fetch-Site', 'cross-site').send({ name: 'Forged', timezone: 'Europe/London' });
    expect(crossSite.status).toBe(403);
    expect(await rowCounts(t)).toEqual(before);
    const sameOrigin = await request(t.app).post('/api/organizations').set('Cookie', iris).set('Origin', t.config.baseUrl).set('Sec-Fetch-Site', 'same-origin').send({ name: 'Lawful Org', timezone: 'Europe/London' });
    expect(sameOrigin.status).toBe(201);
  });

  it('when an API path is unknown, then 404 in the error shape', async () => {
    const res = await request(t.app).get('/api/no-such-thing').set('Cookie', iris);
    expect(res.status).toBe(404);
    expect(res.body.error.message).toBe('There is no GET /api/no-such-thing in this API.');
  });

  it('when responses are sent, then the security headers are set', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});
