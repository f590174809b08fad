import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { DailyStat, MonthlyReport, Organization, OutgoingMail, Recipient, Robot, Site } from '../../server/entities/index.js';
import { newId } from '../../server/services/ids.js';
import { insertZone, roomMap } from './helpers/fixtures.js';
import { actorByEmail, ADMIN_EMAIL } from './helpers/remap-fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// Monthly reports of a hand-made customer: generated once per (organization, month), queued once per
// recipient under its dedupe key, resumed after a stop between generating and sending, and never
// queued for someone who unsubscribed. The mail queue's own delivery is tested with the mail service.
const NOW = new Date('2026-12-02T09:00:00Z');

describe('monthly reports', () => {
  let t: TestApp;
  let orgId: string;
  let denverId: string;
  let siteId: string;
  let iris: string;
  const reports = () => t.dataSource.getRepository(MonthlyReport);
  const mails = () => t.dataSource.getRepository(OutgoingMail);

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    t = await createTestApp();
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
    orgId = newId();
    denverId = newId();
    siteId = newId();
    await t.dataSource.getRepository(Organization).insert([
      { id: orgId, name: 'Pellworth Grocers', kind: 'customer', timezone: 'Europe/London' },
      { id: denverId, name: 'Sallow Ridge Hardware', kind: 'customer', timezone: 'America/Denver' },
    ]);
    await t.dataSource.getRepository(Site).insert({ id: siteId, name: 'Pellworth Yard', city: 'Harlow Mead', timezone: 'Europe/London', organizationId: orgId, settings: {} });
    const tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    const { pgm, yaml } = roomMap();
    const up = await request(t.app).post(`/api/sites/${siteId}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml');
    await request(t.app).post(`/api/sites/${siteId}/map-versions/${up.body.mapVersion.id}/activate`).set('Cookie', tomas);
    await insertZone(t.dataSource, siteId, up.body.mapVersion.id, 1);
    await t.dataSource.query(`UPDATE zones SET created_at = '2026-11-10 08:00:00' WHERE site_id = ?`, [siteId]);
    const robot = newId();
    await t.dataSource.getRepository(Robot).insert({ id: robot, siteId, name: 'AMR-31', model: 'Palletmole PM-1 lifter', mounts: [] });
    await t.dataSource.getRepository(DailyStat).insert([
      { siteId, robotId: robot, scanner: 'front', day: '2026-10-20', mapVersionId: up.body.mapVersion.id, scans: 5, beams: 1000, returns: 1000, explained: 970, outOfMap: 0 },
      { siteId, robotId: robot, scanner: 'front', day: '2026-11-03', mapVersionId: up.body.mapVersion.id, scans: 5, beams: 4000, returns: 4000, explained: 3652, outOfMap: 0 },
    ]);
    const admin = await actorByEmail(t, ADMIN_EMAIL);
    await t.services.recipients.add(admin, orgId, { email: 'ops@pellworth.example', name: 'Operations' });
    await t.services.recipients.add(admin, orgId, { email: 'quality@pellworth.example' });
  });

  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
  });

  it('renders the figures of the database into the HTML and the text part, with the map by content id', async () => {
    const res = await request(t.app).get(`/api/organizations/${orgId}/reports/2026-11/preview`).set('Cookie', iris);
    expect(res.status).toBe(200);
    const [row] = await t.dataSource.query(`SELECT SUM(explained) AS e, SUM(returns) AS r FROM daily_stats WHERE site_id = ? AND day LIKE '2026-11-%'`, [siteId]);
    const [prev] = await t.dataSource.query(`SELECT SUM(explained) AS e, SUM(returns) AS r FROM daily_stats WHERE site_id = ? AND day LIKE '2026-10-%'`, [siteId]);
    const score = (100 * row.e) / row.r;
    const change = score - (100 * prev.e) / prev.r;
    expect(res.body.subject).toBe('Map health in November 2026 · Pellworth Grocers');
    expect(res.body.html).toContain(`${score.toFixed(1)} %`);
    expect(res.body.html).toContain(`−${Math.abs(change).toFixed(1)} points against the month before`);
    expect(res.body.text).toContain(`Health score: ${score.toFixed(1)} %`);
    expect(res.body.html).toContain('data:image/png;base64,');
    expect(res.body.html).toContain('does not certify anything');
    expect(res.body.text).toContain(`Open in Driftline: ${t.config.baseUrl}/sites/${siteId}`);
    expect(res.body.status).toBeNull();
    expect(await reports().count()).toBe(0);
  });

  it('refuses a month that has not ended in the organization’s zone, and a malformed one', async () => {
    const now = await request(t.app).get(`/api/organizations/${orgId}/reports/2026-12/preview`).set('Cookie', iris);
    expect(now.status).toBe(400);
    expect(now.body.error.message).toMatch(/has not ended/);
    expect((await request(t.app).get(`/api/organizations/${orgId}/reports/2026-13/preview`).set('Cookie', iris)).status).toBe(400);
  });

  it('resumes after a stop between generating and sending, and a second run queues nothing again', async () => {
    const report = await t.services.reports.generate(orgId, '2026-11');
    expect(report.status).toBe('ready');
    expect(await mails().count()).toBe(0);
    // The process stops here; the next run picks the report up and queues each recipient once.
    const first = await request(t.app).post(`/api/organizations/${orgId}/reports/2026-11/send`).set('Cookie', iris).send({});
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ recipients: 2, queued: 2, report: { id: report.id, status: 'sent' } });
    const second = await t.services.reports.send(orgId, '2026-11');
    expect(second.queued).toBe(0);
    const [a, b] = await Promise.all([t.services.reports.send(orgId, '2026-11'), t.services.reports.send(orgId, '2026-11')]);
    expect(a.queued + b.queued).toBe(0);
    expect(await reports().countBy({ organizationId: orgId })).toBe(1);
    const rows = await mails().find({ where: { reportId: report.id }, order: { toEmail: 'ASC' } });
    expect(rows.map((m) => m.toEmail)).toEqual(['ops@pellworth.example', 'quality@pellworth.example']);
    const recipients = await t.dataSource.getRepository(Recipient).find({ where: { organizationId: orgId }, order: { email: 'ASC' } });
    expect(rows.map((m) => m.dedupeKey)).toEqual(recipients.map((r) => `report:${report.id}:${r.id}`));
    // Each copy carries its own recipient's unsubscribe link, in both parts, and the map as an inline attachment.
    expect(rows[0].text).toContain(t.services.recipients.unsubscribeLink(recipients[0].id));
    expect(rows[0].html).toContain(t.services.recipients.unsubscribeLink(recipients[0].id));
    expect(rows[1].html).not.toContain(t.services.recipients.unsubscribeLink(recipients[0].id));
    const cid = rows[0].attachments[0].cid!;
    expect(rows[0].attachments[0].contentType).toBe('image/png');
    expect(rows[0].html).toContain(`cid:${cid}`);
  });

  it('rebuilds a report left half-made and leaves out a recipient who unsubscribed', async () => {
    const [quality] = await t.dataSource.getRepository(Recipient).findBy({ email: 'quality@pellworth.example' });
    const token = t.services.recipients.unsubscribeLink(quality.id).split('/').pop();
    expect((await request(t.app).post(`/api/unsubscribe/${token}`).send({})).status).toBe(200);
    await reports().insert({ id: newId(), organizationId: orgId, month: '2026-10', status: 'generating', html: null, text: null, mapImages: null, generatedAt: null, sentAt: null });
    const sent = await t.services.reports.send(orgId, '2026-10');
    expect(sent).toMatchObject({ recipients: 1, queued: 1, report: { status: 'sent' } });
    const rows = await mails().find({ where: { reportId: sent.report.id } });
    expect(rows.map((m) => m.toEmail)).toEqual(['ops@pellworth.example']);
  });

  it('sends on the 1st at 07:00 in each organization’s own zone, for the month before', async () => {
    // 07:00 in London on 1 January is 00:00 in Denver (UTC−7): only London's report is due.
    const due = await t.services.reports.sendDue(new Date('2027-01-01T07:00:00Z'), 7);
    const names = due.map((d) => d.organization);
    expect(names).toContain('Pellworth Grocers');
    expect(names).not.toContain('Sallow Ridge Hardware');
    expect(due.find((d) => d.organization === 'Pellworth Grocers')).toEqual({ organization: 'Pellworth Grocers', month: '2026-12', queued: 1 });
    // Later that day Denver's hour has come; London's report is sent and not due again.
    const later = await t.services.reports.sendDue(new Date('2027-01-01T14:00:00Z'), 7);
    expect(later.map((d) => d.organization)).toContain('Sallow Ridge Hardware');
    expect(later.map((d) => d.organization)).not.toContain('Pellworth Grocers');
    expect(await t.services.reports.sendDue(new Date('2027-01-01T15:00:00Z'), 7)).toEqual([]);
    expect(await mails().countBy({ organizationId: orgId })).toBe(4);
    expect(await reports().countBy({ organizationId: denverId, month: '2026-12' })).toBe(1);
  });

  it('shows the history with delivery counts and keeps mappers out', async () => {
    const res = await request(t.app).get(`/api/organizations/${orgId}/reports`).set('Cookie', iris);
    expect(res.body.reports.map((r: { month: string }) => r.month)).toEqual(['2026-12', '2026-11', '2026-10']);
    expect(res.body.reports[1].deliveries).toEqual({ queued: 2 });
    const tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    expect((await request(t.app).get(`/api/organizations/${orgId}/reports`).set('Cookie', tomas)).status).toBe(403);
  });
});

describe('monthly report job', () => {
  it('records a report run only when a report is due, and a second run the same hour finds nothing', async () => {
    const t = await createTestApp();
    try {
      const admin = await actorByEmail(t, ADMIN_EMAIL);
      const { ambergate } = { ambergate: (await t.dataSource.getRepository(Organization).findOneByOrFail({ name: 'Ambergate Provisions' })).id };
      await t.services.recipients.add(admin, ambergate, { email: 'reader@ambergate.example' });
      expect(await t.services.jobRuns.report('schedule', t.services.reports, new Date('2026-11-15T07:05:00Z'))).toBeNull();
      const run = await t.services.jobRuns.report('schedule', t.services.reports, new Date('2026-12-01T07:05:00Z'));
      expect(run).toMatchObject({ job: 'report', status: 'succeeded' });
      expect((run!.figures as { reports: Array<{ organization: string; month: string; queued: number }> }).reports).toEqual([{ organization: 'Ambergate Provisions', month: '2026-11', queued: 1 }]);
      expect(await t.services.jobRuns.report('schedule', t.services.reports, new Date('2026-12-01T08:05:00Z'))).toBeNull();
      expect(await t.dataSource.getRepository(OutgoingMail).countBy({ kind: 'report' })).toBe(1);
    } finally {
      await t.close();
    }
  });
});

describe('a month’s figures for the read-only page', () => {
  it('when a viewer opens a sent month, then they read the figures of the mail; another organization and an unsent month stay hidden', async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    const t = await createTestApp();
    try {
      const ids = await demoIds(t.dataSource);
      const owen = await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
      const priya = await signIn(t.app, 'priya.manager@corvane.example', 'demo-manager-2026');
      const path = `/api/organizations/${ids.ambergate}/reports/2026-11`;
      // Not sent yet: a viewer reads sent reports only.
      expect((await request(t.app).get(path).set('Cookie', owen)).status).toBe(404);
      await t.services.recipients.add(ids.admin, ids.ambergate, { email: 'owen.viewer@ambergate.example' });
      await t.services.reports.send(ids.ambergate, '2026-11');

      const res = await request(t.app).get(path).set('Cookie', owen);
      expect(res.status).toBe(200);
      const stored = await t.dataSource.getRepository(MonthlyReport).findOneByOrFail({ organizationId: ids.ambergate, month: '2026-11' });
      const figures = stored.figures as { sites: Array<{ id: string; name: string; score: number | null; change: number | null; changedAreaM2: number }> };
      expect(res.body).toMatchObject({ month: '2026-11', monthLabel: 'November 2026', organization: { id: ids.ambergate, name: 'Ambergate Provisions' }, report: { status: 'sent' } });
      expect(res.body.sites.map((s: { name: string }) => s.name)).toEqual(['Fennick Cross DC', 'Tarrow Heath Cold Store']);
      for (const [k, s] of figures.sites.entries()) {
        expect(res.body.sites[k]).toMatchObject({ id: s.id, score: s.score, change: s.change, changedAreaM2: s.changedAreaM2 });
        expect(res.body.sites[k].weeks).toHaveLength(5);
      }
      // The mail the viewer received carries the link to this page.
      const [mail] = await t.dataSource.getRepository(OutgoingMail).findBy({ reportId: stored.id });
      expect(mail.text).toContain(`Read these figures in Driftline: ${t.config.baseUrl}/reports/${ids.ambergate}/2026-11`);
      expect(mail.headers).toEqual({ 'List-Unsubscribe': `<${t.services.recipients.oneClickLink((await t.dataSource.getRepository(Recipient).findOneByOrFail({ organizationId: ids.ambergate })).id)}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' });

      expect((await request(t.app).get(path).set('Cookie', priya)).status).toBe(404);
      expect((await request(t.app).get(`/api/organizations/${ids.ambergate}/reports/2026-10`).set('Cookie', owen)).status).toBe(404);
      const bad = await request(t.app).get(`/api/organizations/${ids.ambergate}/reports/2026-13`).set('Cookie', owen);
      expect(bad.status).toBe(400);
      expect(bad.body.error.message).toMatch(/YYYY-MM/);
    } finally {
      await t.close();
      vi.useRealTimers();
    }
  });
});
