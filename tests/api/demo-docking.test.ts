import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DockingStation, MapVersion, Site, User } from '../../server/entities/index.js';
import { DEMO_STATION_COUNT, seedDemoDocking } from '../../server/services/demo-docking.js';
import { dockingCounts } from './helpers/docking-fixtures.js';
import { createTestApp, demoIds, type TestApp } from './helpers/test-app.js';

describe('demo docking stations', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  const today = new Date();

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    const mapper = await t.dataSource.getRepository(User).findOneByOrFail({ email: 'tomas.mapper@kestrelway.example' });
    await seedDemoDocking(t.dataSource, t.services, { id: mapper.id, email: mapper.email, name: mapper.name, role: mapper.role, organizationId: mapper.organizationId }, today, 28);
  });
  afterAll(() => t.close());

  it('when the demo is seeded, then every site has its stations, each with a 5 mm station model and weeks of dockings', async () => {
    const stations = await t.dataSource.getRepository(DockingStation).find({ relations: { modelVersion: true } });
    expect(stations).toHaveLength(DEMO_STATION_COUNT);
    expect(new Set(stations.map((s) => s.siteId)).size).toBe(await t.dataSource.getRepository(Site).count());
    expect(stations.every((s) => s.modelVersion?.kind === 'station' && s.modelVersion.resolution === 0.005)).toBe(true);
    expect(await t.dataSource.getRepository(MapVersion).countBy({ kind: 'station' })).toBe(DEMO_STATION_COUNT);
    const { results } = await dockingCounts(t.dataSource);
    expect(results).toBeGreaterThan(DEMO_STATION_COUNT * 28);
  });

  it('when the stations are judged, then Charger bay 2 at Fennick Cross drifts and no other station does', async () => {
    const states: string[] = [];
    for (const site of await t.dataSource.getRepository(Site).find()) {
      const { stations } = await t.services.docking.list(ids.admin, site.id, today);
      for (const s of stations) states.push(`${site.name} / ${s.name}: ${s.verdict.state}`);
    }
    expect(states.filter((s) => s.endsWith('drifting'))).toEqual(['Fennick Cross DC / Charger bay 2: drifting']);
    expect(states.filter((s) => s.endsWith('insufficient'))).toEqual([]);
  });

  it('when the seed runs again, then it adds nothing', async () => {
    const before = { counts: await dockingCounts(t.dataSource), versions: await t.dataSource.getRepository(MapVersion).count() };
    const mapper = await t.dataSource.getRepository(User).findOneByOrFail({ email: 'tomas.mapper@kestrelway.example' });
    await seedDemoDocking(t.dataSource, t.services, { id: mapper.id, email: mapper.email, name: mapper.name, role: mapper.role, organizationId: mapper.organizationId }, today, 28);
    expect({ counts: await dockingCounts(t.dataSource), versions: await t.dataSource.getRepository(MapVersion).count() }).toEqual(before);
  });
});
