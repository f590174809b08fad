import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Site } from '../../server/entities/index.js';
import { SITE_SETTING_DEFAULTS } from '../../server/services/site-settings.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

describe('site settings', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let iris: string;
  let nadia: string;
  const settingsOf = (site: string) => `/api/sites/${site}/settings`;
  const stored = async () => t.dataSource.getRepository(Site).findOneByOrFail({ id: ids.ambergateSite });

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    iris = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
    nadia = await signIn(t.app, 'nadia.manager@ambergate.example', 'demo-manager-2026');
  });
  afterAll(() => t.close());

  it('when a site manager reads the settings, then the defaults apply and they may not edit', async () => {
    const res = await request(t.app).get(settingsOf(ids.ambergateSite)).set('Cookie', nadia);
    expect(res.status).toBe(200);
    expect(res.body.settings).toEqual({ timezone: 'Europe/London', values: SITE_SETTING_DEFAULTS, defaults: SITE_SETTING_DEFAULTS, canEdit: false });
  });

  it('when an admin changes the detection hour, band and time zone, then they apply, are audited, and a default is stored as absent', async () => {
    const res = await request(t.app).patch(settingsOf(ids.ambergateSite)).set('Cookie', iris).send({ detectionHour: 4, healthWatchMin: 92, timezone: 'Europe/Dublin', clearZoneAfterRuns: SITE_SETTING_DEFAULTS.clearZoneAfterRuns });
    expect(res.status).toBe(200);
    expect(res.body.settings.canEdit).toBe(true);
    expect(res.body.settings.timezone).toBe('Europe/Dublin');
    expect(res.body.settings.values).toMatchObject({ detectionHour: 4, healthWatchMin: 92, healthGoodMin: 97 });
    const site = await stored();
    expect(site.timezone).toBe('Europe/Dublin');
    expect(site.settings).toEqual({ detectionHour: 4, healthWatchMin: 92 });
    const audit = await t.dataSource.getRepository(AuditEvent).findOneByOrFail({ action: 'site.settings' });
    expect(audit.summary).toMatch(/detectionHour 2 → 4, healthWatchMin 90 → 92, timezone Europe\/London → Europe\/Dublin/);
    // The site's health reads the new band at once.
    const health = await request(t.app).get(`/api/sites/${ids.ambergateSite}`).set('Cookie', nadia);
    expect(health.body.site.health.bands).toEqual({ goodMin: 97, watchMin: 92 });
    // Setting a value back to its default forgets it.
    await request(t.app).patch(settingsOf(ids.ambergateSite)).set('Cookie', iris).send({ detectionHour: SITE_SETTING_DEFAULTS.detectionHour });
    expect((await stored()).settings).toEqual({ healthWatchMin: 92 });
  });

  it('when a change is out of range, of the wrong type, unknown, empty, or breaks a rule between fields, then 400 names it and nothing changes', async () => {
    const before = await stored();
    const cases: Array<[unknown, RegExp, string]> = [
      [{ detectionHour: 24 }, /detectionHour: must be at most 23/, 'detectionHour'],
      [{ detectionHour: 2.5 }, /whole number/, 'detectionHour'],
      [{ healthGoodMin: '97' }, /healthGoodMin/, 'healthGoodMin'],
      [{ agreementToleranceM: 0 }, /at least 0.02/, 'agreementToleranceM'],
      [{ timezone: 'Mars/Olympus' }, /IANA time zone/, 'timezone'],
      [{ agreementBlockM: 1 }, /agreementBlockM|Unrecognized/i, ''],
      [{}, /at least one setting/, ''],
      [{ healthGoodMin: 92 }, /"good" band must start above the "watch" band/, 'healthGoodMin'],
      [{ healthWatchMin: 98 }, /"good" band must start above the "watch" band/, 'healthWatchMin'],
      [{ retentionDays: 20 }, /at least 28 days/, 'retentionDays'],
      [{ detectionWindowDays: 50 }, /at least 64 days/, 'detectionWindowDays'],
    ];
    for (const [body, message, field] of cases) {
      const res = await request(t.app).patch(settingsOf(ids.ambergateSite)).set('Cookie', iris).send(body as object);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.message).toMatch(message);
      if (field) expect(Object.keys(res.body.error.details.fieldErrors), JSON.stringify(body)).toContain(field);
    }
    const after = await stored();
    expect(after.settings).toEqual(before.settings);
    expect(after.timezone).toBe(before.timezone);
  });

  it('when a site manager tries to change a setting, then 403; another organization’s site is 404 to them', async () => {
    expect((await request(t.app).patch(settingsOf(ids.ambergateSite)).set('Cookie', nadia).send({ detectionHour: 5 })).status).toBe(403);
    expect((await request(t.app).get(settingsOf(ids.corvaneSite)).set('Cookie', nadia)).status).toBe(404);
  });
});
