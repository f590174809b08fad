import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { deflateSync, gzipSync } from 'node:zlib';
import pino from 'pino';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MAP_IMAGE_MAX_BYTES } from '../../shared/grid/map-kinds.js';
import { createApp } from '../../server/app.js';
import { testConfig } from '../../server/config.js';
import { openDatabase } from '../../server/data-source.js';
import { Invitation, Organization, OutgoingMail, Robot, RobotFlag, User } from '../../server/entities/index.js';
import { listRoutes } from '../../server/routes/index.js';
import { DOCKING_BATCH_MAX_BYTES } from '../../server/services/docking.service.js';
import { seedDemoAccounts } from '../../server/services/demo-seed.service.js';
import { ROBOT_BATCH_MAX_BYTES } from '../../server/services/ingest.service.js';
import { previousMonth } from '../../server/services/report-figures.service.js';
import { insertZone, roomMap, scanLine } from './helpers/fixtures.js';
import { insertCapturedMail } from './helpers/mail-fixtures.js';
import { remapAt } from './helpers/remap-fixtures.js';
import { createTestApp, demoAccount, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// One describe per point of the security review (README, "Security"). Each check is written so
// that it fails when the defence it names is removed.

type Ids = Awaited<ReturnType<typeof demoIds>>;

const cookieOf = (res: request.Response): string | undefined =>
  ((res.headers['set-cookie'] as unknown as string[] | undefined) ?? []).find((c) => /^(__Host-)?driftline_session=/.test(c));
const sessionIdOf = (cookie: string) => cookie.split(';')[0].split('=')[1];

/** Every stored row of every table as one string, for "the secret is nowhere" checks. */
async function everyRow(t: TestApp): Promise<string> {
  const tables = (await t.dataSource.query("SELECT name FROM sqlite_master WHERE type = 'table'")) as Array<{ name: string }>;
  const parts: string[] = [];
  for (const { name } of tables) parts.push(JSON.stringify(await t.dataSource.query(`SELECT * FROM "${name}"`)));
  return parts.join('\n');
}

/** A fresh app with the demo accounts and sites, and the demo ids. */
async function openSeeded(options: Parameters<typeof createTestApp>[0] = {}) {
  const t = await createTestApp(options);
  return { t, ids: await demoIds(t.dataSource) };
}

/** Signs in the demo account of a role (for site_manager: Ambergate's, or Corvane's with `corvane`); returns the cookie. */
const signInAs = (t: TestApp, role: string, corvane = false) => signIn(t.app, demoAccount(role, corvane).email, demoAccount(role, corvane).password);

const count = async (t: TestApp, table: string) => ((await t.dataSource.query(`SELECT COUNT(*) AS n FROM "${table}"`)) as Array<{ n: number }>)[0].n;

/** Invites a person to Ambergate as a viewer and accepts for them; returns their e-mail, password and id. */
async function newPerson(t: TestApp, ids: Ids, label: string) {
  const email = `${label}-${crypto.randomUUID().slice(0, 8)}@ambergate.example`;
  const password = 'harbour-lantern-quietly-42';
  const { link } = await t.services.invitations.create(ids.admin, { email, name: 'Security Test', role: 'viewer', organizationId: ids.ambergate });
  const { userId } = await t.services.invitations.accept(link.split('/').pop()!, password);
  return { email, password, id: userId };
}

/** Uploads the test room as the site's active floor map, so that robot batches can be counted. */
async function activateRoom(t: TestApp, ids: Ids) {
  const { pgm, yaml } = roomMap();
  const map = await t.services.mapVersions.upload(ids.admin, ids.ambergateSite, { kind: 'floor', label: 'security', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
  await t.services.mapVersions.activate(ids.admin, ids.ambergateSite, map.id);
  return map.id;
}

/** Directives of a Content-Security-Policy header: name → sources. */
function cspDirectives(header: string | undefined): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const part of (header ?? '').split(';')) {
    const [name, ...values] = part.trim().split(/\s+/);
    if (name) out.set(name, values);
  }
  return out;
}

describe('security headers', () => {
  let t: TestApp;
  let https: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: false });
    https = await createTestApp({ seed: false, config: { baseUrl: 'https://driftline.kestrelway.example', secureCookies: true } });
  });
  afterAll(async () => {
    await t.close();
    await https.close();
  });

  it('when any API answer is sent, then CSP, nosniff, frame and referrer headers are set and X-Powered-By is not', async () => {
    for (const res of [await request(t.app).get('/api/auth/me'), await request(t.app).get('/api/no-such-thing')]) {
      const csp = cspDirectives(res.headers['content-security-policy']);
      expect(csp.get('default-src')).toEqual(["'self'"]);
      expect(csp.get('script-src')).toEqual(["'self'"]);
      expect(csp.get('object-src')).toEqual(["'none'"]);
      expect(csp.get('frame-ancestors')).toEqual(["'self'"]);
      expect(csp.get('base-uri')).toEqual(["'self'"]);
      expect(csp.get('form-action')).toEqual(["'self'"]);
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
      expect(res.headers['referrer-policy']).toBe('no-referrer');
      expect(res.headers['x-powered-by']).toBeUndefined();
    }
  });

  it('when the API answers, then nothing is cached unless the route says so', async () => {
    for (const res of [await request(t.app).get('/api/auth/me'), await request(t.app).post('/api/auth/sign-in').send({ email: 'nobody@ambergate.example', password: 'not-the-password' }), await request(t.app).get('/api/no-such-thing')]) {
      expect(res.headers['cache-control']).toBe('no-store');
    }
  });

  it('when the base URL is http, then no HSTS header is sent and requests are not upgraded', async () => {
    const res = await request(t.app).get('/api/auth/me');
    expect(res.headers['strict-transport-security']).toBeUndefined();
    expect(cspDirectives(res.headers['content-security-policy']).has('upgrade-insecure-requests')).toBe(false);
  });

  it('when the base URL is https, then HSTS asks for at least a year and CSP upgrades insecure requests', async () => {
    const res = await request(https.app).get('/api/auth/me');
    const hsts = res.headers['strict-transport-security'] as string;
    expect(hsts).toMatch(/max-age=\d+/);
    expect(Number(/max-age=(\d+)/.exec(hsts)![1])).toBeGreaterThanOrEqual(365 * 86_400);
    expect(cspDirectives(res.headers['content-security-policy']).has('upgrade-insecure-requests')).toBe(true);
  });
});

