import { DateTime } from 'luxon';
import type { DataSource } from 'typeorm';
import { formatMapMetadata } from '../../shared/grid/map-metadata.js';
import { gridToImage } from '../../shared/grid/image-to-grid.js';
import { encodePgm } from '../../shared/grid/pgm.js';
import { simulateDockings, type StationBehaviour } from '../../shared/sim/docking.js';
import { chargerStationModel, type ChargerShape } from '../../shared/sim/station-model.js';
import type { Actor } from '../auth/actor.js';
import { DockingBatch, DockingStation, Robot, Site } from '../entities/index.js';
import type { Services } from './index.js';

// The demo's docking stations are invented like the rest of the scenario: two or three chargers
// per site, each with its station model, and weeks of dockings by the site's robots. One station
// drifts: Charger bay 2 at Fennick Cross was knocked five days before the demo starts.

interface DemoStation {
  name: string;
  shape: Partial<ChargerShape>;
  /** The simulated behaviour; the day of a step counts from the first demo day. */
  behaviour: (days: number) => StationBehaviour;
}

const DEMO_STATIONS: Record<string, DemoStation[]> = {
  'Fennick Cross DC': [
    { name: 'Charger bay 1', shape: {}, behaviour: () => ({ seed: 8101, bias: [0.0015, -0.001] }) },
    // Knocked by a pallet truck in the afternoon, five days before the demo's last day: 18 mm along x, 4 mm along y.
    { name: 'Charger bay 2', shape: {}, behaviour: (days) => ({ seed: 8102, step: { day: Math.max(0, days - 5), hour: 14.3, dx: 0.018, dy: -0.004 } }) },
    { name: 'Tugger dock', shape: { bodyWidthM: 0.4, funnel: false }, behaviour: () => ({ seed: 8103, bias: [-0.002, 0.0005], burstDays: [6, 19] }) },
  ],
  'Tarrow Heath Cold Store': [
    { name: 'Charger bay 1', shape: {}, behaviour: () => ({ seed: 8201, bias: [0.001, 0.002] }) },
    { name: 'Charger bay 2', shape: { bodyWidthM: 0.28 }, behaviour: () => ({ seed: 8202 }) },
  ],
  'Lowen Harbour Hub': [
    { name: 'Charger bay A', shape: {}, behaviour: () => ({ seed: 8301 }) },
    // A slow creep that stays inside the tolerance for weeks yet: reported, not flagged.
    { name: 'Charger bay B', shape: {}, behaviour: () => ({ seed: 8302, creepPerDay: [0.00012, 0] }) },
    { name: 'Trailer-side charger', shape: { bodyWidthM: 0.4 }, behaviour: () => ({ seed: 8303, bias: [0, -0.0025] }) },
  ],
  'Brindle Ford Crossdock': [
    { name: 'Charger bay 1', shape: {}, behaviour: () => ({ seed: 8401 }) },
    { name: 'Charger bay 2', shape: { funnel: false }, behaviour: () => ({ seed: 8402, bias: [0.002, 0] }) },
  ],
  'Quarrington Vale Returns': [
    { name: 'Charger bay 1', shape: {}, behaviour: () => ({ seed: 8501, burstDays: [11] }) },
    { name: 'Charger bay 2', shape: {}, behaviour: () => ({ seed: 8502 }) },
  ],
};

/** The number of demo stations (for the seed test). */
export const DEMO_STATION_COUNT = Object.values(DEMO_STATIONS).reduce((n, list) => n + list.length, 0);

/**
 * Gives each demo site its stations, a station model each (uploaded like a mapper would, 5 mm per
 * cell) and `days` days of dockings by its robots ending yesterday (site-local), posted through
 * the docking ingest as each robot would. Resumable: existing stations and models are kept, and
 * a robot's batch that was already received is recognised and counts nothing.
 */
export async function seedDemoDocking(db: DataSource, services: Services, actor: Actor, today: Date, days: number): Promise<void> {
  for (const [siteName, stations] of Object.entries(DEMO_STATIONS)) {
    const site = await db.getRepository(Site).findOneBy({ name: siteName });
    if (!site) continue;
    const robots = await db.getRepository(Robot).find({ where: { siteId: site.id }, order: { name: 'ASC' } });
    const startDate = DateTime.fromJSDate(today, { zone: site.timezone }).startOf('day').minus({ days }).toISODate()!;
    const models = await services.mapVersions.list(actor, site.id, 'station');
    const lines = new Map<string, string[]>(robots.map((r) => [r.name, []]));
    for (const demo of stations) {
      let station = await db.getRepository(DockingStation).findOneBy({ siteId: site.id, name: demo.name });
      if (!station) {
        await services.docking.create(actor, site.id, { name: demo.name }, today);
        station = await db.getRepository(DockingStation).findOneByOrFail({ siteId: site.id, name: demo.name });
      }
      if (!station.modelVersionId) {
        let model = models.find((m) => m.label === demo.name);
        if (!model) {
          const { grid, metadata } = chargerStationModel(demo.shape);
          const image = { originalname: 'station.pgm', buffer: Buffer.from(encodePgm(gridToImage(grid))) };
          const metadataFile = { originalname: 'station.yaml', buffer: Buffer.from(formatMapMetadata({ ...metadata, image: 'station.pgm' })) };
          model = await services.mapVersions.upload(actor, site.id, { kind: 'station', label: demo.name, image, metadataFile });
        }
        // Attached before the first docking, so that every demo docking counts against this model.
        await services.docking.attachModel(actor, site.id, station.id, model.id, new Date(DateTime.fromISO(startDate, { zone: site.timezone }).toMillis()));
      }
      for (const d of simulateDockings(demo.behaviour(days), robots.map((r) => r.name), startDate, days, site.timezone)) {
        lines.get(d.robot)!.push(JSON.stringify({ t: d.t, station: demo.name, dx: +d.dx.toFixed(5), dy: +d.dy.toFixed(5), dyaw: +d.dyaw.toFixed(5) }));
      }
    }
    for (const robot of robots) {
      const body = lines.get(robot.name)!;
      // A robot that already posted its demo dockings (an earlier, interrupted start) posts nothing new.
      if (body.length === 0 || (await db.getRepository(DockingBatch).existsBy({ siteId: site.id, robotId: robot.id }))) continue;
      // Each robot posts its weeks of dockings as one batch, keyed like a robot would key it.
      await services.docking.ingestRobotBatch(robot, Buffer.from(body.join('\n')), `demo-docking-${robot.name}-${startDate}`, today);
    }
  }
}
