import { gridToImage } from '../../../shared/grid/image-to-grid.js';
import { formatMapMetadata } from '../../../shared/grid/map-metadata.js';
import { encodePgm } from '../../../shared/grid/pgm.js';
import { createScenario, type ScenarioOptions } from '../../../shared/sim/scenario.js';
import { Robot, Site } from '../../../server/entities/index.js';
import { demoIds, type TestApp } from './test-app.js';

/**
 * Turns the demo site Fennick Cross DC into a simulated building of our own: its robots become
 * the scenario's fleet, the scenario's map is uploaded and activated, and every day's scans are
 * counted through the ingest service as of `now`. Returns the site.
 */
export async function simulatedSite(t: TestApp, options: ScenarioOptions, now: Date): Promise<Site> {
  const ids = await demoIds(t.dataSource);
  const scenario = createScenario(options);
  const site = await t.dataSource.getRepository(Site).findOneByOrFail({ id: ids.ambergateSite });
  await t.dataSource.getRepository(Robot).delete({ siteId: site.id });
  for (const r of scenario.truth.robots) {
    await t.services.robots.create(ids.admin, site.id, { name: r.name, model: 'Simulated', mounts: r.mounts.map(({ name, x, y, yaw }) => ({ name, x, y, yaw })) });
  }
  const map = await t.services.mapVersions.upload(ids.admin, site.id, {
    kind: 'floor',
    label: 'simulated',
    image: { originalname: 'map.pgm', buffer: Buffer.from(encodePgm(gridToImage(scenario.map))) },
    metadataFile: { originalname: 'map.yaml', buffer: Buffer.from(formatMapMetadata(scenario.metadata)) },
  });
  await t.services.mapVersions.activate(ids.admin, site.id, map.id);
  for (let day = 0; day < options.days; day++) {
    const lines = (function* () {
      for (const s of scenario.scansForDay(day)) yield JSON.stringify(s);
    })();
    await t.services.ingest.countLines(site, lines, `day-${day}.jsonl`, now);
  }
  return site;
}