describe('cross-site request refusal (CSRF)', () => {
  let t: TestApp;
  let ids: Ids;
  let admin: string;
  let robotSecret: string;
  beforeAll(async () => {
    ({ t, ids } = await openSeeded());
    admin = await signInAs(t, 'admin');
    await activateRoom(t, ids);
    robotSecret = (await t.services.robots.createToken(ids.admin, ids.ambergateSite, ids.ambergateRobot, 'csrf test')).secret;
  });
  afterAll(() => t.close());

  const foreign: Array<[string, Record<string, string>]> = [
    ['a foreign Origin', { Origin: 'https://elsewhere.example' }],
    ['Origin: null (a sandboxed or file page)', { Origin: 'null' }],
    ['Sec-Fetch-Site: cross-site', { 'Sec-Fetch-Site': 'cross-site' }],
    ['Sec-Fetch-Site: same-site (a sibling subdomain)', { 'Sec-Fetch-Site': 'same-site' }],
  ];

  const userRow = async (id: string) => (await t.dataSource.query('SELECT role, status, organization_id FROM users WHERE id = ?', [id]))[0];
  const invitationRow = async (id: string) => (await t.dataSource.query('SELECT * FROM invitations WHERE id = ?', [id]))[0];

  for (const [label, headers] of foreign) {
    it(`when POST, PATCH and DELETE carry the admin's cookie and ${label}, then each gets 403 and nothing changes`, async () => {
      const orgsBefore = await count(t, 'organizations');
      const priyaBefore = await userRow(ids.priya);
      const { invitation } = await t.services.invitations.create(ids.admin, { email: `csrf-${crypto.randomUUID().slice(0, 8)}@ambergate.example`, name: 'Kept Invitee', role: 'viewer', organizationId: ids.ambergate });
      const invitationBefore = await invitationRow(invitation.id);

      const post = await request(t.app).post('/api/organizations').set('Cookie', admin).set(headers).send({ name: 'Forged Holdings', timezone: 'Europe/London' });
      const patch = await request(t.app).patch(`/api/users/${ids.priya}`).set('Cookie', admin).set(headers).send({ status: 'disabled' });
      const del = await request(t.app).delete(`/api/invitations/${invitation.id}`).set('Cookie', admin).set(headers);

      for (const res of [post, patch, del]) {
        expect(res.status).toBe(403);
        expect(res.body.error.code).toBe('cross_site');
        expect(res.body.error.message).toMatch(/another (site|origin) are refused/);
      }
      expect(await count(t, 'organizations')).toBe(orgsBefore);
      expect(await userRow(ids.priya)).toEqual(priyaBefore);
      expect(await invitationRow(invitation.id)).toEqual(invitationBefore);
    });
  }

  it('when a sign-in is posted from another site, then it is refused and no session is opened', async () => {
    const before = await count(t, 'sessions');
    const res = await request(t.app).post('/api/auth/sign-in').set('Sec-Fetch-Site', 'cross-site').send({ email: demoAccount('viewer').email, password: demoAccount('viewer').password });
    expect(res.status).toBe(403);
    expect(cookieOf(res)).toBeUndefined();
    expect(await count(t, 'sessions')).toBe(before);
  });

  it('when the same requests come from our own origin, then they work', async () => {
    const own = { Origin: t.config.baseUrl, 'Sec-Fetch-Site': 'same-origin' };
    const { invitation } = await t.services.invitations.create(ids.admin, { email: `own-${crypto.randomUUID().slice(0, 8)}@ambergate.example`, name: 'Own Invitee', role: 'viewer', organizationId: ids.ambergate });
    expect((await request(t.app).post('/api/organizations').set('Cookie', admin).set(own).send({ name: 'Same Origin Holdings', timezone: 'Europe/London' })).status).toBe(201);
    expect((await request(t.app).patch(`/api/users/${ids.priya}`).set('Cookie', admin).set(own).send({ status: 'active' })).status).toBe(200);
    expect((await request(t.app).delete(`/api/invitations/${invitation.id}`).set('Cookie', admin).set(own)).status).toBe(204);
  });

  it('when a GET comes from another site, then it is answered (reads change nothing) without CORS headers that would let that site read it', async () => {
    const res = await request(t.app).get('/api/auth/me').set('Cookie', admin).set({ Origin: 'https://elsewhere.example', 'Sec-Fetch-Site': 'cross-site' });
    expect(res.status).toBe(200);
    expect(res.headers['access-control-allow-origin']).toBeUndefined();
    expect(res.headers['access-control-allow-credentials']).toBeUndefined();
  });

  it('when a robot posts with its bearer token and no browser headers, then the batch is counted', async () => {
    const res = await request(t.app).post('/api/ingest/scans').set('Authorization', `Bearer ${robotSecret}`).set('Content-Type', 'application/x-ndjson').send(scanLine({}));
    expect(res.status).toBe(201);
  });
});

describe('session fixation and expiry', () => {
  let t: TestApp;
  let ids: Ids;
  beforeAll(async () => {
    ({ t, ids } = await openSeeded());
  });
  afterAll(() => t.close());

  const me = (cookie: string) => request(t.app).get('/api/auth/me').set('Cookie', cookie);
  const sessionRow = async (id: string) => (await t.dataSource.query('SELECT * FROM sessions WHERE id = ?', [id]))[0] as { user_id: string; expires_at: number } | undefined;

  it('when a valid session id of someone else is planted before sign-in, then sign-in issues a new id and the planted one is not promoted', async () => {
    const planted = await signInAs(t, 'viewer');
    const res = await request(t.app).post('/api/auth/sign-in').set('Cookie', planted).send({ email: demoAccount('admin').email, password: demoAccount('admin').password });
    expect(res.status).toBe(200);
    const issued = cookieOf(res)!;
    expect(sessionIdOf(issued)).not.toBe(sessionIdOf(planted));
    expect((await me(planted)).body.user.role).toBe('viewer');
    expect((await me(issued.split(';')[0])).body.user.role).toBe('admin');
  });

  it('when an id the server never issued is planted, then it is not stored and sign-in answers with another', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').set('Cookie', 'driftline_session=chosen-by-someone-else').send({ email: demoAccount('mapper').email, password: demoAccount('mapper').password });
    const issued = cookieOf(res)!;
    expect(sessionIdOf(issued)).not.toBe('chosen-by-someone-else');
    expect(await sessionRow('chosen-by-someone-else')).toBeUndefined();
  });

  it('when a session is opened, then it expires in 7 days and the cookie says the same', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: demoAccount('viewer').email, password: demoAccount('viewer').password });
    const cookie = cookieOf(res)!;
    const row = (await sessionRow(sessionIdOf(cookie)))!;
    const days = (row.expires_at * 1000 - Date.now()) / 86_400_000;
    expect(days).toBeGreaterThan(6.99);
    expect(days).toBeLessThanOrEqual(7);
    const maxAge = Number(/Max-Age=(\d+)/i.exec(cookie)?.[1]);
    expect(Math.abs(Date.now() + maxAge * 1000 - row.expires_at * 1000)).toBeLessThan(2000);
  });

  it('when signing out, then the session row is deleted server-side and the old cookie is refused', async () => {
    const cookie = await signInAs(t, 'site_manager');
    expect(await sessionRow(sessionIdOf(cookie))).toBeDefined();
    const out = await request(t.app).post('/api/auth/sign-out').set('Cookie', cookie);
    expect(out.status).toBe(204);
    expect(cookieOf(out)).toMatch(/^driftline_session=;/);
    expect(await sessionRow(sessionIdOf(cookie))).toBeUndefined();
    expect((await me(cookie)).status).toBe(401);
  });

  it('when a session has expired, then it is refused, deleted and the cookie is cleared', async () => {
    const cookie = await signInAs(t, 'viewer');
    expect((await me(cookie)).status).toBe(200);
    await t.dataSource.query('UPDATE sessions SET expires_at = ? WHERE id = ?', [Math.floor(Date.now() / 1000) - 1, sessionIdOf(cookie)]);
    const res = await me(cookie);
    expect(res.status).toBe(401);
    expect(cookieOf(res)).toMatch(/^driftline_session=;/);
    expect(await sessionRow(sessionIdOf(cookie))).toBeUndefined();
  });

  it('when a password is changed, then the other sessions of that user end and the current one stays', async () => {
    const person = await newPerson(t, ids, 'rotate');
    const here = await signIn(t.app, person.email, person.password);
    const there = await signIn(t.app, person.email, person.password);
    const other = await signInAs(t, 'viewer');
    const res = await request(t.app).post('/api/auth/change-password').set('Cookie', here).send({ currentPassword: person.password, newPassword: 'copper-kettle-evening-17' });
    expect(res.status).toBe(204);
    expect((await me(here)).status).toBe(200);
    expect((await me(there)).status).toBe(401);
    expect((await me(other)).status).toBe(200);
    const left = (await t.dataSource.query('SELECT id FROM sessions WHERE user_id = ?', [person.id])) as Array<{ id: string }>;
    expect(left.map((r) => r.id)).toEqual([sessionIdOf(here)]);
  });
});

