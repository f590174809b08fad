import pino from 'pino';
import { describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.js';
import { testConfig } from '../../server/config.js';
import { openDatabase } from '../../server/data-source.js';
import { DockingStation, MapVersion, Organization, Robot, ScanBatch, Site, User } from '../../server/entities/index.js';
import { DEMO_STATION_COUNT } from '../../server/services/demo-docking.js';
import { seedDemo } from '../../server/services/demo-seed.service.js';

const log = pino({ level: 'silent' });

describe('demo seed', () => {
  // Seeds five sites through the real ingest path: allow for a busy machine.
  it('when seeding an empty database, then every site gets an active map, its simulated robots and days of counted scans; a second run changes nothing', async () => {
    const db = await openDatabase({ database: ':memory:' });
    const { services } = createApp({ config: testConfig(), dataSource: db, log });
    expect(await seedDemo(db, services, log, { days: 2, today: new Date('2026-11-20T12:00:00Z') })).toBe(true);
    const counts = async () => [await db.getRepository(Organization).count(), await db.getRepository(User).count(), await db.getRepository(Site).count(), await db.getRepository(ScanBatch).count()];
    const first = await counts();
    // Per site: one scan batch a day and one batch of the last day's pose reports.
    expect(first).toEqual([3, 5, 5, 15]);
    expect(await db.getRepository(MapVersion).countBy({ status: 'active', kind: 'floor' })).toBe(5);
    // Docking: two or three stations per site, each with its station model (a draft: station models are not activated).
    expect(await db.getRepository(DockingStation).count()).toBe(DEMO_STATION_COUNT);
    expect(await db.getRepository(MapVersion).countBy({ kind: 'station' })).toBe(DEMO_STATION_COUNT);
    const batches = await db.getRepository(ScanBatch).find();
    expect(batches.every((b) => b.status === 'counted' && b.rejectedCount === 0)).toBe(true);
    expect(batches.filter((b) => b.scans > 0)).toHaveLength(10);
    expect(batches.filter((b) => b.poses > 0 && b.scans === 0)).toHaveLength(5);
    const admin = await db.getRepository(User).findOneByOrFail({ role: 'admin' });
    const actor = { id: admin.id, email: admin.email, name: admin.name, role: admin.role, organizationId: admin.organizationId };
    const paths = await services.paths.recent(actor, (await db.getRepository(Site).findOneByOrFail({ name: 'Fennick Cross DC' })).id, 24);
    expect(paths!.robots.map((r) => r.name)).toEqual(['AMR-01', 'AMR-02', 'AMR-03', 'AMR-04']);
    expect(new Set(batches.flatMap((b) => b.days))).toContain('2026-11-19');
    const fennick = await db.getRepository(Site).findOneByOrFail({ name: 'Fennick Cross DC' });
    expect((await db.getRepository(Robot).findBy({ siteId: fennick.id })).map((r) => r.name).sort()).toEqual(['AMR-01', 'AMR-02', 'AMR-03', 'AMR-04']);
    expect(await seedDemo(db, services, log)).toBe(false);
    expect(await counts()).toEqual(first);
    await db.destroy();
  }, 120_000);

  it('when the database already has an organization of its own, then the seed leaves it alone', async () => {
    const db = await openDatabase({ database: ':memory:' });
    await db.getRepository(Organization).insert({ id: '11111111-1111-4111-8111-111111111111', name: 'Existing Operator', kind: 'operator', timezone: 'UTC' });
    expect(await seedDemo(db, null, log)).toBe(false);
    expect(await db.getRepository(User).count()).toBe(0);
    await db.destroy();
  });
});

describe('demo remap', () => {
  it('when the first detection has found zones at Lowen Harbour Hub, then the seed requests and schedules one remap of its two most severe persistent zones, once', async () => {
    const { createTestApp, demoIds } = await import('./helpers/test-app.js');
    const { insertZone, roomMap } = await import('./helpers/fixtures.js');
    const { seedDemoRemap } = await import('../../server/services/demo-seed.service.js');
    const t = await createTestApp();
    try {
      const ids = await demoIds(t.dataSource);
      const { pgm, yaml } = roomMap();
      const map = await t.services.mapVersions.upload(ids.admin, ids.corvaneSite, { kind: 'floor', label: 'room', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
      await t.services.mapVersions.activate(ids.admin, ids.corvaneSite, map.id);
      for (const n of [1, 2, 3]) await insertZone(t.dataSource, ids.corvaneSite, map.id, n);
      // Two weeks of day shifts (06–22 UTC) for the quiet-window planner; nights are empty.
      const { HourlyTraffic } = await import('../../server/entities/index.js');
      const hours = [];
      for (let h = Date.parse('2026-10-26T00:00:00Z'); h < Date.parse('2026-11-09T12:00:00Z'); h += 3_600_000) {
        if (new Date(h).getUTCHours() >= 6 && new Date(h).getUTCHours() < 22) hours.push({ siteId: ids.corvaneSite, hourStartMs: h, scans: 60, returns: 1000 });
      }
      await t.dataSource.getRepository(HourlyTraffic).insert(hours);
      await seedDemoRemap(t.dataSource, t.services, pino({ level: 'silent' }), new Date('2026-11-09T12:00:00Z'));
      await seedDemoRemap(t.dataSource, t.services, pino({ level: 'silent' }), new Date('2026-11-09T12:00:00Z'));
      const { remaps, total } = await t.services.remaps.list(ids.admin, ids.corvaneSite, { page: 1, pageSize: 10 });
      expect(total).toBe(1);
      expect(remaps[0]).toMatchObject({ status: 'scheduled', requestedBy: { name: expect.any(String) }, assignee: { name: expect.any(String) } });
      expect(remaps[0].zones).toHaveLength(2);
      expect(new Date(remaps[0].window!.start).getTime()).toBeGreaterThan(new Date('2026-11-09T12:00:00Z').getTime());
    } finally {
      await t.close();
    }
  });
});
