import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { User } from '../../server/entities/index.js';
import { createTestApp, demoAccount, demoIds, signIn, type TestApp } from './helpers/test-app.js';

describe('sign-in and sessions', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ config: { signInLimits: { perAddress: 1000, perAccount: 4 } } });
  });
  afterAll(() => t.close());

  it('when the password is wrong or the user unknown, then both get the same 401 answer', async () => {
    const wrong = await request(t.app).post('/api/auth/sign-in').send({ email: 'owen.viewer@ambergate.example', password: 'not-the-password' });
    const unknown = await request(t.app).post('/api/auth/sign-in').send({ email: 'nobody@ambergate.example', password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.message).toBe('The e-mail or password is not correct.');
  });

  it('when signing in, then the cookie is HttpOnly, SameSite=Lax and the session id is new each time', async () => {
    const a = demoAccount('viewer');
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: a.email.toUpperCase(), password: a.password });
    expect(res.status).toBe(200);
    const cookie = (res.headers['set-cookie'] as unknown as string[])[0];
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/);
    const again = await signIn(t.app, a.email, a.password);
    expect(again).not.toBe(cookie.split(';')[0]);
    const me = await request(t.app).get('/api/auth/me').set('Cookie', again);
    expect(me.body.user).toMatchObject({ email: a.email, role: 'viewer', organization: { name: 'Ambergate Provisions', kind: 'customer' } });
  });

  it('when a planted session cookie is sent at sign-in, then the new session gets a different id', async () => {
    const a = demoAccount('viewer');
    const res = await request(t.app).post('/api/auth/sign-in').set('Cookie', 'driftline_session=attacker-chosen-id').send({ email: a.email, password: a.password });
    expect((res.headers['set-cookie'] as unknown as string[]).join(';')).not.toContain('attacker-chosen-id');
  });

  it('when signing out, then the session no longer works', async () => {
    const a = demoAccount('mapper');
    const cookie = await signIn(t.app, a.email, a.password);
    await request(t.app).post('/api/auth/sign-out').set('Cookie', cookie).expect(204);
    expect((await request(t.app).get('/api/auth/me').set('Cookie', cookie)).status).toBe(401);
  });

  it('when many people sign in from one address, then they are not limited, but failures from it are', async () => {
    const office = await createTestApp({ config: { signInLimits: { perAddress: 3, perAccount: 1000 } } });
    try {
      for (let k = 0; k < 6; k++) await signIn(office.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
      for (const email of ['a@ambergate.example', 'b@ambergate.example', 'c@ambergate.example']) {
        expect((await request(office.app).post('/api/auth/sign-in').send({ email, password: 'not-the-password' })).status).toBe(401);
      }
      const limited = await request(office.app).post('/api/auth/sign-in').send({ email: 'owen.viewer@ambergate.example', password: 'demo-viewer-2026' });
      expect(limited.status).toBe(429);
    } finally {
      await office.close();
    }
  });

  it('when one account fails too often, then further attempts get 429 with a readable message', async () => {
    const attempt = () => request(t.app).post('/api/auth/sign-in').send({ email: 'priya.manager@corvane.example', password: 'wrong-wrong-wrong' });
    for (let k = 0; k < 4; k++) expect((await attempt()).status).toBe(401);
    const limited = await attempt();
    expect(limited.status).toBe(429);
    expect(limited.body.error.message).toMatch(/Too many sign-in attempts/);
    // The right password is refused too while the account is limited.
    const right = await request(t.app).post('/api/auth/sign-in').send({ email: 'priya.manager@corvane.example', password: 'demo-manager-2026' });
    expect(right.status).toBe(429);
  });

  it('when the new password is too short, then 400 names the rule and the old password still works', async () => {
    const a = demoAccount('admin');
    const cookie = await signIn(t.app, a.email, a.password);
    const res = await request(t.app).post('/api/auth/change-password').set('Cookie', cookie).send({ currentPassword: a.password, newPassword: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/at least 12 characters/);
    await signIn(t.app, a.email, a.password);
  });

  it('when a password is stored, then it is an Argon2id hash with the OWASP parameters', async () => {
    const user = await t.dataSource.getRepository(User).findOneByOrFail({ email: 'iris.admin@kestrelway.example' });
    // PHC string format; OWASP Password Storage Cheat Sheet: Argon2id, m=19456 KiB, t=2, p=1.
    expect(user.passwordHash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
  });

  it('when an admin is disabled by another admin, then their open session stops working', async () => {
    const ids = await demoIds(t.dataSource);
    const tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    const iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
    const mapper = await t.dataSource.getRepository(User).findOneByOrFail({ email: 'tomas.mapper@kestrelway.example' });
    await request(t.app).patch(`/api/users/${mapper.id}`).set('Cookie', iris).send({ status: 'disabled' }).expect(200);
    expect((await request(t.app).get('/api/auth/me').set('Cookie', tomas)).status).toBe(401);
    // Admins cannot lock themselves out.
    const self = await request(t.app).patch(`/api/users/${ids.admin.id}`).set('Cookie', iris).send({ role: 'mapper' });
    expect(self.status).toBe(400);
  });
});

describe('invitations', () => {
  let t: TestApp;
  let iris: string;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
  });
  afterAll(() => t.close());

  it('when an admin invites someone and they accept, then they can sign in with the role given', async () => {
    const res = await request(t.app).post('/api/invitations').set('Cookie', iris).send({ email: 'lena.new@ambergate.example', name: 'Lena New', role: 'viewer', organizationId: ids.ambergate });
    expect(res.status).toBe(201);
    expect(res.body.link).toMatch(/^http:\/\/127\.0\.0\.1:3000\/invite\/[A-Za-z0-9_-]{43}$/);
    const token = res.body.link.split('/').pop();
    expect((await request(t.app).get(`/api/invitations/token/${token}`)).body).toMatchObject({ email: 'lena.new@ambergate.example', role: 'viewer', organization: { name: 'Ambergate Provisions' } });
    const accepted = await request(t.app).post(`/api/invitations/token/${token}/accept`).send({ password: 'lenas-long-password' });
    expect(accepted.status).toBe(200);
    await signIn(t.app, 'lena.new@ambergate.example', 'lenas-long-password');
    // The link works once only.
    expect((await request(t.app).post(`/api/invitations/token/${token}/accept`).send({ password: 'lenas-long-password' })).status).toBe(404);
  });

  it('when the role does not fit the organization, then 400 and no invitation is stored', async () => {
    const before = (await request(t.app).get('/api/invitations').set('Cookie', iris)).body.invitations.length;
    const res = await request(t.app).post('/api/invitations').set('Cookie', iris).send({ email: 'x@ambergate.example', name: 'X', role: 'mapper', organizationId: ids.ambergate });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/does not fit/);
    expect((await request(t.app).get('/api/invitations').set('Cookie', iris)).body.invitations.length).toBe(before);
  });
});