describe('session cookie flags', () => {
  it('when the base URL is http, then the cookie is HttpOnly, SameSite=Lax, Path=/ and not Secure', async () => {
    const t = await createTestApp();
    try {
      const cookie = cookieOf(await request(t.app).post('/api/auth/sign-in').send({ email: demoAccount('viewer').email, password: demoAccount('viewer').password }))!;
      const flags = cookie.split(';').map((p) => p.trim().toLowerCase());
      expect(flags).toContain('httponly');
      expect(flags).toContain('samesite=lax');
      expect(flags).toContain('path=/');
      expect(flags).not.toContain('secure');
    } finally {
      await t.close();
    }
  });

  it('when the base URL is https, then the session cookie and its clearing cookie are Secure, host-only __Host- cookies', async () => {
    const t = await createTestApp({ config: { baseUrl: 'https://driftline.kestrelway.example', secureCookies: true } });
    try {
      const cookie = cookieOf(await request(t.app).post('/api/auth/sign-in').send({ email: demoAccount('viewer').email, password: demoAccount('viewer').password }))!;
      expect(cookie).toMatch(/^__Host-driftline_session=/);
      const flags = cookie.split(';').map((p) => p.trim().toLowerCase());
      expect(flags).toEqual(expect.arrayContaining(['secure', 'httponly', 'samesite=lax', 'path=/']));
      expect(flags.some((f) => f.startsWith('domain='))).toBe(false);
      expect((await request(t.app).get('/api/auth/me').set('Cookie', cookie.split(';')[0])).status).toBe(200);
      const cleared = cookieOf(await request(t.app).post('/api/auth/sign-out').set('Cookie', cookie.split(';')[0]))!;
      expect(cleared).toMatch(/^__Host-driftline_session=;/);
      expect(cleared.split(';').map((p) => p.trim().toLowerCase())).toEqual(expect.arrayContaining(['secure', 'httponly']));
    } finally {
      await t.close();
    }
  });
});

describe('sign-in rate limits', () => {
  let t: TestApp;
  beforeAll(async () => {
    // Behind a proxy the address is the forwarded one, so the test can speak from several addresses.
    t = await createTestApp({ config: { trustProxy: true, signInLimits: { perAddress: 3, perAccount: 3 } } });
  });
  afterAll(() => t.close());

  const attempt = (from: string, email: string, password = 'certainly-not-it') => request(t.app).post('/api/auth/sign-in').set('X-Forwarded-For', from).send({ email, password });

  function expectLimited(res: request.Response) {
    expect(res.status).toBe(429);
    const retryAfter = Number(res.headers['retry-after']);
    expect(Number.isInteger(retryAfter)).toBe(true);
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(15 * 60);
    expect(res.body.error.code).toBe('rate_limited');
    expect(res.body.error.message).toMatch(/^Too many sign-in attempts\. Please wait \d+ minutes? and try again\.$/);
    // The sentence and the header say the same wait.
    expect(res.body.error.message).toContain(`wait ${Math.ceil(retryAfter / 60)} minute`);
  }

  it('when one address fails on several accounts, then it gets 429 with Retry-After and another address does not', async () => {
    for (const who of ['a', 'b', 'c']) expect((await attempt('203.0.113.7', `${who}@ambergate.example`)).status).toBe(401);
    expectLimited(await attempt('203.0.113.7', 'd@ambergate.example'));
    expect((await attempt('203.0.113.8', 'd@ambergate.example')).status).toBe(401);
  });

  it('when one account fails from several addresses, then it gets 429 with Retry-After, even with the right password, and other accounts do not', async () => {
    const target = demoAccount('site_manager', true);
    for (const from of ['198.51.100.1', '198.51.100.2', '198.51.100.3']) expect((await attempt(from, target.email)).status).toBe(401);
    expectLimited(await attempt('198.51.100.4', target.email));
    expectLimited(await attempt('198.51.100.5', target.email, target.password));
    expect((await attempt('198.51.100.6', demoAccount('viewer').email, demoAccount('viewer').password)).status).toBe(200);
  });
});

