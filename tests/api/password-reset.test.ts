import { simpleParser } from 'mailparser';
import pino from 'pino';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/password.js';
import { AuditEvent, CapturedMail, Organization, OutgoingMail, PasswordResetToken, User } from '../../server/entities/index.js';
import { startMailCapture, type MailCapture } from '../../server/mail/capture.js';
import { smtpTransport } from '../../server/mail/transport.js';
import { RESET_REQUESTS_PER_ADDRESS } from '../../server/routes/password-reset.routes.js';
import { newId, sha256 } from '../../server/services/ids.js';
import { RESET_LINK_MS, RESET_REQUESTS_PER_HOUR } from '../../server/services/password-reset.service.js';
import { createTestApp, signIn, type TestApp } from './helpers/test-app.js';

const OLD_PASSWORD = 'lantern-quay-harbour-1';
const NEW_PASSWORD = 'copper-kettle-morning-7';
const GONE = 'This reset link is not valid or has expired. Ask for a new one from the sign-in page.';

let people = 0;
/** A new active user of Ambergate Provisions with OLD_PASSWORD, so that no demo account's password changes. */
async function newPerson(t: TestApp, status: 'active' | 'disabled' = 'active') {
  const org = await t.dataSource.getRepository(Organization).findOneByOrFail({ name: 'Ambergate Provisions' });
  const user = t.dataSource.getRepository(User).create({
    id: newId(),
    email: `reset.person${++people}@ambergate.example`,
    name: `Reset Person ${people}`,
    role: 'viewer',
    organizationId: org.id,
    passwordHash: await hashPassword(OLD_PASSWORD),
    status,
  });
  return t.dataSource.getRepository(User).save(user);
}

/** Asks for a reset link through the API and waits for the request's work behind the 202. */
async function ask(t: TestApp, email: string) {
  const res = await request(t.app).post('/api/auth/password-reset').send({ email });
  await t.services.passwordReset.settled();
  return res;
}

const resetMails = (t: TestApp, email: string) =>
  t.dataSource.getRepository(OutgoingMail).find({ where: { toEmail: email, subject: 'Reset your Driftline password' }, order: { createdAt: 'ASC' } });

/** The token in the newest reset mail to `email`. */
async function tokenFor(t: TestApp, email: string): Promise<string> {
  const mails = await resetMails(t, email);
  const match = /\/reset\/([A-Za-z0-9_-]+)/.exec(mails.at(-1)?.text ?? '');
  if (!match) throw new Error(`no reset link in a mail to ${email}`);
  return match[1];
}

const passwordHashOf = async (t: TestApp, id: string) => (await t.dataSource.getRepository(User).findOneByOrFail({ id })).passwordHash;

