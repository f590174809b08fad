import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Recipient } from '../../server/entities/index.js';
import { readUnsubscribeToken, unsubscribeToken } from '../../server/services/recipients.service.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// Report recipients of a customer organization: kept by its site managers and admins, and an
// unsubscribe by signed link (HMAC-SHA256, RFC 2104) that works without signing in and is recorded;
// opening the link changes nothing, the one-click POST of RFC 8058 does.
describe('report recipients and unsubscribe', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let nadia: string;
  let priya: string;
  let iris: string;
  const path = (org: string, rest = '') => `/api/organizations/${org}/recipients${rest}`;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
    priya = await signIn(t.app, 'priya.manager@corvane.example', 'demo-manager-2026');
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
  });
  afterAll(() => t.close());

  it('lets the organization’s site manager add and list recipients, lower-casing the address, and refuses a second entry', async () => {
    const add = await request(t.app).post(path(ids.ambergate)).set('Cookie', nadia).send({ email: 'Shift.Lead@Ambergate.example', name: 'Shift lead' });
    expect(add.status).toBe(201);
    expect(add.body.recipient).toMatchObject({ email: 'shift.lead@ambergate.example', name: 'Shift lead', unsubscribedAt: null, createdBy: { name: 'Nadia Okonkwo-Hale' } });
    const again = await request(t.app).post(path(ids.ambergate)).set('Cookie', iris).send({ email: 'shift.lead@ambergate.example' });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already receives/);
    const list = await request(t.app).get(path(ids.ambergate)).set('Cookie', nadia);
    expect(list.body.recipients.map((r: { email: string }) => r.email)).toEqual(['shift.lead@ambergate.example']);
    expect(await t.dataSource.getRepository(AuditEvent).countBy({ action: 'recipient.add' })).toBe(1);
  });

  it('hides another organization’s list from a site manager and refuses bad input with a clear message', async () => {
    expect((await request(t.app).get(path(ids.ambergate)).set('Cookie', priya)).status).toBe(404);
    const bad = await request(t.app).post(path(ids.ambergate)).set('Cookie', nadia).send({ email: 'not an address' });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toMatch(/e-mail address/);
    // The operator organization gets no monthly report.
    const operator = await request(t.app).get(path(ids.admin.organizationId)).set('Cookie', iris);
    expect(operator.status).toBe(400);
    expect(operator.body.error.message).toMatch(/customer organizations/);
  });

  it('when the signed link is opened, then it only reads whom it names; a forged one answers 400 and changes nothing', async () => {
    const r = await t.dataSource.getRepository(Recipient).findOneByOrFail({ email: 'shift.lead@ambergate.example' });
    const link = t.services.recipients.unsubscribeLink(r.id);
    expect(link.startsWith(`${t.config.baseUrl}/unsubscribe/`)).toBe(true);
    const token = link.split('/').pop()!;
    expect(t.services.recipients.oneClickLink(r.id)).toBe(`${t.config.baseUrl}/api/unsubscribe/${token}`);
    expect(readUnsubscribeToken(t.config.sessionSecret, token)).toBe(r.id);
    // Another secret does not read it; a changed id breaks the signature.
    expect(readUnsubscribeToken('another-secret-another-secret-0123456', token)).toBeNull();
    const forged = unsubscribeToken(t.config.sessionSecret, r.id).replace(r.id, ids.ambergate);
    const forgedGet = await request(t.app).get(`/api/unsubscribe/${forged}`).set('Accept', 'application/json');
    expect(forgedGet.status).toBe(400);
    expect(forgedGet.body.error.message).toMatch(/not valid/);
    expect((await request(t.app).post(`/api/unsubscribe/${forged}`).type('form').send('List-Unsubscribe=One-Click')).status).toBe(400);
    // A link cut short in the mail client reads the same as a forged one.
    const cut = await request(t.app).get(`/api/unsubscribe/${token.slice(0, 6)}`).set('Accept', 'application/json');
    expect(cut.status).toBe(400);
    expect(cut.body.error.message).toBe('This unsubscribe link is not valid. Copy the whole link from the e-mail.');

    // Link scanners and browsers fetch the address: JSON says whom, a browser is sent to the app's page; neither unsubscribes.
    const json = await request(t.app).get(`/api/unsubscribe/${token}`).set('Accept', 'application/json');
    expect(json.body).toEqual({ email: 'shift.lead@ambergate.example', organization: 'Ambergate Provisions', unsubscribedAt: null });
    const browser = await request(t.app).get(`/api/unsubscribe/${token}`).set('Accept', 'text/html,application/xhtml+xml;q=0.9,*/*;q=0.8');
    expect(browser.status).toBe(303);
    expect(browser.headers.location).toBe(`/unsubscribe/${token}`);
    const bad = await request(t.app).post(`/api/unsubscribe/${token}`).type('form').send('List-Unsubscribe=Maybe');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/One-Click/);
    expect((await t.dataSource.getRepository(Recipient).findOneByOrFail({ id: r.id })).unsubscribedAt).toBeNull();
    expect(await t.dataSource.getRepository(AuditEvent).countBy({ action: 'recipient.unsubscribe' })).toBe(0);
  });

  it('when a mail provider POSTs the one-click body cross-site without a session, then the unsubscribe is recorded once and a second one says already', async () => {
    const r = await t.dataSource.getRepository(Recipient).findOneByOrFail({ email: 'shift.lead@ambergate.example' });
    const token = t.services.recipients.oneClickLink(r.id).split('/').pop()!;
    // The one-click POST of RFC 8058 §3.2: a form body, from another site.
    const first = await request(t.app).post(`/api/unsubscribe/${token}`).set('Sec-Fetch-Site', 'cross-site').set('Origin', 'https://mail.provider.example').type('form').send('List-Unsubscribe=One-Click');
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ email: 'shift.lead@ambergate.example', organization: 'Ambergate Provisions', already: false });
    const stored = (await t.dataSource.getRepository(Recipient).findOneByOrFail({ id: r.id })).unsubscribedAt;
    expect(stored?.toISOString()).toBe(first.body.unsubscribedAt);
    const second = await request(t.app).post(`/api/unsubscribe/${token}`).send({});
    expect(second.body).toEqual({ ...first.body, already: true });
    expect(await t.dataSource.getRepository(AuditEvent).countBy({ action: 'recipient.unsubscribe' })).toBe(1);
    expect(await t.services.recipients.active(ids.ambergate)).toEqual([]);
    const readd = await request(t.app).post(path(ids.ambergate)).set('Cookie', nadia).send({ email: 'shift.lead@ambergate.example' });
    expect(readd.status).toBe(409);
    expect(readd.body.error.message).toMatch(/unsubscribed/);
    // The exemption is this route's alone: another unsafe route from another site is still refused.
    expect((await request(t.app).post(path(ids.ambergate)).set('Cookie', nadia).set('Sec-Fetch-Site', 'cross-site').send({ email: 'x@ambergate.example' })).status).toBe(403);
    expect((await request(t.app).post(`/api/unsubscribe/${token}/more`).set('Sec-Fetch-Site', 'cross-site').send({})).status).toBe(403);
  });

  it('removes a recipient', async () => {
    const add = await request(t.app).post(path(ids.ambergate)).set('Cookie', iris).send({ email: 'night.shift@ambergate.example' });
    expect((await request(t.app).delete(path(ids.ambergate, `/${add.body.recipient.id}`)).set('Cookie', nadia)).status).toBe(204);
    expect(await t.dataSource.getRepository(Recipient).countBy({ id: add.body.recipient.id })).toBe(0);
    expect((await request(t.app).delete(path(ids.ambergate, `/${add.body.recipient.id}`)).set('Cookie', nadia)).status).toBe(404);
  });
});