describe('password policy', () => {
  let t: TestApp;
  let ids: Ids;
  beforeAll(async () => {
    ({ t, ids } = await openSeeded());
  });
  afterAll(() => t.close());

  async function invite(local: string) {
    const email = `${local}@ambergate.example`;
    const { link, invitation } = await t.services.invitations.create(ids.admin, { email, name: 'Policy Test', role: 'viewer', organizationId: ids.ambergate });
    return { email, token: link.split('/').pop()!, invitationId: invitation.id };
  }

  // NIST SP 800-63B rev. 3 (Grassi et al., 2017) §5.1.1.2 asks for at least 8 characters and for
  // refusing context-specific words and repetitive or sequential characters; our minimum is 12.
  const refused: Array<[string, (email: string) => string, RegExp]> = [
    ['11 characters', () => 'eleven-char', /at least 12 characters/],
    ['129 characters', () => 'x'.repeat(64) + 'y'.repeat(65), /at most 128 characters/],
    ['the e-mail address in it', (e) => `my ${e} pass`, /must not contain your e-mail address/],
    ['the part before the @ in it', (e) => `${e.split('@')[0].toUpperCase()}-2026!`, /must not contain your e-mail address/],
    ['the product name in it', () => 'MyDriftlinePassword', /must not contain the name Driftline/],
    ['one character repeated', () => 'aaaaaaaaaaaaaaaa', /must not be a few characters repeated/],
    ['a short group repeated', () => 'abc1abc1abc1abc1', /must not be a few characters repeated/],
    ['a run of consecutive characters', () => 'abcdefghijklmn', /must not be a run of consecutive characters/],
    ['a run downwards', () => '9876543210/.-,', /must not be a run of consecutive characters/],
  ];

  for (const [label, make, message] of refused) {
    it(`when an invited person chooses a password with ${label}, then 400 names the rule and no user is created`, async () => {
      const inv = await invite(`policy-${crypto.randomUUID().slice(0, 8)}`);
      const res = await request(t.app).post(`/api/invitations/token/${inv.token}/accept`).send({ password: make(inv.email) });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(message);
      expect(await t.dataSource.getRepository(User).existsBy({ email: inv.email })).toBe(false);
      expect((await t.dataSource.getRepository(Invitation).findOneByOrFail({ id: inv.invitationId })).acceptedAt).toBeNull();
    });
  }

  it('when the password has exactly 12 or 128 characters and none of the refused patterns, then it is accepted', async () => {
    for (const password of ['tidal-moss-7', 'q'.repeat(60) + 'r'.repeat(68)]) {
      expect(password.length === 12 || password.length === 128).toBe(true);
      const inv = await invite(`edge-${crypto.randomUUID().slice(0, 8)}`);
      expect((await request(t.app).post(`/api/invitations/token/${inv.token}/accept`).send({ password })).status).toBe(200);
    }
  });

  it('when a signed-in person changes to a password holding their e-mail, then 400 and the old password still signs in', async () => {
    const person = await newPerson(t, ids, 'changer');
    const cookie = await signIn(t.app, person.email, person.password);
    const res = await request(t.app).post('/api/auth/change-password').set('Cookie', cookie).send({ currentPassword: person.password, newPassword: `${person.email}!!` });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('The new password must not contain your e-mail address or its part before the @.');
    await signIn(t.app, person.email, person.password);
  });

  it('when a reset link sets a password that repeats a few characters, then 400, the link still works and the old password still signs in', async () => {
    const person = await newPerson(t, ids, 'resetter');
    await t.services.passwordReset.request(person.email, null);
    const mail = await t.dataSource.getRepository(OutgoingMail).findOneByOrFail({ toEmail: person.email, subject: 'Reset your Driftline password' });
    const token = /\/reset\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
    const res = await request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: 'tidetidetidetide' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('The new password must not be a few characters repeated.');
    expect((await request(t.app).get(`/api/auth/password-reset/${token}`)).status).toBe(204);
    await signIn(t.app, person.email, person.password);
  });
});

describe('robot tokens', () => {
  let t: TestApp;
  let ids: Ids;
  let manager: string;
  beforeAll(async () => {
    ({ t, ids } = await openSeeded());
    manager = await signInAs(t, 'site_manager');
    await activateRoom(t, ids);
  });
  afterAll(() => t.close());

  const tokensPath = () => `/api/sites/${ids.ambergateSite}/robots/${ids.ambergateRobot}/tokens`;
  const post = (secret: string) => request(t.app).post('/api/ingest/scans').set('Authorization', `Bearer ${secret}`).set('Content-Type', 'application/x-ndjson').send(scanLine({}));

  it('when a token is created, then only its SHA-256 is stored and the secret is in no table and no later answer', async () => {
    const res = await request(t.app).post(tokensPath()).set('Cookie', manager).send({ label: 'dock controller' });
    expect(res.status).toBe(201);
    const secret = res.body.secret as string;
    expect(secret).toMatch(/^dlr_[A-Za-z0-9_-]{43}$/);
    const row = (await t.dataSource.query('SELECT * FROM robot_tokens WHERE id = ?', [res.body.token.id]))[0];
    // SHA-256 (NIST FIPS 180-4) as Node's crypto computes it, in hex.
    expect(row.token_hash).toBe(createHash('sha256').update(secret).digest('hex'));
    expect(row.prefix).toBe(secret.slice(0, 8));
    expect(await everyRow(t)).not.toContain(secret.slice(8));
    const list = await request(t.app).get(tokensPath()).set('Cookie', manager);
    expect(JSON.stringify(list.body)).not.toContain(secret.slice(8));
  });

  it('when a token is revoked, then the very next request with it gets 401 and stores nothing', async () => {
    const created = await request(t.app).post(tokensPath()).set('Cookie', manager).send({ label: 'to revoke' });
    const secret = created.body.secret as string;
    expect((await post(secret)).status).toBe(201);
    expect((await request(t.app).delete(`${tokensPath()}/${created.body.token.id}`).set('Cookie', manager)).status).toBe(204);
    const batches = await count(t, 'scan_batches');
    const refused = await post(secret);
    expect(refused.status).toBe(401);
    expect(refused.body.error).toMatchObject({ code: 'invalid_token', message: 'The robot token is unknown or revoked.' });
    expect(await count(t, 'scan_batches')).toBe(batches);
  });

  it('when a token is unknown, malformed or missing, then 401', async () => {
    expect((await post(`dlr_${'A'.repeat(43)}`)).status).toBe(401);
    expect((await request(t.app).post('/api/ingest/scans').set('Authorization', 'Basic dXNlcjpwYXNz').send(scanLine({}))).status).toBe(401);
    expect((await request(t.app).post('/api/ingest/scans').send(scanLine({}))).status).toBe(401);
  });

  it('when a robot is removed, then its tokens stop working', async () => {
    const robot = await t.services.robots.create(ids.admin, ids.ambergateSite, { name: 'SEC-TEMP', model: 'Test', mounts: [{ name: 'front', x: 0, y: 0, yaw: 0 }] });
    const { secret } = await t.services.robots.createToken(ids.admin, ids.ambergateSite, robot.id, 'temp');
    expect((await post(secret)).status).not.toBe(401);
    await t.services.robots.remove(ids.admin, ids.ambergateSite, robot.id);
    expect((await post(secret)).status).toBe(401);
  });
});

