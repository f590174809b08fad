import { simpleParser, type Attachment, type ParsedMail } from 'mailparser';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { DailyStat, OutgoingMail, RemapRequest, Robot, Site, User } from '../../server/entities/index.js';
import { newId } from '../../server/services/ids.js';
import { RemapNoticesService } from '../../server/services/remap-notices.service.js';
import { insertZone, roomMap } from './helpers/fixtures.js';
import { startSmtpCapture, type ReceivedMessage } from './helpers/smtp-capture.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// Remap notices end to end over real SMTP: the app's mail queue delivers to an SMTP server the test
// runs on a free 127.0.0.1 port (smtp-server@3.21.6), each message is parsed with mailparser@3.14.2
// (simpleParser) and its calendar file is checked against the scheduling rules of RFC 5546 (Daboo,
// "iCalendar Transport-Independent Interoperability Protocol (iTIP)", IETF 2009): §3.2.2 for REQUEST
// (METHOD:REQUEST, one ORGANIZER, at least one ATTENDEE, DTSTAMP, DTSTART, SUMMARY, UID, SEQUENCE
// when above 0) and §3.2.5 for CANCEL (METHOD:CANCEL, ORGANIZER, SEQUENCE, the UID of the original
// REQUEST, STATUS:CANCELLED to cancel the whole event, no STATUS when only attendees are taken off).
// The MIME type's method parameter matches the file's METHOD (RFC 6047, Melnikov, "iCalendar
// Message-Based Interoperability Protocol (iMIP)", IETF 2010, §2.4; the section number from memory).
const NOW = new Date('2026-12-07T12:00:00Z');
const FROM = 'Driftline <driftline@localhost>';

/** Unfolds RFC 5545 content lines (§3.1: CRLF followed by one space or tab continues a line). */
const unfold = (text: string) => text.replace(/\r\n[ \t]/g, '').split('\r\n').filter(Boolean);
const props = (lines: string[], name: string) => lines.filter((l) => l.startsWith(`${name}:`) || l.startsWith(`${name};`));
const prop = (lines: string[], name: string) => props(lines, name)[0];

