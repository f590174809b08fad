import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { insertZone, roomMap } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// The remap's calendar file against RFC 5545 (Desruisseaux, "Internet Calendaring and Scheduling
// Core Object Specification (iCalendar)", IETF 2009): required properties, CRLF line ends, lines
// folded at 75 octets, UTC times, and a SEQUENCE that grows when the window moves.
const NOW = new Date('2026-11-09T12:00:00Z');

/** Unfolds RFC 5545 content lines (§3.1: CRLF followed by one space or tab continues a line). */
const unfold = (text: string) => text.replace(/\r\n[ \t]/g, '').split('\r\n').filter(Boolean);
const property = (lines: string[], name: string) => lines.find((l) => l.startsWith(`${name}:`) || l.startsWith(`${name};`));

describe('remap calendar file', () => {
  let t: TestApp;
  let site: string;
  let tomas: string;
  let nadia: string;
  let priya: string;
  let remapId: string;

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    t = await createTestApp();
    const ids = await demoIds(t.dataSource);
    site = ids.ambergateSite;
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
    priya = await signIn(t.app, 'priya.manager@corvane.example', 'demo-manager-2026');
    const { pgm, yaml } = roomMap();
    const mapId = (await request(t.app).post(`/api/sites/${site}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml')).body.mapVersion.id;
    await request(t.app).post(`/api/sites/${site}/map-versions/${mapId}/activate`).set('Cookie', tomas).send({});
    const zoneId = await insertZone(t.dataSource, site, mapId, 1);
    remapId = (await request(t.app).post(`/api/sites/${site}/remaps`).set('Cookie', nadia).send({ zoneIds: [zoneId], title: 'Re-drive the dispatch aisle after the new racking went in along the east wall' })).body.remap.id;
  });
  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
  });

  const ics = () => request(t.app).get(`/api/sites/${site}/remaps/${remapId}/calendar.ics`).set('Cookie', nadia);

  it('when the request has no window yet, then 409 says it must be scheduled first', async () => {
    const res = await ics();
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/no window yet/);
  });

  it('when it is scheduled, then the file holds one event with the required properties, CRLF and 75-octet lines, in UTC', async () => {
    const me = (await request(t.app).get('/api/auth/me').set('Cookie', tomas)).body.user;
    const scheduled = await request(t.app).post(`/api/sites/${site}/remaps/${remapId}/schedule`).set('Cookie', tomas).send({ start: '2026-11-12T01:00:00.000Z', end: '2026-11-12T03:30:00.000Z', assigneeId: me.id });
    expect(scheduled.status).toBe(200);
    const res = await ics();
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/calendar/);
    expect(res.headers['content-disposition']).toBe('attachment; filename="driftline-remap-R-1.ics"');
    const text = res.text;
    // §3.1: lines end in CRLF and are at most 75 octets long, excluding the line break.
    expect(text.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
    for (const line of text.split('\r\n')) expect(Buffer.byteLength(line, 'utf8')).toBeLessThanOrEqual(75);
    const lines = unfold(text);
    expect(lines[0]).toBe('BEGIN:VCALENDAR');
    expect(lines.at(-1)).toBe('END:VCALENDAR');
    // §3.6 / §3.7: VERSION and PRODID are required in VCALENDAR; UID and DTSTAMP in VEVENT.
    expect(property(lines, 'VERSION')).toBe('VERSION:2.0');
    expect(property(lines, 'PRODID')).toMatch(/^PRODID:.*driftline/);
    expect(lines.filter((l) => l === 'BEGIN:VEVENT')).toHaveLength(1);
    expect(property(lines, 'UID')).toBe(`UID:remap-${remapId}@driftline`);
    expect(property(lines, 'DTSTAMP')).toMatch(/^DTSTAMP:\d{8}T\d{6}Z$/);
    expect(property(lines, 'DTSTART')).toBe('DTSTART:20261112T010000Z');
    expect(property(lines, 'DTEND')).toBe('DTEND:20261112T033000Z');
    expect(property(lines, 'SUMMARY')).toBe('SUMMARY:Remap R-1: Re-drive the dispatch aisle after the new racking went in along the east wall');
    expect(property(lines, 'LOCATION')).toBe('LOCATION:Fennick Cross DC');
    expect(property(lines, 'STATUS')).toBe('STATUS:CONFIRMED');
    expect(property(lines, 'DESCRIPTION')).toMatch(/Re-drive about \d+ m² at Fennick Cross DC/);
    expect(property(lines, 'ATTENDEE')).toMatch(/mailto:tomas\.mapper@kestrelway\.example$/);
    expect(property(lines, 'SEQUENCE')).toBe('SEQUENCE:0');
  });

  it('when the window moves and then the request is cancelled, then the same UID comes with a higher SEQUENCE and STATUS:CANCELLED', async () => {
    const me = (await request(t.app).get('/api/auth/me').set('Cookie', tomas)).body.user;
    await request(t.app).post(`/api/sites/${site}/remaps/${remapId}/schedule`).set('Cookie', tomas).send({ start: '2026-11-13T01:00:00.000Z', assigneeId: me.id });
    let lines = unfold((await ics()).text);
    expect(property(lines, 'SEQUENCE')).toBe('SEQUENCE:1');
    expect(property(lines, 'DTSTART')).toBe('DTSTART:20261113T010000Z');
    await request(t.app).post(`/api/sites/${site}/remaps/${remapId}/cancel`).set('Cookie', nadia).send({ reason: 'racking delayed' });
    lines = unfold((await ics()).text);
    expect(property(lines, 'UID')).toBe(`UID:remap-${remapId}@driftline`);
    expect(property(lines, 'SEQUENCE')).toBe('SEQUENCE:2');
    expect(property(lines, 'STATUS')).toBe('STATUS:CANCELLED');
  });

  it('when a user of another organization asks, then 404', async () => {
    expect((await request(t.app).get(`/api/sites/${site}/remaps/${remapId}/calendar.ics`).set('Cookie', priya)).status).toBe(404);
  });
});