describe('upload size and type limits', () => {
  let t: TestApp;
  let ids: Ids;
  let tomas: string;
  let secret: string;
  let dataDir: string;
  beforeAll(async () => {
    dataDir = mkdtempSync(path.join(os.tmpdir(), 'driftline-security-'));
    ({ t, ids } = await openSeeded({ config: { dataDir } }));
    tomas = await signInAs(t, 'mapper');
    await activateRoom(t, ids);
    secret = (await t.services.robots.createToken(ids.admin, ids.ambergateSite, ids.ambergateRobot, 'limits')).secret;
  });
  afterAll(async () => {
    await Promise.all(t.services.ingest.pending);
    await t.close();
    rmSync(dataDir, { recursive: true, force: true });
  });

  const mapsPath = () => `/api/sites/${ids.ambergateSite}/map-versions`;

  it('when a JSON body is larger than 256 kB, then 413 with a sentence and nothing is stored', async () => {
    const before = await count(t, 'organizations');
    const res = await request(t.app).post('/api/organizations').set('Cookie', await signInAs(t, 'admin')).send({ name: 'x'.repeat(300 * 1024), timezone: 'Europe/London' });
    expect(res.status).toBe(413);
    expect(res.body.error).toMatchObject({ code: 'payload_too_large', message: 'The request body is larger than the 262144 bytes allowed.' });
    expect(await count(t, 'organizations')).toBe(before);
  });

  it('when a map image is larger than 64 MB, then 413 and no version is stored', async () => {
    const before = await count(t, 'map_versions');
    const res = await request(t.app).post(mapsPath()).set('Cookie', tomas).attach('image', Buffer.alloc(MAP_IMAGE_MAX_BYTES + 1), 'huge.pgm').attach('metadata', roomMap().yaml, 'room.yaml');
    expect(res.status).toBe(413);
    expect(res.body.error).toMatchObject({ code: 'file_too_large', message: 'The uploaded file is larger than allowed.' });
    expect(await count(t, 'map_versions')).toBe(before);
  });

  it('when a small PNG declares more pixels than a map may have, then 422 before it is unpacked and nothing is stored', async () => {
    // A real PNG (W3C PNG spec, 2nd ed. 2003: signature, IHDR, IDAT, IEND; CRCs are not checked by our reader's header test):
    // 20,001 × 1 grey pixels, one side over the 20,000 limit.
    const png = pngOf(20_001, 1);
    const before = await count(t, 'map_versions');
    const res = await request(t.app).post(mapsPath()).set('Cookie', tomas).field('resolution', '0.05').attach('image', png, 'wide.png');
    expect(res.status).toBe(422);
    expect(res.body.error.message).toBe('The PNG header says 20,001 × 1 pixels; Driftline accepts at most 20,000 pixels per side and 100,000,000 in all.');
    expect(await count(t, 'map_versions')).toBe(before);
  });

  it('when a map upload has an unexpected file field or too many files, then 400 names the problem', async () => {
    const { pgm, yaml } = roomMap();
    const res = await request(t.app).post(mapsPath()).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml').attach('extra', yaml, 'extra.yaml');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_upload');
    expect(res.body.error.message).toMatch(/^The upload was refused: .+\.$/);
  });

  it('when an uploaded scan log is a binary file, then 415, no batch and no file are left', async () => {
    const before = await count(t, 'scan_batches');
    const res = await request(t.app).post(`/api/sites/${ids.ambergateSite}/scan-batches`).set('Cookie', tomas).attach('log', pngOf(40, 40), 'drive.jsonl');
    expect(res.status).toBe(415);
    expect(res.body.error).toMatchObject({ code: 'unsupported_log_type', message: '"drive.jsonl" is not a scan log: send JSON Lines (.jsonl) or gzip-compressed JSON Lines (.jsonl.gz).' });
    expect(await count(t, 'scan_batches')).toBe(before);
    expect(readdirSync(path.join(dataDir, 'uploads'))).toEqual([]);
  });

  it('when an uploaded scan log is text or gzip, then it is accepted for counting', async () => {
    const line = scanLine({}) + '\n';
    for (const [body, name] of [[Buffer.from(line), 'drive.jsonl'], [gzipSync(line), 'drive.jsonl.gz']] as const) {
      const res = await request(t.app).post(`/api/sites/${ids.ambergateSite}/scan-batches`).set('Cookie', tomas).attach('log', body, name);
      expect(res.status).toBe(202);
    }
  });

  it('when a robot batch is over its limit as sent or once unpacked, then 413 and nothing is counted', async () => {
    const before = await count(t, 'scan_batches');
    const post = (p: string, body: Buffer) => request(t.app).post(p).set('Authorization', `Bearer ${secret}`).set('Content-Type', 'application/x-ndjson').send(body);
    const sent = await post('/api/ingest/scans', Buffer.alloc(ROBOT_BATCH_MAX_BYTES + 1, 0x20));
    expect(sent.status).toBe(413);
    expect(sent.body.error.code).toBe('payload_too_large');
    const bomb = await post('/api/ingest/scans', gzipSync(Buffer.alloc(ROBOT_BATCH_MAX_BYTES + 1, 0x20)));
    expect(bomb.status).toBe(413);
    expect(bomb.body.error.message).toBe('The batch unpacks to more than 32 MB; send smaller batches.');
    const docking = await post('/api/ingest/docking', Buffer.alloc(DOCKING_BATCH_MAX_BYTES + 1, 0x20));
    expect(docking.status).toBe(413);
    expect(await count(t, 'scan_batches')).toBe(before);
  });
});

/** A grey 8-bit PNG of width × height pixels, all black, with valid chunk CRCs (PNG spec, W3C 2003). */
function pngOf(width: number, height: number): Buffer {
  const crcTable = Array.from({ length: 256 }, (_, n) => {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    return c >>> 0;
  });
  const crc = (buf: Buffer) => {
    let c = 0xffffffff;
    for (const b of buf) c = crcTable[(c ^ b) & 0xff] ^ (c >>> 8);
    return (c ^ 0xffffffff) >>> 0;
  };
  const chunk = (type: string, data: Buffer) => {
    const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
    const out = Buffer.alloc(8 + data.length + 4);
    out.writeUInt32BE(data.length, 0);
    body.copy(out, 4);
    out.writeUInt32BE(crc(body), 8 + data.length);
    return out;
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 0; // colour type: grey
  const raw = Buffer.alloc((width + 1) * height); // filter byte 0 and zero pixels per row
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw)), chunk('IEND', Buffer.alloc(0))]);
}