describe('remap notices by e-mail', () => {
  let t: TestApp;
  let smtp: Awaited<ReturnType<typeof startSmtpCapture>>;
  let received: ReceivedMessage[];
  let site: string;
  let mapId: string;
  let nadia: string;
  let tomas: string;
  let iris: string;
  let ids: { tomas: string; iris: string; nadia: string };
  let zoneNumber = 1;
  const base = () => `/api/sites/${site}/remaps`;

  /** Delivers the queue and waits until `count` messages in all have arrived; returns the new ones, parsed. */
  const deliver = async (count: number): Promise<ParsedMail[]> => {
    const before = received.length;
    await t.services.mail.deliverDue(new Date());
    for (let k = 0; k < 150 && received.length < count; k++) await new Promise((r) => setTimeout(r, 20));
    expect(received.length).toBe(count);
    return Promise.all(received.slice(before).map((r) => simpleParser(r.raw)));
  };
  const to = (parsed: ParsedMail[], email: string) => {
    const found = parsed.filter((p) => JSON.stringify(p.to).includes(email));
    expect(found, `messages to ${email}`).toHaveLength(1);
    return found[0];
  };
  const calendarOf = (mail: ParsedMail): { part: Attachment; lines: string[] } => {
    const parts = mail.attachments.filter((a) => a.contentType === 'text/calendar');
    expect(parts).toHaveLength(1);
    return { part: parts[0], lines: unfold(parts[0].content.toString('utf8')) };
  };
  const methodParam = (a: Attachment) => (a.headers.get('content-type') as { params: Record<string, string> }).params.method;
  const mailRows = () => t.dataSource.getRepository(OutgoingMail).count({ where: { kind: 'remap_notice' } });
  const newRequest = async (cookie: string) => {
    const active = await t.services.mapVersions.activeFloor(site);
    const zoneId = await insertZone(t.dataSource, site, active!.id, zoneNumber++);
    const res = await request(t.app).post(base()).set('Cookie', cookie).send({ zoneIds: [zoneId] });
    expect(res.status).toBe(201);
    return res.body.remap as { id: string; number: number };
  };
  const act = (cookie: string, remapId: string, action: string, body: object = {}) => request(t.app).post(`${base()}/${remapId}/${action}`).set('Cookie', cookie).send(body);

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    smtp = await startSmtpCapture();
    received = smtp.received;
    t = await createTestApp({ config: { smtp: { host: null, port: smtp.port, secure: false, from: FROM } } });
    site = (await demoIds(t.dataSource)).ambergateSite;
    nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
    const user = async (email: string) => (await t.dataSource.getRepository(User).findOneByOrFail({ email })).id;
    ids = { tomas: await user('tomas.mapper@kestrelway.example'), iris: await user('iris.admin@kestrelway.example'), nadia: await user('nadia.manager@ambergate.example') };
    const { pgm, yaml } = roomMap();
    mapId = (await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml')).body.mapVersion.id;
    await request(t.app).post(`/api/sites/${site}/map-versions/${mapId}/activate`).set('Cookie', tomas).send({});
  });

  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
    await smtp.close();
  });

  let first: { id: string; number: number };

  it('when a request is scheduled, then the assignee and the requester each get one notice with the window in site time and a REQUEST calendar file of the request’s UID; the same schedule again sends nothing', async () => {
    first = await newRequest(nadia);
    const res = await act(tomas, first.id, 'schedule', { start: '2026-12-08T02:00:00.000Z', end: '2026-12-08T03:40:00.000Z', assigneeId: ids.tomas });
    expect(res.status).toBe(200);
    expect(res.body.remap.noticeSentTo.map((p: { name: string }) => p.name).sort()).toEqual(['Nadia Okonkwo-Hale', 'Tomas Ferreira-Lund']);
    const parsed = await deliver(2);
    expect(received.map((r) => r.to[0]).sort()).toEqual(['nadia.manager@ambergate.example', 'tomas.mapper@kestrelway.example']);

    const download = unfold((await request(t.app).get(`${base()}/${first.id}/calendar.ics`).set('Cookie', nadia)).text);
    // Europe/London is on UTC in December, so the site-local window is 02:00–03:40 on Tuesday 8 December 2026.
    for (const [email, line] of [['tomas.mapper@kestrelway.example', 'You are assigned to drive it.'], ['nadia.manager@ambergate.example', 'You requested it; Tomas Ferreira-Lund drives it.']]) {
      const mail = to(parsed, email);
      expect(mail.subject).toBe(`Remap R-${first.number} at Fennick Cross DC scheduled for Tue 8 Dec, 02:00–03:40`);
      expect(mail.text).toContain(line);
      expect(mail.text).toContain('Window: Tue 8 Dec, 02:00–03:40 (Europe/London)');
      expect(mail.text).toContain(`Open the request: ${t.config.baseUrl}/sites/${site}/remaps/${first.id}`);
      expect(mail.text).toContain('does not certify anything');
      const { part, lines } = calendarOf(mail);
      expect(methodParam(part)).toBe('REQUEST');
      expect(part.filename).toBe(`driftline-remap-R-${first.number}.ics`);
      // RFC 5546 §3.2.2.
      expect(prop(lines, 'METHOD')).toBe('METHOD:REQUEST');
      expect(prop(lines, 'UID')).toBe(prop(download, 'UID'));
      expect(prop(lines, 'UID')).toBe(`UID:remap-${first.id}@driftline`);
      expect(props(lines, 'ORGANIZER')).toHaveLength(1);
      expect(prop(lines, 'ORGANIZER')).toMatch(/:mailto:driftline@localhost$/i);
      expect(props(lines, 'ATTENDEE').join('\n')).toMatch(/ROLE="?REQ-PARTICIPANT"?.*:mailto:tomas\.mapper@kestrelway\.example/);
      expect(props(lines, 'ATTENDEE').join('\n')).toMatch(/ROLE="?NON-PARTICIPANT"?.*:mailto:nadia\.manager@ambergate\.example/);
      expect(prop(lines, 'DTSTAMP')).toMatch(/^DTSTAMP:\d{8}T\d{6}Z$/);
      expect(prop(lines, 'DTSTART')).toBe('DTSTART:20261208T020000Z');
      expect(prop(lines, 'SUMMARY')).toMatch(new RegExp(`^SUMMARY:Remap R-${first.number}: `));
      expect(prop(lines, 'SEQUENCE')).toBe('SEQUENCE:0');
    }

    // The same window and assignee again: no move, no mail.
    const again = await act(tomas, first.id, 'schedule', { start: '2026-12-08T02:00:00.000Z', end: '2026-12-08T03:40:00.000Z', assigneeId: ids.tomas });
    expect(again.status).toBe(200);
    expect(again.body.remap.history.filter((h: { action: string }) => h.action.startsWith('remap.') && h.action !== 'remap.create')).toHaveLength(1);
    expect(await mailRows()).toBe(2);
  });

  it('when the window moves and then the request is handed to a colleague, then SEQUENCE grows, the new assignee and the requester get a REQUEST and the former assignee a CANCEL that names only them', async () => {
    expect((await act(tomas, first.id, 'schedule', { start: '2026-12-09T02:00:00.000Z', end: '2026-12-09T03:40:00.000Z', assigneeId: ids.tomas })).status).toBe(200);
    let parsed = await deliver(4);
    for (const email of ['tomas.mapper@kestrelway.example', 'nadia.manager@ambergate.example']) {
      const mail = to(parsed, email);
      expect(mail.subject).toBe(`Remap R-${first.number} at Fennick Cross DC moved to Wed 9 Dec, 02:00–03:40`);
      expect(mail.text).toContain('It was Tue 8 Dec, 02:00–03:40.');
      const { lines } = calendarOf(mail);
      expect(prop(lines, 'SEQUENCE')).toBe('SEQUENCE:1');
      expect(prop(lines, 'DTSTART')).toBe('DTSTART:20261209T020000Z');
    }

    expect((await act(tomas, first.id, 'schedule', { start: '2026-12-09T02:00:00.000Z', end: '2026-12-09T03:40:00.000Z', assigneeId: ids.iris })).status).toBe(200);
    parsed = await deliver(7);
    for (const email of ['iris.admin@kestrelway.example', 'nadia.manager@ambergate.example']) {
      const mail = to(parsed, email);
      expect(mail.subject).toBe(`Remap R-${first.number} at Fennick Cross DC reassigned to Iris Achterberg`);
      const { part, lines } = calendarOf(mail);
      expect(methodParam(part)).toBe('REQUEST');
      expect(prop(lines, 'SEQUENCE')).toBe('SEQUENCE:2');
      expect(props(lines, 'ATTENDEE').join('\n')).toMatch(/REQ-PARTICIPANT.*:mailto:iris\.admin@kestrelway\.example/);
      expect(props(lines, 'ATTENDEE').join('\n')).not.toContain('tomas.mapper');
    }
    const former = to(parsed, 'tomas.mapper@kestrelway.example');
    expect(former.subject).toBe(`Remap R-${first.number} at Fennick Cross DC: you are no longer assigned`);
    expect(former.text).toContain('Tomas Ferreira-Lund assigned it to Iris Achterberg; it was yours for Wed 9 Dec, 02:00–03:40.');
    const { part, lines } = calendarOf(former);
    // RFC 5546 §3.2.5: uninviting attendees names them, keeps the UID, and carries no STATUS.
    expect(methodParam(part)).toBe('CANCEL');
    expect(prop(lines, 'METHOD')).toBe('METHOD:CANCEL');
    expect(prop(lines, 'UID')).toBe(`UID:remap-${first.id}@driftline`);
    expect(prop(lines, 'SEQUENCE')).toBe('SEQUENCE:2');
    expect(props(lines, 'ORGANIZER')).toHaveLength(1);
    expect(props(lines, 'ATTENDEE')).toHaveLength(1);
    expect(prop(lines, 'ATTENDEE')).toMatch(/:mailto:tomas\.mapper@kestrelway\.example$/);
    expect(prop(lines, 'STATUS')).toBeUndefined();
  });

  it('when a scheduled request is cancelled, then both get a CANCEL of the whole event with the next SEQUENCE and STATUS:CANCELLED', async () => {
    const r = await newRequest(nadia);
    await act(tomas, r.id, 'schedule', { start: '2026-12-10T01:00:00.000Z', assigneeId: ids.tomas });
    await deliver(9);
    expect((await act(nadia, r.id, 'cancel', { reason: 'racking delayed' })).status).toBe(200);
    const parsed = await deliver(11);
    for (const email of ['tomas.mapper@kestrelway.example', 'nadia.manager@ambergate.example']) {
      const mail = to(parsed, email);
      expect(mail.subject).toBe(`Remap R-${r.number} at Fennick Cross DC cancelled`);
      expect(mail.text).toContain('Nadia Okonkwo-Hale cancelled it: racking delayed.');
      const { part, lines } = calendarOf(mail);
      expect(methodParam(part)).toBe('CANCEL');
      expect(prop(lines, 'METHOD')).toBe('METHOD:CANCEL');
      expect(prop(lines, 'UID')).toBe(`UID:remap-${r.id}@driftline`);
      // §3.2.5: a cancellation increments SEQUENCE.
      expect(prop(lines, 'SEQUENCE')).toBe('SEQUENCE:1');
      expect(prop(lines, 'STATUS')).toBe('STATUS:CANCELLED');
      expect(props(lines, 'ATTENDEE')).toHaveLength(2);
    }
  });

  it('when one person both requested and drives a request, then they get one notice; a requester who was disabled gets none', async () => {
    const own = await newRequest(iris);
    await act(iris, own.id, 'schedule', { start: '2026-12-11T01:00:00.000Z', assigneeId: ids.iris });
    let parsed = await deliver(12);
    const mail = to(parsed, 'iris.admin@kestrelway.example');
    expect(mail.text).toContain('You are assigned to drive it.');
    expect(mail.text).toContain('You also requested it.');
    expect(props(calendarOf(mail).lines, 'ATTENDEE')).toHaveLength(1);

    const other = await newRequest(nadia);
    await t.dataSource.getRepository(User).update(ids.nadia, { status: 'disabled' });
    try {
      const res = await act(tomas, other.id, 'schedule', { start: '2026-12-11T05:00:00.000Z', assigneeId: ids.tomas });
      expect(res.body.remap.noticeSentTo.map((p: { name: string }) => p.name)).toEqual(['Tomas Ferreira-Lund']);
      parsed = await deliver(13);
      expect(received.at(-1)!.to).toEqual(['tomas.mapper@kestrelway.example']);
      // The disabled requester is not named in the file either.
      expect(props(calendarOf(parsed[0]).lines, 'ATTENDEE').join('\n')).not.toContain('nadia.manager');
    } finally {
      await t.dataSource.getRepository(User).update(ids.nadia, { status: 'active' });
    }
  });

  it('when the new map is verified by the nightly check, then both get the before/after figures of the database and the link, once, however often the check runs', async () => {
    const siteRow = await t.dataSource.getRepository(Site).findOneByOrFail({ id: site });
    // The old map's agreement over the days before the activation: one robot's day on version 1.
    const robot = newId();
    await t.dataSource.getRepository(Robot).insert({ id: robot, siteId: site, name: 'AMR-41', model: 'Palletmole PM-1 lifter', mounts: [] });
    await t.dataSource.getRepository(DailyStat).insert({ siteId: site, robotId: robot, scanner: 'front', day: '2026-12-02', mapVersionId: mapId, scans: 5, beams: 4000, returns: 4000, explained: 3652, outOfMap: 0 });
    expect((await act(iris, first.id, 'start')).status).toBe(200);
    const { pgm, yaml } = roomMap();
    const next = (await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml')).body.mapVersion.id;
    expect((await act(iris, first.id, 'attach-map', { mapVersionId: next })).status).toBe(200);
    expect((await request(t.app).post(`/api/sites/${site}/map-versions/${next}/activate`).set('Cookie', tomas).send({})).status).toBe(200);
    await t.services.ingest.countLines(siteRow, roomDrive(['2026-12-04', '2026-12-05', '2026-12-06']), 'drive.jsonl', NOW);
    const [run] = await t.services.jobRuns.detect('manual', site, NOW);
    expect(run.figures).toMatchObject({ remaps: { checked: 1, verified: 1 } });
    const parsed = await deliver(15);

    const row = await t.dataSource.getRepository(RemapRequest).findOneByOrFail({ id: first.id });
    expect(row.status).toBe('verified');
    const v = row.verification!;
    const pct = (a: number | null) => `${(a! * 100).toFixed(1)} %`;
    expect(v.before.agreement).toBeCloseTo(3652 / 4000, 5);
    const [zone] = await t.dataSource.query(`SELECT z.number AS number, z.status AS status FROM zones z JOIN remap_request_zones l ON l.zone_id = z.id WHERE l.remap_id = ?`, [first.id]);
    expect(zone.status).toBe('resolved');
    for (const email of ['iris.admin@kestrelway.example', 'nadia.manager@ambergate.example']) {
      const mail = to(parsed, email);
      expect(mail.subject).toBe(`Remap R-${first.number} at Fennick Cross DC verified: agreement ${pct(v.before.agreement)} → ${pct(v.after!.agreement)}`);
      expect(mail.text).toContain(`After ${v.evidenceDays} days of evidence on map version 2, no zone flags in the request's area: agreement ${pct(v.before.agreement)} → ${pct(v.after!.agreement)}, changed area ${v.before.changedAreaM2.toFixed(1)} m² → ${v.after!.changedAreaM2.toFixed(1)} m².`);
      expect(mail.text).toContain(`Zones resolved: Z-${zone.number} (1).`);
      expect(mail.text).toContain(`Open the request: ${t.config.baseUrl}/sites/${site}/remaps/${first.id}`);
      expect(mail.attachments.filter((a) => a.contentType === 'text/calendar')).toHaveLength(0);
    }

    // The next night finds nothing to move; nothing more is sent.
    const [again] = await t.services.jobRuns.detect('manual', site, NOW);
    expect(again.figures).toMatchObject({ remaps: { checked: 0 } });
    expect(await mailRows()).toBe(15);
  });

  it('when the same move’s notices are queued twice, then each recipient still has one mail, and a not-fixed notice carries the zones that still flag', async () => {
    const notices = new RemapNoticesService(t.services.mail, FROM);
    const remap = await t.dataSource.getRepository(RemapRequest).findOneOrFail({ where: { id: first.id }, relations: { assignee: true, requestedBy: true, mapVersionAfter: true } });
    const siteRow = await t.dataSource.getRepository(Site).findOneByOrFail({ id: site });
    const verification = { ...remap.verification!, state: 'not_fixed' as const, evidenceDays: 7, zonesStillFlagging: 2, after: { agreement: 0.9612, changedAreaM2: 1.25 } };
    const notice = { event: 'not_fixed' as const, site: siteRow, remap: { ...remap, verification } as RemapRequest, calendar: null, sequence: 1, link: `${t.config.baseUrl}/sites/${site}/remaps/${first.id}`, actorName: null, zones: { resolved: [], flagging: ['Z-40', 'Z-41'] } };
    const rows = await mailRows();
    expect((await notices.send(notice)).map((p) => p.name).sort()).toEqual(['Iris Achterberg', 'Nadia Okonkwo-Hale']);
    await notices.send(notice);
    expect(await mailRows()).toBe(rows + 2);
    const parsed = await deliver(17);
    const mail = to(parsed, 'nadia.manager@ambergate.example');
    expect(mail.subject).toBe(`Remap R-${first.number} at Fennick Cross DC not fixed: 2 zones still flag`);
    expect(mail.text).toContain(`zones still flag in the request's area: Z-40, Z-41 (2); agreement ${(remap.verification!.before.agreement! * 100).toFixed(1)} % → 96.1 %, changed area`);
  });

  it('when a request that never had a window is cancelled, then its requester is told without a calendar file', async () => {
    const r = await newRequest(nadia);
    expect((await act(nadia, r.id, 'cancel', { reason: 'the racks stay where they are' })).status).toBe(200);
    const [mail] = await deliver(18);
    expect(received.at(-1)!.to).toEqual(['nadia.manager@ambergate.example']);
    expect(mail.subject).toBe(`Remap R-${r.number} at Fennick Cross DC cancelled`);
    expect(mail.text).toContain('Nadia Okonkwo-Hale cancelled it: the racks stay where they are.');
    expect(mail.text).toContain('Window: not scheduled');
    expect(mail.attachments).toHaveLength(0);
  });
});

