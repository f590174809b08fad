import { simpleParser, type ParsedMail } from 'mailparser';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { DailyStat, Organization, Recipient, Robot, Site } from '../../server/entities/index.js';
import { newId } from '../../server/services/ids.js';
import { reportJob } from '../../jobs/report.job.js';
import { insertZone, roomMap } from './helpers/fixtures.js';
import { actorByEmail, ADMIN_EMAIL } from './helpers/remap-fixtures.js';
import { startSmtpCapture, type ReceivedMessage } from './helpers/smtp-capture.js';
import { createTestApp, signIn, type TestApp } from './helpers/test-app.js';

// The monthly report end to end over real SMTP: the app's mail queue delivers to an SMTP server the
// test runs on a free 127.0.0.1 port (smtp-server@3.21.6), and each received message is parsed with
// mailparser@3.14.2 (simpleParser, keepCidLinks so cid: references stay as sent) and checked against the database.
const NOW = new Date('2026-12-02T09:00:00Z');

describe('monthly report over SMTP', () => {
  let t: TestApp;
  let smtp: Awaited<ReturnType<typeof startSmtpCapture>>;
  let received: ReceivedMessage[];
  let orgId: string;
  let siteId: string;

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    smtp = await startSmtpCapture();
    received = smtp.received;
    const port = smtp.port;
    t = await createTestApp({ config: { smtp: { host: null, port, secure: false, from: 'Driftline <driftline@localhost>' } } });
    orgId = newId();
    siteId = newId();
    await t.dataSource.getRepository(Organization).insert({ id: orgId, name: 'Pellworth Grocers', kind: 'customer', timezone: 'Europe/London' });
    await t.dataSource.getRepository(Site).insert({ id: siteId, name: 'Pellworth Yard', city: 'Harlow Mead', timezone: 'Europe/London', organizationId: orgId, settings: {} });
    const tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    const { pgm, yaml } = roomMap();
    const up = await request(t.app).post(`/api/sites/${siteId}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml');
    await request(t.app).post(`/api/sites/${siteId}/map-versions/${up.body.mapVersion.id}/activate`).set('Cookie', tomas);
    await insertZone(t.dataSource, siteId, up.body.mapVersion.id, 1);
    await t.dataSource.query(`UPDATE zones SET created_at = '2026-11-10 08:00:00' WHERE site_id = ?`, [siteId]);
    const robot = newId();
    await t.dataSource.getRepository(Robot).insert({ id: robot, siteId, name: 'AMR-31', model: 'Palletmole PM-1 lifter', mounts: [] });
    await t.dataSource.getRepository(DailyStat).insert({ siteId, robotId: robot, scanner: 'front', day: '2026-11-03', mapVersionId: up.body.mapVersion.id, scans: 5, beams: 4000, returns: 4000, explained: 3652, outOfMap: 0 });
    const admin = await actorByEmail(t, ADMIN_EMAIL);
    await t.services.recipients.add(admin, orgId, { email: 'ops@pellworth.example', name: 'Operations' });
    await t.services.recipients.add(admin, orgId, { email: 'quality@pellworth.example' });
  });

  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
    await smtp.close();
  });

  const deliver = async (count: number) => {
    await t.services.mail.deliverDue(new Date());
    for (let k = 0; k < 100 && received.length < count; k++) await new Promise((r) => setTimeout(r, 20));
  };

  it('delivers one message per recipient with the figures, the inline map, the text part and a working unsubscribe link', async () => {
    const iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
    expect((await request(t.app).post(`/api/organizations/${orgId}/reports/2026-11/send`).set('Cookie', iris).send({})).status).toBe(200);
    await deliver(2);
    expect(received.map((r) => r.to[0]).sort()).toEqual(['ops@pellworth.example', 'quality@pellworth.example']);
    const parsed: ParsedMail[] = await Promise.all(received.map((r) => simpleParser(r.raw, { keepCidLinks: true })));
    const ops = parsed.find((p) => JSON.stringify(p.to).includes('ops@pellworth.example'))!;
    expect(ops.subject).toBe('Map health in November 2026 · Pellworth Grocers');
    const [row] = await t.dataSource.query(`SELECT SUM(explained) AS e, SUM(returns) AS r FROM daily_stats WHERE site_id = ? AND day LIKE '2026-11-%'`, [siteId]);
    const score = ((100 * row.e) / row.r).toFixed(1);
    expect(ops.html).toContain(`${score} %`);
    expect(ops.text).toContain(`Health score: ${score} %`);
    const image = ops.attachments.find((a) => a.contentType === 'image/png')!;
    expect(image.contentDisposition).toBe('inline');
    expect(ops.html).toContain(`cid:${image.cid}`);
    expect(image.content.subarray(1, 4).toString()).toBe('PNG');
    expect(ops.text).toContain('does not certify anything');
    const recipient = await t.dataSource.getRepository(Recipient).findOneByOrFail({ email: 'ops@pellworth.example' });
    const link = t.services.recipients.unsubscribeLink(recipient.id);
    expect(ops.text).toContain(`Unsubscribe: ${link}`);
    expect(ops.html).toContain(link);
    // The link into the app opens the read-only page of the same month.
    const reportLink = `${t.config.baseUrl}/reports/${orgId}/2026-11`;
    expect(ops.text).toContain(`Read these figures in Driftline: ${reportLink}`);
    expect(ops.html).toContain(reportLink);

    // One-click unsubscribe headers (RFC 8058 §3.1; List-Unsubscribe of RFC 2369 §3.2), as mailparser@3.14.2 reads them.
    const oneClick = t.services.recipients.oneClickLink(recipient.id);
    const line = (key: string) => ops.headerLines.find((h) => h.key === key)?.line.replace(/\r?\n[ \t]+/g, ' ');
    expect(line('list-unsubscribe')).toBe(`List-Unsubscribe: <${oneClick}>`);
    expect(line('list-unsubscribe-post')).toBe('List-Unsubscribe-Post: List-Unsubscribe=One-Click');
    expect((ops.headers.get('list') as { unsubscribe?: { url?: string } }).unsubscribe?.url).toBe(oneClick);

    // Opening the link (as a link scanner would) changes nothing; the mail client's one-click POST unsubscribes.
    expect((await request(t.app).get(new URL(oneClick).pathname).set('Accept', 'application/json')).body.unsubscribedAt).toBeNull();
    expect((await t.dataSource.getRepository(Recipient).findOneByOrFail({ id: recipient.id })).unsubscribedAt).toBeNull();
    const post = await request(t.app).post(new URL(oneClick).pathname).type('form').send('List-Unsubscribe=One-Click');
    expect(post.status).toBe(200);
    expect((await t.dataSource.getRepository(Recipient).findOneByOrFail({ id: recipient.id })).unsubscribedAt).not.toBeNull();

    // The next month's report goes to the other recipient only; re-sending November adds nothing.
    vi.setSystemTime(new Date('2027-01-02T09:00:00Z'));
    await t.services.reports.send(orgId, '2026-12');
    await t.services.reports.send(orgId, '2026-11');
    await deliver(3);
    await new Promise((r) => setTimeout(r, 100));
    expect(received).toHaveLength(3);
    const december = await simpleParser(received[2].raw);
    expect(december.subject).toBe('Map health in December 2026 · Pellworth Grocers');
    expect(received[2].to).toEqual(['quality@pellworth.example']);
  });

  it('when the monthly job runs twice on the 1st, then each recipient receives that month’s report once', async () => {
    const before = received.length;
    const firstOfFebruary = new Date('2027-02-01T07:30:00Z');
    vi.setSystemTime(firstOfFebruary);
    const first = await reportJob({ services: t.services }, firstOfFebruary);
    const second = await reportJob({ services: t.services }, new Date('2027-02-01T08:30:00Z'));
    await deliver(before + 1);
    await t.services.mail.deliverDue(new Date());
    await new Promise((r) => setTimeout(r, 100));
    expect(first?.status).toBe('succeeded');
    // The demo's customers are due as well, with nobody on their lists.
    const sent = (first?.figures as { reports: Array<{ organization: string; month: string; queued: number }> }).reports;
    expect(sent.find((r) => r.organization === 'Pellworth Grocers')).toEqual({ organization: 'Pellworth Grocers', month: '2027-01', queued: 1 });
    expect(sent.reduce((a, r) => a + r.queued, 0)).toBe(1);
    // Nothing is due the second time, so the hourly check records no run and queues nothing.
    expect(second).toBeNull();
    const january = await Promise.all(received.slice(before).map((r) => simpleParser(r.raw)));
    expect(january.map((m) => m.subject)).toEqual(['Map health in January 2027 · Pellworth Grocers']);
    expect(received[before].to).toEqual(['quality@pellworth.example']);
  });
});