describe('error bodies', () => {
  let t: TestApp;
  let admin: string;
  beforeAll(async () => {
    t = await createTestApp();
    admin = await signInAs(t, 'admin');
  });
  afterAll(() => t.close());

  /** Words that would show a stack trace, SQL or the database's own message in an answer. */
  function expectNoInternals(res: request.Response) {
    const text = res.text;
    for (const leak of [/SQLITE/i, /\bINSERT\b/, /\bSELECT\b/, /\bUPDATE\b/, /\bFROM\b/, /QueryFailedError/, /\bat \S+ \(/, /\.ts:\d+/, /\.js:\d+/, /node_modules/, /forced failure/, /URIError/, /SyntaxError/, /Unexpected token/]) {
      expect(text).not.toMatch(leak);
    }
    expect(Object.keys(res.body)).toEqual(['error']);
  }

  it('when the database refuses a write, then 500 carries one sentence, no SQL and no stack, and nothing is stored', async () => {
    await t.dataSource.query("CREATE TRIGGER refuse_orgs BEFORE INSERT ON organizations BEGIN SELECT RAISE(ABORT, 'forced failure'); END");
    try {
      const res = await request(t.app).post('/api/organizations').set('Cookie', admin).send({ name: 'Refused Holdings', timezone: 'Europe/London' });
      expect(res.status).toBe(500);
      expect(res.body.error).toMatchObject({ code: 'internal', message: 'Something went wrong on the server. It has been logged.' });
      // Besides the sentence, only the request id under which the log holds the details.
      expect(Object.keys(res.body.error).sort()).toEqual(['code', 'message', 'requestId']);
      expect(res.body.error.requestId).toBe(res.headers['x-request-id']);
      expectNoInternals(res);
      expect(await t.dataSource.getRepository(Organization).existsBy({ name: 'Refused Holdings' })).toBe(false);
    } finally {
      await t.dataSource.query('DROP TRIGGER refuse_orgs');
    }
  });

  it('when the body is not JSON, a path is badly encoded or an id is not an id, then 400 says so without internals', async () => {
    const badJson = await request(t.app).post('/api/organizations').set('Cookie', admin).set('Content-Type', 'application/json').send('{"name": "Half');
    expect(badJson.status).toBe(400);
    expect(badJson.body.error.message).toBe('The request body is not valid JSON.');
    const badEncoding = await request(t.app).get('/api/sites/%E0%A4%A').set('Cookie', admin);
    expect(badEncoding.status).toBe(400);
    const badId = await request(t.app).get("/api/sites/1'%20OR%20'1'='1").set('Cookie', admin);
    expect(badId.status).toBe(400);
    expect(badId.body.error.message).toMatch(/must be a valid id/);
    for (const res of [badJson, badEncoding, badId]) expectNoInternals(res);
  });
});

describe('path traversal on file and tile routes', () => {
  let t: TestApp;
  let ids: Ids;
  let admin: string;
  let webRoot: string;
  let mapVersionId: string;
  let remapId: string;
  let mailId: string;
  beforeAll(async () => {
    // A built app of our own: index.html and one asset inside the web folder, a secret beside it.
    webRoot = mkdtempSync(path.join(os.tmpdir(), 'driftline-web-'));
    mkdirSync(path.join(webRoot, 'web', 'assets'), { recursive: true });
    writeFileSync(path.join(webRoot, 'web', 'index.html'), '<!doctype html><title>Driftline shell</title>');
    writeFileSync(path.join(webRoot, 'web', 'assets', 'app.js'), 'console.log("driftline asset");');
    writeFileSync(path.join(webRoot, 'secret.txt'), 'outside-the-web-folder');
    ({ t, ids } = await openSeeded({ config: { webDir: path.join(webRoot, 'web') } }));
    admin = await signInAs(t, 'admin');
    mapVersionId = await activateRoom(t, ids);
    remapId = await remapAt(t, ids.ambergateSite, 'scheduled');
    mailId = await insertCapturedMail(t);
  });
  afterAll(async () => {
    await t.close();
    rmSync(webRoot, { recursive: true, force: true });
  });

  const attacks = ['..%2F..%2F..%2Fetc%2Fpasswd', '..%2F..%2Fsecret.txt', '%2Fetc%2Fpasswd', '..%5C..%5Csecret.txt', '0%00', '%2e%2e%2f%2e%2e%2fpackage.json', '%252e%252e%252fsecret.txt'];

  function expectRefused(res: request.Response) {
    expect([400, 404]).toContain(res.status);
    expect(res.body.error.message).toMatch(/\.$/);
    expect(res.text).not.toMatch(/root:|outside-the-web-folder|"devDependencies"/);
  }

  it('when tile, preview, difference and calendar routes get traversal segments, then 400 or 404 and no file', async () => {
    const base = `/api/sites/${ids.ambergateSite}`;
    for (const a of attacks) {
      for (const p of [
        `${base}/map-versions/${a}/preview.png`,
        `${base}/map-versions/${mapVersionId}/tiles/0/0/${a}.png`,
        `${base}/map-versions/${mapVersionId}/tiles/${a}/0/0.png`,
        `${base}/map-versions/${mapVersionId}/diff-tiles/0/0/0.png?against=${a}`,
        `${base}/remaps/${a}/calendar.ics`,
        `/api/outbox/${a}`,
      ]) expectRefused(await request(t.app).get(p).set('Cookie', admin));
    }
    // The same routes with good ids answer, so the refusals above are about the segments.
    expect((await request(t.app).get(`${base}/map-versions/${mapVersionId}/tiles/0/0/0.png`).set('Cookie', admin)).status).toBe(200);
    expect((await request(t.app).get(`${base}/remaps/${remapId}/calendar.ics`).set('Cookie', admin)).status).toBe(200);
  });

  it('when a mail part is asked for with a traversal or NUL, then it is refused, while a real part is served', async () => {
    for (const a of [...attacks, '..', '%00']) expectRefused(await request(t.app).get(`/api/outbox/${mailId}/parts/${a}`).set('Cookie', admin));
    const real = await request(t.app).get(`/api/outbox/${mailId}/parts/pixel`).set('Cookie', admin);
    expect(real.status).toBe(200);
    expect(real.headers['content-type']).toBe('image/png');
  });

  it('when the web app is asked for a file outside its folder, then the answer is never that file', async () => {
    expect((await request(t.app).get('/assets/app.js')).text).toContain('driftline asset');
    for (const p of ['/..%2Fsecret.txt', '/assets/..%2F..%2Fsecret.txt', '/%2e%2e/secret.txt', '/assets/%2e%2e%2f%2e%2e%2fsecret.txt', '/..%5Csecret.txt', '/secret.txt%00.js', '/%2F..%2Fsecret.txt', `/${encodeURIComponent(path.join(webRoot, 'secret.txt'))}`]) {
      const res = await request(t.app).get(p);
      expect(res.text).not.toContain('outside-the-web-folder');
      // Either a refusal, or the app's own shell for a client-side route.
      if (res.status === 200) expect(res.text).toContain('Driftline shell');
      else expect([400, 403, 404]).toContain(res.status);
    }
  });
});

describe('mass assignment', () => {
  let t: TestApp;
  let ids: Ids;
  let admin: string;
  let priya: string;
  beforeAll(async () => {
    ({ t, ids } = await openSeeded());
    admin = await signInAs(t, 'admin');
    priya = await signInAs(t, 'site_manager', true);
  });
  afterAll(() => t.close());

  const userRow = async (id: string) => (await t.dataSource.query('SELECT * FROM users WHERE id = ?', [id]))[0];

  it('when someone who is not an admin patches their own user with a role or organization, then 403 and nothing changes', async () => {
    const before = await userRow(ids.priya);
    for (const body of [{ role: 'admin' }, { organizationId: ids.admin.organizationId }, { role: 'site_manager', status: 'active' }]) {
      expect((await request(t.app).patch(`/api/users/${ids.priya}`).set('Cookie', priya).send(body)).status).toBe(403);
    }
    expect(await userRow(ids.priya)).toEqual(before);
  });

  it('when an admin patches a user with fields outside role and status, then 400 names the field and nothing changes', async () => {
    const before = await userRow(ids.priya);
    for (const [field, value] of [['organizationId', ids.admin.organizationId], ['passwordHash', '$argon2id$v=19$m=1,t=1,p=1$forged'], ['email', 'taken@kestrelway.example'], ['id', crypto.randomUUID()]] as const) {
      const res = await request(t.app).patch(`/api/users/${ids.priya}`).set('Cookie', admin).send({ status: 'active', [field]: value });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(/Unrecognized key/i);
      expect(res.body.error.message).toContain(field);
    }
    expect(await userRow(ids.priya)).toEqual(before);
  });

  it('when an admin gives a customer user an operator role, or changes their own role, then 400 and nothing changes', async () => {
    const before = await userRow(ids.priya);
    expect((await request(t.app).patch(`/api/users/${ids.priya}`).set('Cookie', admin).send({ role: 'admin' })).status).toBe(400);
    expect(await userRow(ids.priya)).toEqual(before);
    const self = await userRow(ids.admin.id);
    expect((await request(t.app).patch(`/api/users/${ids.admin.id}`).set('Cookie', admin).send({ role: 'mapper' })).status).toBe(400);
    expect(await userRow(ids.admin.id)).toEqual(self);
  });

  it('when an invitation is accepted with a role or organization in the body, then 400; accepted plainly, the invited role and organization hold', async () => {
    const email = `joiner-${crypto.randomUUID().slice(0, 8)}@ambergate.example`;
    const { link } = await t.services.invitations.create(ids.admin, { email, name: 'Joiner', role: 'viewer', organizationId: ids.ambergate });
    const url = `/api/invitations/token/${link.split('/').pop()}/accept`;
    for (const extra of [{ role: 'admin' }, { organizationId: ids.admin.organizationId }, { email: 'other@kestrelway.example' }]) {
      const res = await request(t.app).post(url).send({ password: 'slate-orchard-morning-3', ...extra });
      expect(res.status).toBe(400);
      expect(await t.dataSource.getRepository(User).existsBy({ email })).toBe(false);
    }
    expect((await request(t.app).post(url).send({ password: 'slate-orchard-morning-3' })).status).toBe(200);
    const joined = await t.dataSource.getRepository(User).findOneByOrFail({ email });
    expect({ role: joined.role, organizationId: joined.organizationId }).toEqual({ role: 'viewer', organizationId: ids.ambergate });
  });

  it('when a robot is created or patched with a site or id in the body, then 400 and it stays where it is', async () => {
    const robotsPath = `/api/sites/${ids.ambergateSite}/robots`;
    const before = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    expect((await request(t.app).patch(`${robotsPath}/${ids.ambergateRobot}`).set('Cookie', admin).send({ model: 'Moved', siteId: ids.corvaneSite })).status).toBe(400);
    expect((await request(t.app).post(robotsPath).set('Cookie', admin).send({ name: 'SEC-INTO', model: 'X', siteId: ids.corvaneSite })).status).toBe(400);
    expect((await request(t.app).post(robotsPath).set('Cookie', admin).send({ name: 'SEC-ID', model: 'X', id: ids.corvaneRobot })).status).toBe(400);
    expect(await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot })).toEqual(before);
    expect(await t.dataSource.getRepository(Robot).existsBy({ name: 'SEC-INTO' })).toBe(false);
  });
});