describe('password reset by e-mail', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp();
  });
  afterAll(() => t.close());

  it('when an active user asks, then 202 and one mail to them with a one-hour link, whose token is stored only as its hash', async () => {
    const person = await newPerson(t);
    const before = Date.now();
    const res = await ask(t, person.email.toUpperCase());
    expect(res.status).toBe(202);
    expect(res.body.message).toBe('If an account exists for that address, we have sent a link to reset its password. It works for one hour.');

    const [mail] = await resetMails(t, person.email);
    expect(mail).toMatchObject({ kind: 'password_reset', toName: person.name, organizationId: person.organizationId, status: 'queued' });
    const token = await tokenFor(t, person.email);
    expect(mail.text).toContain(`${t.config.baseUrl}/reset/${token}`);
    expect(mail.html).toContain(`href="${t.config.baseUrl}/reset/${token}"`);
    expect(mail.text).toContain('The link works once, for one hour');
    expect(mail.text).toContain("If such mails keep coming, tell your organization's contact at Kestrelway Fleet Services.");
    expect(Buffer.from(token, 'base64url')).toHaveLength(32);

    const [row] = await t.dataSource.getRepository(PasswordResetToken).findBy({ userId: person.id });
    expect(row.tokenHash).toBe(sha256(token));
    expect(JSON.stringify(row)).not.toContain(token);
    expect(row.usedAt).toBeNull();
    expect(row.requestedFrom).toMatch(/127\.0\.0\.1/);
    // One hour from the request, within the time the request took.
    expect(row.expiresAt.getTime()).toBeGreaterThanOrEqual(before + RESET_LINK_MS - 1000);
    expect(row.expiresAt.getTime()).toBeLessThanOrEqual(Date.now() + RESET_LINK_MS + 1000);
  });

  it('when the address has no account or a disabled one, then the same 202 answer and no mail', async () => {
    const disabled = await newPerson(t, 'disabled');
    const known = await ask(t, (await newPerson(t)).email);
    const unknown = await ask(t, 'nobody.here@ambergate.example');
    const off = await ask(t, disabled.email);
    expect([unknown.status, off.status]).toEqual([202, 202]);
    expect(unknown.body).toEqual(known.body);
    expect(off.body).toEqual(known.body);
    expect(await resetMails(t, 'nobody.here@ambergate.example')).toHaveLength(0);
    expect(await resetMails(t, disabled.email)).toHaveLength(0);
    expect(await t.dataSource.getRepository(PasswordResetToken).countBy({ userId: disabled.id })).toBe(0);
  });

  it('when the body is not an e-mail address, then 400 with a readable sentence and nothing is stored', async () => {
    const tokens = await t.dataSource.getRepository(PasswordResetToken).count();
    const mails = await t.dataSource.getRepository(OutgoingMail).count();
    for (const body of [{ email: 'not-an-address' }, {}, { email: 'a@b.example', extra: 1 }]) {
      const res = await request(t.app).post('/api/auth/password-reset').send(body);
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(/^The request body is not valid: /);
    }
    await t.services.passwordReset.settled();
    expect(await t.dataSource.getRepository(PasswordResetToken).count()).toBe(tokens);
    expect(await t.dataSource.getRepository(OutgoingMail).count()).toBe(mails);
  });

  it('when the link is used, then the new password signs in, the old one does not, and a second use answers 400', async () => {
    const person = await newPerson(t);
    await ask(t, person.email);
    const token = await tokenFor(t, person.email);
    expect((await request(t.app).get(`/api/auth/password-reset/${token}`)).status).toBe(204);

    expect((await request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: NEW_PASSWORD })).status).toBe(204);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: person.email, password: OLD_PASSWORD })).status).toBe(401);
    await signIn(t.app, person.email, NEW_PASSWORD);

    const again = await request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: 'another-long-password-9' });
    expect(again.status).toBe(400);
    expect(again.body.error).toMatchObject({ code: 'reset_link_invalid', message: GONE });
    const check = await request(t.app).get(`/api/auth/password-reset/${token}`);
    expect(check.status).toBe(400);
    expect(check.body.error.message).toBe(GONE);
    await signIn(t.app, person.email, NEW_PASSWORD);

    const audit = await t.dataSource.getRepository(AuditEvent).findOneByOrFail({ action: 'user.password_reset', targetId: person.id });
    expect(audit.actorId).toBe(person.id);
    const notice = await t.dataSource.getRepository(OutgoingMail).findOneByOrFail({ toEmail: person.email, subject: 'Your Driftline password was changed' });
    expect(notice.text).toContain('Every device that was signed in has been signed out.');
    expect(notice.text).not.toContain(token);
  });

  it('when the password is reset, then every session the account had is signed out', async () => {
    const person = await newPerson(t);
    const laptop = await signIn(t.app, person.email, OLD_PASSWORD);
    const tablet = await signIn(t.app, person.email, OLD_PASSWORD);
    expect((await request(t.app).get('/api/auth/me').set('Cookie', laptop)).status).toBe(200);
    await ask(t, person.email);
    await request(t.app).post(`/api/auth/password-reset/${await tokenFor(t, person.email)}`).send({ password: NEW_PASSWORD }).expect(204);
    expect((await request(t.app).get('/api/auth/me').set('Cookie', laptop)).status).toBe(401);
    expect((await request(t.app).get('/api/auth/me').set('Cookie', tablet)).status).toBe(401);
  });

  it('when the new password is too short, then 400 names the rule and nothing changes: old password, sessions and link still work', async () => {
    const person = await newPerson(t);
    const cookie = await signIn(t.app, person.email, OLD_PASSWORD);
    await ask(t, person.email);
    const token = await tokenFor(t, person.email);
    const hash = await passwordHashOf(t, person.id);

    const res = await request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: 'short-one' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/at least 12 characters/);
    expect(await passwordHashOf(t, person.id)).toBe(hash);
    expect((await request(t.app).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200);
    expect((await t.dataSource.getRepository(PasswordResetToken).findOneByOrFail({ tokenHash: sha256(token) })).usedAt).toBeNull();
    expect((await request(t.app).get(`/api/auth/password-reset/${token}`)).status).toBe(204);
    await signIn(t.app, person.email, OLD_PASSWORD);
  });

  it('when the link is past its hour, then checking and using it answer 400 and the password stays', async () => {
    const person = await newPerson(t);
    await ask(t, person.email);
    const token = await tokenFor(t, person.email);
    await t.dataSource.getRepository(PasswordResetToken).update({ tokenHash: sha256(token) }, { expiresAt: new Date(Date.now() - 1000) });
    const hash = await passwordHashOf(t, person.id);

    expect((await request(t.app).get(`/api/auth/password-reset/${token}`)).body.error.message).toBe(GONE);
    const res = await request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: NEW_PASSWORD });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe(GONE);
    expect(await passwordHashOf(t, person.id)).toBe(hash);
  });

  it('when the link is unknown or mangled, then 400 with the same sentence', async () => {
    for (const token of ['x'.repeat(43), 'short', encodeURIComponent('a b/c')]) {
      const res = await request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: NEW_PASSWORD });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toBe(GONE);
    }
  });

  it('when someone asks again, then only the newest link works', async () => {
    const person = await newPerson(t);
    await ask(t, person.email);
    const first = await tokenFor(t, person.email);
    await ask(t, person.email);
    const second = await tokenFor(t, person.email);
    expect(second).not.toBe(first);
    expect((await request(t.app).get(`/api/auth/password-reset/${first}`)).status).toBe(400);
    expect((await request(t.app).get(`/api/auth/password-reset/${second}`)).status).toBe(204);
  });

  it('when two requests use one link at the same time, then exactly one sets its password', async () => {
    const person = await newPerson(t);
    await ask(t, person.email);
    const token = await tokenFor(t, person.email);
    const [a, b] = await Promise.all([
      request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: 'first-racer-password-1' }),
      request(t.app).post(`/api/auth/password-reset/${token}`).send({ password: 'second-racer-password-2' }),
    ]);
    expect([a.status, b.status].sort()).toEqual([204, 400]);
    const winner = a.status === 204 ? 'first-racer-password-1' : 'second-racer-password-2';
    await signIn(t.app, person.email, winner);
    expect(await t.dataSource.getRepository(AuditEvent).countBy({ action: 'user.password_reset', targetId: person.id })).toBe(1);
  });

  it('when one account asks more than three times in an hour, then the extra requests get the same 202 but send no mail', async () => {
    const person = await newPerson(t);
    for (let k = 0; k < RESET_REQUESTS_PER_HOUR + 2; k++) expect((await ask(t, person.email)).status).toBe(202);
    expect(await resetMails(t, person.email)).toHaveLength(RESET_REQUESTS_PER_HOUR);
    // An hour later the account may ask again.
    expect(await t.services.passwordReset.request(person.email, null, new Date(Date.now() + RESET_LINK_MS + 1000))).toBe(true);
    expect(await resetMails(t, person.email)).toHaveLength(RESET_REQUESTS_PER_HOUR + 1);
  });

  it('when one address sends too many requests, then it gets 429 with a readable message', async () => {
    const office = await createTestApp();
    try {
      for (let k = 0; k < RESET_REQUESTS_PER_ADDRESS; k++) {
        expect((await request(office.app).post('/api/auth/password-reset').send({ email: `someone${k}@ambergate.example` })).status).toBe(202);
      }
      const limited = await request(office.app).post('/api/auth/password-reset').send({ email: 'someone@ambergate.example' });
      expect(limited.status).toBe(429);
      expect(limited.body.error.message).toBe('Too many password reset requests from this address. Please wait up to 15 minutes and try again.');
      // express-rate-limit@8.7.5 sets Retry-After (RFC 9110 §10.2.3) in seconds on the refusal.
      expect(Number(limited.headers['retry-after'])).toBeGreaterThan(0);
      expect(Number(limited.headers['retry-after'])).toBeLessThanOrEqual(15 * 60);
      await office.services.passwordReset.settled();
    } finally {
      await office.close();
    }
  });
});

