import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Robot } from '../../server/entities/index.js';
import { roomMap, scanLine } from './helpers/fixtures.js';
import { createTestApp, demoIds, type TestApp } from './helpers/test-app.js';

describe('hourly traffic', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    const { pgm, yaml } = roomMap();
    const map = await t.services.mapVersions.upload(ids.admin, ids.ambergateSite, { kind: 'floor', label: 'traffic room', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
    await t.services.mapVersions.activate(ids.admin, ids.ambergateSite, map.id);
  });
  afterAll(() => t.close());

  it('when scans arrive in two hours and a batch is replayed, then each UTC hour holds its scans and returns once', async () => {
    const robot = await t.dataSource.getRepository(Robot).findOneByOrFail({ id: ids.ambergateRobot });
    // Each scan has two beams: one return at 1 m, one "no return" (null).
    const line = (t: string) => scanLine({ t, ranges: [1.0, null] });
    const body = Buffer.from([line('2026-11-03T08:59:59.900Z'), line('2026-11-03T09:00:00.000Z'), line('2026-11-03T09:30:00Z'), JSON.stringify({ t: '2026-11-03T10:00:00Z', robot: 'AMR-01', pose: [1, 1, 0] })].join('\n'));
    await t.services.ingest.ingestRobotBatch(robot, body, 'traffic-1');
    await t.services.ingest.ingestRobotBatch(robot, body, 'traffic-1');
    const hours = await t.services.traffic.hourly(ids.ambergateSite, Date.UTC(2026, 10, 3, 0), Date.UTC(2026, 10, 4, 0));
    // The pose report at 10:00 is not traffic: it carries no beams.
    expect(hours).toEqual([
      { hourStartMs: Date.UTC(2026, 10, 3, 8), scans: 1, returns: 1 },
      { hourStartMs: Date.UTC(2026, 10, 3, 9), scans: 2, returns: 2 },
    ]);
    // The window is half-open: [09:00, …) leaves 08:00 out.
    expect(await t.services.traffic.hourly(ids.ambergateSite, Date.UTC(2026, 10, 3, 9), Date.UTC(2026, 10, 3, 10))).toHaveLength(1);
  });
});