describe('secrets in request logs', () => {
  let t: TestApp;
  let ids: Ids;
  const lines: string[] = [];
  beforeAll(async () => {
    // The app as createTestApp builds it, but logging at info level into memory.
    const dataSource = await openDatabase({ database: ':memory:' });
    await seedDemoAccounts(dataSource, pino({ level: 'silent' }));
    const config = testConfig();
    const log = pino({ level: 'info' }, { write: (line: string) => void lines.push(line) });
    t = { ...createApp({ config, dataSource, log }), dataSource, config, close: () => dataSource.destroy() };
    ids = await demoIds(t.dataSource);
  });
  afterAll(() => t.close());

  it('when requests carry a session cookie, a robot token or a link token, then none of them reaches the log', async () => {
    const cookie = await signInAs(t, 'admin');
    await request(t.app).get('/api/auth/me').set('Cookie', cookie).expect(200);
    const { secret } = await t.services.robots.createToken(ids.admin, ids.ambergateSite, ids.ambergateRobot, 'log test');
    await request(t.app).post('/api/ingest/scans').set('Authorization', `Bearer ${secret}`).send(scanLine({}));
    const { link } = await t.services.invitations.create(ids.admin, { email: `logged-${crypto.randomUUID().slice(0, 8)}@ambergate.example`, name: 'Logged', role: 'viewer', organizationId: ids.ambergate });
    const token = link.split('/').pop()!;
    await request(t.app).get(`/api/invitations/token/${token}`).expect(200);
    await request(t.app).post(`/api/invitations/token/${token}/accept`).send({ password: 'short' }).expect(400);
    await request(t.app).get(`/invite/${token}`);
    await request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: 'short' });

    const logged = lines.join('');
    // The requests were logged, with the route shape kept for reading the log.
    expect(logged).toContain('/api/invitations/token/[redacted]/accept');
    expect(logged).toContain('/invite/[redacted]');
    for (const leak of [sessionIdOf(cookie), secret, token]) expect(logged).not.toContain(leak);
  });
});

