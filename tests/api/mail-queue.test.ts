import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { OutgoingMail } from '../../server/entities/index.js';
import type { MailTransport, OutgoingMessage } from '../../server/mail/transport.js';
import { MAIL_ATTEMPTS, retryDelayMs } from '../../server/services/mail.service.js';
import { createTestApp, type TestApp } from './helpers/test-app.js';

const input = (key: string) => ({
  dedupeKey: key,
  kind: 'invitation' as const,
  to: { email: 'Nell.Reader@Ambergate.example', name: 'Nell Reader' },
  subject: 'Queue check',
  html: '<p>Hello</p>',
  text: 'Hello',
  attachments: [{ filename: 'note.txt', contentType: 'text/plain', content: Buffer.from('a note') }],
});

/** Records what it was given; fails while `failing` is set; can hold each send until released. */
function recordingTransport() {
  const sent: OutgoingMessage[] = [];
  const t = {
    sent,
    failing: null as string | null,
    async send(m: OutgoingMessage) {
      // A real SMTP round trip takes time: let a concurrent run interleave here.
      await new Promise((r) => setTimeout(r, 20));
      if (t.failing) throw new Error(t.failing);
      sent.push(m);
    },
  } satisfies MailTransport & Record<string, unknown>;
  return t;
}

describe('mail queue', () => {
  let t: TestApp;
  beforeEach(async () => {
    t = await createTestApp({ seed: false });
  });
  afterEach(() => t.close());

  it('when the same dedupe key is queued twice, then one row exists and the second call reports created=false', async () => {
    const a = await t.services.mail.enqueue(input('k:1'));
    const b = await t.services.mail.enqueue({ ...input('k:1'), subject: 'Different' });
    expect(a.created).toBe(true);
    expect(b.created).toBe(false);
    expect(b.mail.id).toBe(a.mail.id);
    expect(b.mail.subject).toBe('Queue check');
    expect(await t.dataSource.getRepository(OutgoingMail).count()).toBe(1);
    expect(a.mail.toEmail).toBe('nell.reader@ambergate.example');
    expect(a.mail.attachments[0]).toEqual({ filename: 'note.txt', contentType: 'text/plain', contentBase64: Buffer.from('a note').toString('base64') });
  });

  it('when two delivery runs start at once, then each due mail is sent exactly once', async () => {
    const transport = recordingTransport();
    t.services.mail.useTransport(transport);
    for (let i = 0; i < 5; i++) await t.services.mail.enqueue(input(`k:${i}`));
    const now = new Date(Date.now() + 1000);
    const [r1, r2] = await Promise.all([t.services.mail.deliverDue(now), t.services.mail.deliverDue(now)]);
    expect(r1.sent + r2.sent).toBe(5);
    expect(transport.sent.map((m) => m.subject)).toHaveLength(5);
    expect(new Set(transport.sent.map((m) => m.messageId)).size).toBe(5);
    const rows = await t.dataSource.getRepository(OutgoingMail).find();
    expect(rows.every((r) => r.status === 'sent' && r.attempts === 1 && r.sentAt)).toBe(true);
    // Nothing left: a third run sends nothing.
    expect((await t.services.mail.deliverDue(now)).sent).toBe(0);
  });

  it('when the transport keeps failing, then retries wait 1, 5, 25, 125 minutes and the mail fails after the last attempt with the error', async () => {
    const transport = recordingTransport();
    transport.failing = 'connect ECONNREFUSED 127.0.0.1:2525';
    t.services.mail.useTransport(transport);
    const { mail } = await t.services.mail.enqueue(input('k:retry'));
    const repo = t.dataSource.getRepository(OutgoingMail);
    let now = new Date(mail.nextAttemptAt.getTime() + 1);
    const waits: number[] = [];
    for (let attempt = 1; attempt <= MAIL_ATTEMPTS; attempt++) {
      const result = await t.services.mail.deliverDue(now);
      const row = await repo.findOneByOrFail({ id: mail.id });
      expect(row.attempts).toBe(attempt);
      expect(row.lastError).toBe('connect ECONNREFUSED 127.0.0.1:2525');
      if (attempt < MAIL_ATTEMPTS) {
        expect(result.retried).toBe(1);
        expect(row.status).toBe('queued');
        const wait = row.nextAttemptAt.getTime() - now.getTime();
        waits.push(wait);
        // Not due a moment before the wait is over.
        expect((await t.services.mail.deliverDue(new Date(now.getTime() + wait - 1000))).retried).toBe(0);
        now = new Date(now.getTime() + wait);
      } else {
        expect(result.failed).toBe(1);
        expect(row.status).toBe('failed');
      }
    }
    expect(waits).toEqual([1, 5, 25, 125].map((min) => min * 60_000));
    expect(waits).toEqual([1, 2, 3, 4].map(retryDelayMs));
    // A failed mail is never picked up again.
    expect((await t.services.mail.deliverDue(new Date(now.getTime() + 86_400_000))).failed).toBe(0);
    expect(transport.sent).toHaveLength(0);
  });

  it('when a transport fails once and then works, then the retry sends the same Message-ID', async () => {
    const transport = recordingTransport();
    transport.failing = '421 try again later';
    t.services.mail.useTransport(transport);
    const { mail } = await t.services.mail.enqueue(input('k:once'));
    const first = new Date(Date.now() + 1000);
    await t.services.mail.deliverDue(first);
    transport.failing = null;
    await t.services.mail.deliverDue(new Date(first.getTime() + retryDelayMs(1)));
    expect(transport.sent.map((m) => m.messageId)).toEqual([mail.messageId]);
    const row = await t.dataSource.getRepository(OutgoingMail).findOneByOrFail({ id: mail.id });
    expect([row.status, row.attempts, row.lastError]).toEqual(['sent', 2, null]);
  });

  it('when a row was left sending by a crash more than 10 minutes ago, then the next run queues and sends it', async () => {
    const transport = recordingTransport();
    t.services.mail.useTransport(transport);
    const { mail } = await t.services.mail.enqueue(input('k:crash'));
    const repo = t.dataSource.getRepository(OutgoingMail);
    const claimedAt = new Date(Date.now() - 11 * 60_000);
    await repo.update(mail.id, { status: 'sending', claimedAt, attempts: 1 });
    expect((await t.services.mail.deliverDue(new Date(claimedAt.getTime() + 5 * 60_000))).sent).toBe(0);
    expect((await t.services.mail.deliverDue(new Date())).sent).toBe(1);
    expect((await repo.findOneByOrFail({ id: mail.id })).attempts).toBe(2);
  });
});