/**
 * A commissioning drive in the test room on each of `days`: the front scanner turns full circle at
 * 25 places (a 5 × 5 lattice, 0.35 m apart), each beam ending in the middle of the wall ring
 * (x or y = 0.025 or 1.975 m), so the room map explains every return. Robot AMR-41 of the test, scanner at the identity mount.
 */
function roomDrive(days: string[]): string[] {
  const beams = 720;
  const out: string[] = [];
  for (const day of days) {
    for (let k = 0; k < 25; k++) {
      const sx = 0.3 + 0.35 * (k % 5);
      const sy = 0.3 + 0.35 * Math.floor(k / 5);
      const ranges = Array.from({ length: beams }, (_, b) => {
        const a = -Math.PI + (b * 2 * Math.PI) / beams;
        const wallX = Math.cos(a) === 0 ? Infinity : ((Math.cos(a) > 0 ? 1.975 : 0.025) - sx) / Math.cos(a);
        const wallY = Math.sin(a) === 0 ? Infinity : ((Math.sin(a) > 0 ? 1.975 : 0.025) - sy) / Math.sin(a);
        return Math.round(Math.min(wallX, wallY) * 1000) / 1000;
      });
      out.push(JSON.stringify({ t: `${day}T10:${String(k).padStart(2, '0')}:00.000Z`, robot: 'AMR-41', scanner: 'front', pose: [sx, sy, 0], angleMin: -Math.PI, angleIncrement: (2 * Math.PI) / beams, rangeMin: 0.05, rangeMax: 30, ranges }));
    }
  }
  return out;
}