describe('organization scoping of every site and organization route', () => {
  let t: TestApp;
  let ids: Ids;
  let priya: string;
  const params: Record<string, string> = {};
  beforeAll(async () => {
    ({ t, ids } = await openSeeded());
    // Priya manages Corvane's site; every id below belongs to Ambergate.
    priya = await signInAs(t, 'site_manager', true);
    const versionId = await activateRoom(t, ids);
    const robot = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    const { batch } = await t.services.ingest.ingestRobotBatch(robot, Buffer.from(scanLine({})), 'scoping');
    const flag = t.dataSource.getRepository(RobotFlag).create({ id: crypto.randomUUID(), robotId: robot.id, scanner: 'front', status: 'active', raisedAt: new Date(), figures: { days: [], meanAgreement: 0.8, fleetMedian: 0.97, medianZ: -6 }, mount: null });
    await t.dataSource.getRepository(RobotFlag).save(flag);
    Object.assign(params, {
      siteId: ids.ambergateSite,
      orgId: ids.ambergate,
      robotId: robot.id,
      tokenId: (await t.services.robots.createToken(ids.admin, ids.ambergateSite, robot.id, 'scoping')).token.id,
      versionId,
      batchId: batch.id,
      zoneId: await insertZone(t.dataSource, ids.ambergateSite, versionId, 7),
      flagId: flag.id,
      remapId: await remapAt(t, ids.ambergateSite, 'proposed'),
      stationId: (await t.services.docking.create(ids.admin, ids.ambergateSite, { name: 'Scoping bay' })).id,
      recipientId: (await t.services.recipients.add(ids.admin, ids.ambergate, { email: 'scoping.reader@ambergate.example' })).id,
      month: previousMonth('Europe/London', new Date()),
      z: '0',
      x: '0',
      y: '0',
    });
  });
  afterAll(async () => {
    await Promise.all(t.services.ingest.pending);
    await t.close();
  });

  // Bodies that pass validation, so that the answer comes from the scope check, not the schema.
  const bodies: Record<string, unknown> = {
    'POST /api/organizations/:orgId/recipients': { email: 'sneak.reader@corvane.example' },
    'POST /api/sites/:siteId/robots': { name: 'SNEAK-2', model: 'x', mounts: [] },
    'PATCH /api/sites/:siteId/robots/:robotId': { model: 'hijacked' },
    'POST /api/sites/:siteId/robots/:robotId/tokens': { label: 'sneak' },
    'POST /api/sites/:siteId/zones/:zoneId/acknowledge': { note: 'sneak' },
    'POST /api/sites/:siteId/robots/:robotId/flags/:flagId/clear': { note: 'sneak' },
    'POST /api/sites/:siteId/remaps/:remapId/cancel': { reason: 'sneak' },
    'POST /api/sites/:siteId/stations': { name: 'Sneak bay' },
    'PATCH /api/sites/:siteId/stations/:stationId': { name: 'Sneak bay' },
  };
  const queries: Record<string, string> = {
    'GET /api/sites/:siteId/map-versions/:versionId/diff': '?against=VERSION',
    'GET /api/sites/:siteId/map-versions/:versionId/diff-tiles/:z/:x/:y.png': '?against=VERSION',
  };
  const scoped = () => listRoutes(t.routes).filter((r) => r.includes(':siteId') || r.includes(':orgId'));

  function fill(route: string, own: Record<string, string>) {
    const [method, pattern] = route.split(' ');
    const p = pattern.replace(/:([A-Za-z]+)/g, (_m, name: string) => {
      const value = own[name] ?? params[name];
      if (value === undefined) throw new Error(`the scoping test has no id for :${name} in ${route}; add one to its params`);
      return value;
    });
    const body = route === 'POST /api/sites/:siteId/remaps' ? { zoneIds: [params.zoneId] } : bodies[route];
    return { method: method.toLowerCase() as 'get', path: p + (queries[route] ?? '').replace('VERSION', params.versionId), body };
  }
  const call = async (route: string, own: Record<string, string> = {}) => {
    const { method, path: p, body } = fill(route, own);
    const req = request(t.app)[method](p).set('Cookie', priya);
    return body === undefined ? req : req.send(body as object);
  };

  it('when a customer user calls any site or organization route with another organization\'s ids, then the answer is the one for an id that does not exist, and nothing changes', async () => {
    expect(scoped().length).toBeGreaterThan(40);
    const before = await everyRow(t);
    for (const route of scoped()) {
      const foreign = await call(route);
      const missing = await call(route, { siteId: crypto.randomUUID(), orgId: crypto.randomUUID() });
      expect(foreign.status, route).toBeGreaterThanOrEqual(400);
      expect({ status: foreign.status, code: foreign.body.error?.code }, route).toEqual({ status: missing.status, code: missing.body.error?.code });
      expect([403, 404], route).toContain(foreign.status);
    }
    expect(await everyRow(t)).toBe(before);
  });

  it('when the same customer user reads their own organization\'s site and organization routes, then they are answered', async () => {
    const own = { siteId: ids.corvaneSite, orgId: ids.corvane };
    const reads = scoped().filter((r) => r.startsWith('GET ') && !/:(?!siteId|orgId|month)[A-Za-z]+/.test(r));
    let answered = 0;
    for (const route of reads) {
      const res = await call(route, own);
      // Routes her role may not use refuse her on her own site too, by role.
      if (res.status === 403) expect(res.body.error.code, route).toBe('forbidden');
      else expect(res.status, route).toBe(200);
      if (res.status === 200) answered++;
    }
    expect(answered).toBeGreaterThan(5);
  });

  it('when a customer user lists the remap calendar or the mail queue, then no other organization\'s rows come back', async () => {
    const from = new Date(Date.now() - 30 * 86_400_000).toISOString();
    const to = new Date(Date.now() + 60 * 86_400_000).toISOString();
    const remaps = await request(t.app).get(`/api/remaps?from=${from}&to=${to}`).set('Cookie', priya);
    expect(remaps.status).toBe(200);
    expect(JSON.stringify(remaps.body)).not.toContain(ids.ambergateSite);
    await t.services.mail.enqueue({ dedupeKey: `scoping:${crypto.randomUUID()}`, kind: 'report', organizationId: ids.ambergate, to: { email: 'scoping.reader@ambergate.example', name: 'Reader' }, subject: 'Ambergate only', html: '<p>x</p>', text: 'x' });
    const mail = await request(t.app).get('/api/mail').set('Cookie', priya);
    expect(mail.status).toBe(200);
    expect(JSON.stringify(mail.body)).not.toContain('Ambergate only');
  });
});

describe('role and organization matrix coverage', () => {
  it('when the route table is walked, then every route sits directly on a router of the table, so the matrix test lists them all', async () => {
    const t = await createTestApp({ seed: false });
    try {
      for (const { path: mount, router } of t.routes) {
        // A nested router's routes would be missed by listRoutes and so escape the matrix.
        const nested = (router.stack as Array<{ route?: unknown; handle: { stack?: unknown } }>).filter((layer) => !layer.route && Array.isArray(layer.handle.stack));
        expect(nested, `nested router under /api${mount}`).toEqual([]);
      }
      const routes = listRoutes(t.routes);
      expect(new Set(routes).size).toBe(routes.length);
      expect(routes).toEqual(expect.arrayContaining(['POST /api/auth/sign-in', 'GET /api/sites/:siteId/map-versions/:versionId/tiles/:z/:x/:y.png', 'POST /api/ingest/scans']));
    } finally {
      await t.close();
    }
  });
});