// Parsing of the delivered message: mailparser@3.14.2 (simpleParser), as in mail-delivery.test.ts.
describe('password reset mail through SMTP', () => {
  let t: TestApp;
  let capture: MailCapture;
  beforeAll(async () => {
    t = await createTestApp();
    capture = await startMailCapture(t.dataSource, 0, pino({ level: 'silent' }));
    t.services.mail.useTransport(smtpTransport({ ...t.config.smtp, host: null, port: capture.port }));
  });
  afterAll(async () => {
    await capture.close();
    await t.close();
  });

  it('when a reset is asked for, then the delivered mail carries the working link in both parts and the caution', async () => {
    const person = await newPerson(t);
    await ask(t, person.email);
    expect((await t.services.mail.deliverDue(new Date(Date.now() + 1000))).sent).toBe(1);
    const [captured] = await t.dataSource.getRepository(CapturedMail).find();
    expect(captured.envelopeTo).toEqual([person.email]);
    const parsed = await simpleParser(captured.raw);
    expect(parsed.subject).toBe('Reset your Driftline password');
    const link = /http:\/\/127\.0\.0\.1:3000\/reset\/[A-Za-z0-9_-]{43}/.exec(parsed.text ?? '')?.[0];
    expect(link).toBeDefined();
    expect(parsed.html).toContain(`href="${link}"`);
    expect(parsed.text).toContain('does not certify anything');
    const token = link!.split('/').pop()!;
    expect((await request(t.app).get(`/api/auth/password-reset/${token}`)).status).toBe(204);
  });
});
