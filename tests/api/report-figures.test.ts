import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { DailyStat, Organization, RemapRequest, Robot, RobotFlag, Site, Zone } from '../../server/entities/index.js';
import { newId } from '../../server/services/ids.js';
import { monthBounds, previousMonth } from '../../server/services/report-figures.service.js';
import { insertZone, roomMap } from './helpers/fixtures.js';
import { remapAt } from './helpers/remap-fixtures.js';
import { createTestApp, signIn, type TestApp } from './helpers/test-app.js';

// The monthly report's figures on a hand-made set-up: two customer organizations, one in Europe/London
// and one in America/Denver, whose November 2026 starts at different UTC instants. Every expected
// figure is read back from the database with its own query, not written into the test.
const NOW = new Date('2026-11-30T10:00:00Z');

describe('monthly report figures', () => {
  let t: TestApp;
  let london: { org: string; site: string };
  let denver: { org: string; site: string };
  let denverRobot: string;
  let mapId: string;

  const org = async (name: string, timezone: string) => {
    const id = newId();
    await t.dataSource.getRepository(Organization).insert({ id, name, kind: 'customer', timezone });
    const site = newId();
    await t.dataSource.getRepository(Site).insert({ id: site, name: `${name} depot`, city: 'Harlow Mead', timezone, organizationId: id, settings: {} });
    return { org: id, site };
  };
  const stat = (siteId: string, robotId: string, day: string, returns: number, explained: number) =>
    t.dataSource.getRepository(DailyStat).insert({ siteId, robotId, scanner: 'front', day, mapVersionId: mapId, scans: 10, beams: returns, returns, explained, outOfMap: 0 });
  const flag = (robotId: string, raisedAt: string) =>
    t.dataSource.getRepository(RobotFlag).insert({ id: newId(), robotId, scanner: 'front', status: 'cleared', raisedAt: new Date(raisedAt), clearedAt: new Date('2026-10-01T00:00:00Z'), figures: { days: [], meanAgreement: 0.7, fleetMedian: 0.9, medianZ: -4 }, mount: null, note: 'fixed' });
  /** 100 · Σ explained / Σ returns over the site's days of a month, straight from SQL (DESIGN.md §4.3 score). */
  const scoreFromDb = async (siteId: string, month: string) => {
    const [row] = await t.dataSource.query(`SELECT SUM(explained) AS e, SUM(returns) AS r FROM daily_stats WHERE site_id = ? AND day LIKE ?`, [siteId, `${month}-%`]);
    return row.r > 0 ? (100 * row.e) / row.r : null;
  };

  beforeAll(async () => {
    vi.useFakeTimers({ now: NOW, toFake: ['Date'] });
    t = await createTestApp();
    london = await org('Pellworth Grocers', 'Europe/London');
    denver = await org('Sallow Ridge Hardware', 'America/Denver');
    const tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    const { pgm, yaml } = roomMap();
    const up = await request(t.app).post(`/api/sites/${london.site}/map-versions`).set('Cookie', tomas).attach('image', pgm, 'room.pgm').attach('metadata', yaml, 'room.yaml');
    mapId = up.body.mapVersion.id;
    expect((await request(t.app).post(`/api/sites/${london.site}/map-versions/${mapId}/activate`).set('Cookie', tomas)).status).toBe(200);
    const londonRobot = newId();
    denverRobot = newId();
    await t.dataSource.getRepository(Robot).insert([
      { id: londonRobot, siteId: london.site, name: 'AMR-11', model: 'Palletmole PM-1 lifter', mounts: [{ name: 'front', x: 0.3, y: 0, yaw: 0 }] },
      { id: denverRobot, siteId: denver.site, name: 'AMR-21', model: 'Palletmole PM-1 lifter', mounts: [{ name: 'front', x: 0.3, y: 0, yaw: 0 }] },
    ]);
    // October and November evidence at London; the last October day and the first November day carry different scores.
    await stat(london.site, londonRobot, '2026-10-12', 1000, 950);
    await stat(london.site, londonRobot, '2026-10-31', 1000, 900);
    await stat(london.site, londonRobot, '2026-11-01', 2000, 1600);
    await stat(london.site, londonRobot, '2026-11-20', 1000, 700);
    await stat(london.site, londonRobot, '2026-12-01', 5000, 100);
    // Flags at instants between the two organizations' November starts (London 00:00Z, Denver 06:00Z),
    // and between their December starts (London 00:00Z, Denver 07:00Z).
    await flag(londonRobot, '2026-11-01T03:00:00Z');
    await flag(denverRobot, '2026-11-01T03:00:00Z');
    await flag(denverRobot, '2026-11-15T12:00:00Z');
    await flag(denverRobot, '2026-12-01T03:00:00Z');
    await flag(londonRobot, '2026-12-01T03:00:00Z');
  });

  afterAll(async () => {
    vi.useRealTimers();
    await t.close();
  });

  it('cuts the month at midnight in the organization time zone', () => {
    // Europe/London is on GMT in November; America/Denver on MST after 1 November 2026 02:00 local
    // (UTC−6 before, UTC−7 after) — IANA time zone database, as read by luxon@3.7.2.
    expect(monthBounds('2026-11', 'Europe/London').start.toISOString()).toBe('2026-11-01T00:00:00.000Z');
    expect(monthBounds('2026-11', 'America/Denver').start.toISOString()).toBe('2026-11-01T06:00:00.000Z');
    expect(monthBounds('2026-11', 'America/Denver').end.toISOString()).toBe('2026-12-01T07:00:00.000Z');
    expect(monthBounds('2026-02', 'Europe/London').days).toHaveLength(28);
    expect(previousMonth('America/Denver', new Date('2026-12-01T05:00:00Z'))).toBe('2026-10');
    expect(previousMonth('Europe/London', new Date('2026-12-01T05:00:00Z'))).toBe('2026-11');
    expect(() => monthBounds('2026-13', 'Europe/London')).toThrow(/YYYY-MM/);
  });

  it('gives each site the month score, its change and the daily series as the database holds them', async () => {
    const f = await t.services.reportFigures.figures(london.org, '2026-11');
    expect(f.from).toBe('2026-11-01T00:00:00.000Z');
    expect(f.monthLabel).toBe('November 2026');
    const [s] = f.sites;
    const nov = await scoreFromDb(london.site, '2026-11');
    const oct = await scoreFromDb(london.site, '2026-10');
    expect(s.score).toBeCloseTo(nov!, 9);
    expect(s.previousScore).toBeCloseTo(oct!, 9);
    expect(s.change).toBeCloseTo(nov! - oct!, 9);
    expect(s.daily).toHaveLength(30);
    const [d1] = await t.dataSource.query(`SELECT explained, returns FROM daily_stats WHERE site_id = ? AND day = '2026-11-01'`, [london.site]);
    expect(s.daily[0]).toEqual({ day: '2026-11-01', score: (100 * d1.explained) / d1.returns });
    expect(s.daily.filter((d) => d.score !== null).map((d) => d.day)).toEqual(['2026-11-01', '2026-11-20']);
    expect(s.link).toBe(`${t.config.baseUrl}/sites/${london.site}`);
  });

  it('counts the flags raised inside each organization’s own month', async () => {
    const countIn = async (robotId: string, tz: string) => {
      const { start, end } = monthBounds('2026-11', tz);
      const [row] = await t.dataSource.query(`SELECT COUNT(*) AS n FROM robot_flags WHERE robot_id = ? AND raised_at >= ? AND raised_at < ?`, [robotId, start.toISOString().replace('T', ' ').replace('Z', ''), end.toISOString().replace('T', ' ').replace('Z', '')]);
      return Number(row.n);
    };
    const dn = await t.services.reportFigures.figures(denver.org, '2026-11');
    expect(dn.from).toBe('2026-11-01T06:00:00.000Z');
    expect(dn.sites[0].scannerFlags).toHaveLength(await countIn(denverRobot, 'America/Denver'));
    // 1 Nov 03:00Z is still October in Denver; 1 Dec 03:00Z is still November there.
    expect(dn.sites[0].scannerFlags.map((x) => x.raisedAt)).toEqual(['2026-11-15T12:00:00.000Z', '2026-12-01T03:00:00.000Z']);
    const ln = await t.services.reportFigures.figures(london.org, '2026-11');
    expect(ln.sites[0].scannerFlags.map((x) => x.raisedAt)).toEqual(['2026-11-01T03:00:00.000Z']);
    expect(dn.sites[0].score).toBeNull();
    expect(dn.sites[0].docking).toEqual({ total: 0, outOfTolerance: [], drifting: [] });
  });

  it('lists zones open at the month end by kind, their area, and remaps verified in the month or planned after it', async () => {
    const open = await insertZone(t.dataSource, london.site, mapId, 901);
    const missing = await insertZone(t.dataSource, london.site, mapId, 902);
    await t.dataSource.getRepository(Zone).update(missing, { kind: 'missing', areaM2: 1.5 });
    const resolvedInMonth = await insertZone(t.dataSource, london.site, mapId, 903);
    await t.dataSource.getRepository(Zone).update(resolvedInMonth, { status: 'resolved', statusChangedAt: new Date('2026-11-20T10:00:00Z') });
    const planned = await remapAt(t, london.site, 'scheduled');
    const done = await remapAt(t, london.site, 'scheduled');
    const verification = { state: 'verified' as const, evidenceDays: 4, zonesStillFlagging: 0, before: { agreement: 0.8, changedAreaM2: 0.25 }, after: { agreement: 0.95, changedAreaM2: 0 }, checkedAt: '2026-11-25T02:00:00.000Z' };
    await t.dataSource.getRepository(RemapRequest).update(done, { status: 'verified', verification });
    // Zones detected in November (the database stamps the real clock on insert).
    await t.dataSource.query(`UPDATE zones SET created_at = '2026-11-10 08:00:00' WHERE site_id = ?`, [london.site]);
    const late = await insertZone(t.dataSource, london.site, mapId, 904);
    await t.dataSource.query(`UPDATE zones SET created_at = '2026-12-01 00:30:00' WHERE id = ?`, [late]);

    const [s] = (await t.services.reportFigures.figures(london.org, '2026-11')).sites;
    const rows = await t.dataSource.query(`SELECT kind, area_m2 AS a FROM zones WHERE site_id = ? AND status IN ('open','acknowledged','planned') AND created_at < '2026-12-01 00:00:00'`, [london.site]);
    expect(s.openZones.new + s.openZones.missing + s.openZones.unmapped).toBe(rows.length);
    expect(s.openZones.missing).toBe(rows.filter((r: { kind: string }) => r.kind === 'missing').length);
    expect(s.changedAreaM2).toBeCloseTo(rows.reduce((a: number, r: { a: number }) => a + r.a, 0), 9);
    expect(s.zones.map((z) => z.number)).toEqual(expect.arrayContaining([901, 902]));
    expect(s.zones.map((z) => z.number)).not.toContain(903);
    expect(s.zones.map((z) => z.number)).not.toContain(904);
    const remaps = await t.dataSource.getRepository(RemapRequest).findBy({ siteId: london.site });
    expect(s.remapsDone.map((r) => r.number)).toEqual([remaps.find((r) => r.id === done)!.number]);
    expect(s.remapsPlanned.map((r) => r.number)).toEqual([remaps.find((r) => r.id === planned)!.number]);
    expect(open).toBeTruthy();

    // The same zone resolved in December still counted as open at November's end.
    await t.dataSource.getRepository(Zone).update(open, { status: 'resolved', statusChangedAt: new Date('2026-12-02T10:00:00Z') });
    const [again] = (await t.services.reportFigures.figures(london.org, '2026-11')).sites;
    expect(again.zones.map((z) => z.number)).toContain(901);
  });

  it('refuses a malformed month and an unknown organization', async () => {
    await expect(t.services.reportFigures.figures(london.org, '11-2026')).rejects.toThrow(/YYYY-MM/);
    await expect(t.services.reportFigures.figures(newId(), '2026-11')).rejects.toThrow(/organization/);
  });
});
