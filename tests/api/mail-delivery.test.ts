import { simpleParser } from 'mailparser';
import pino from 'pino';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CapturedMail, OutgoingMail } from '../../server/entities/index.js';
import { startMailCapture, type MailCapture } from '../../server/mail/capture.js';
import { smtpTransport } from '../../server/mail/transport.js';
import { insertCapturedMail, TINY_PNG } from './helpers/mail-fixtures.js';
import { createTestApp, demoAccount, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// Parsing of the delivered messages: mailparser@3.14.2 (simpleParser), the same parser the outbox uses.
describe('mail through SMTP into the capture server', () => {
  let t: TestApp;
  let capture: MailCapture;
  let admin: string;
  let ids: Awaited<ReturnType<typeof demoIds>>;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    capture = await startMailCapture(t.dataSource, 0, pino({ level: 'silent' }));
    t.services.mail.useTransport(smtpTransport({ ...t.config.smtp, host: null, port: capture.port }));
    admin = await signIn(t.app, demoAccount('admin').email, demoAccount('admin').password);
  });
  afterAll(async () => {
    await capture.close();
    await t.close();
  });

  it('when an admin invites someone, then the invitation mail with the same link arrives through SMTP and shows in the outbox', async () => {
    const res = await request(t.app).post('/api/invitations').set('Cookie', admin).send({ email: 'Tamsin.Reader@Ambergate.example', name: 'Tamsin Reader', role: 'viewer', organizationId: ids.ambergate });
    expect(res.status).toBe(201);
    const link: string = res.body.link;
    const queued = await t.dataSource.getRepository(OutgoingMail).findOneByOrFail({ dedupeKey: `invitation:${res.body.invitation.id}` });
    expect(queued.status).toBe('queued');
    expect((await t.services.mail.deliverDue(new Date(Date.now() + 1000))).sent).toBe(1);

    const [captured] = await t.dataSource.getRepository(CapturedMail).find();
    expect(captured.envelopeTo).toEqual(['tamsin.reader@ambergate.example']);
    // mailparser@3.14.2: headers, both bodies.
    const parsed = await simpleParser(captured.raw);
    expect(parsed.subject).toBe('You are invited to Ambergate Provisions on Driftline');
    expect(parsed.messageId).toBe(queued.messageId);
    expect(parsed.text).toContain(link);
    expect(parsed.text).toContain('does not certify anything');
    expect(parsed.html).toContain(`href="${link}"`);
    expect(parsed.html).toContain('Tamsin Reader');

    const list = await request(t.app).get('/api/outbox').set('Cookie', admin);
    expect(list.status).toBe(200);
    expect(list.body.messages[0]).toMatchObject({ id: captured.id, subject: parsed.subject, to: ['tamsin.reader@ambergate.example'] });
    const one = await request(t.app).get(`/api/outbox/${captured.id}`).set('Cookie', admin);
    expect(one.body.message.text).toContain(link);

    const deliveries = await request(t.app).get('/api/mail?status=sent').set('Cookie', admin);
    expect(deliveries.body.mail.map((m: { id: string }) => m.id)).toContain(queued.id);
  });

  it('when the same message is delivered twice (a lost reply), then the capture stores it once', async () => {
    const { mail } = await t.services.mail.enqueue({ dedupeKey: 'twice', kind: 'invitation', to: { email: 'dup@ambergate.example' }, subject: 'Twice', html: '<p>x</p>', text: 'x' });
    const before = await t.dataSource.getRepository(CapturedMail).count();
    await t.services.mail.deliverDue(new Date(Date.now() + 1000));
    // Simulate the retry after a crash at the handshake: the same row, the same Message-ID, sent again.
    await t.dataSource.getRepository(OutgoingMail).update(mail.id, { status: 'queued' });
    await t.services.mail.deliverDue(new Date(Date.now() + 1000));
    expect(await t.dataSource.getRepository(CapturedMail).count()).toBe(before + 1);
  });

  it('when a message has a cid image and an attachment, then the outbox rewrites the image to the parts route and serves both parts', async () => {
    const id = await insertCapturedMail(t, 'With parts');
    const res = await request(t.app).get(`/api/outbox/${id}`).set('Cookie', admin);
    expect(res.body.message.html).toContain(`src="/api/outbox/${id}/parts/pixel"`);
    expect(res.body.message.attachments.map((a: { id: string; contentType: string }) => [a.id, a.contentType])).toEqual([['pixel', 'image/png'], ['part-2', 'text/plain']]);
    const image = await request(t.app).get(`/api/outbox/${id}/parts/pixel`).set('Cookie', admin).buffer(true);
    expect(image.headers['content-type']).toBe('image/png');
    expect(Buffer.compare(image.body as Buffer, TINY_PNG)).toBe(0);
    const note = await request(t.app).get(`/api/outbox/${id}/parts/part-2`).set('Cookie', admin);
    expect(note.text).toBe('a note');
    expect(note.headers['content-disposition']).toContain('attachment');
    expect((await request(t.app).get(`/api/outbox/${id}/parts/nothing`).set('Cookie', admin)).status).toBe(404);
    expect((await request(t.app).get('/api/outbox/not-an-id').set('Cookie', admin)).status).toBe(400);
  });
});
