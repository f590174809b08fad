import { gridToImage } from '../../../shared/grid/image-to-grid.js';
import { formatMapMetadata } from '../../../shared/grid/map-metadata.js';
import { encodePgm } from '../../../shared/grid/pgm.js';
import { planChanges, structureOnDay } from '../../../shared/sim/changes.js';
import { SIM_MAP_RESOLUTION, type Scenario, type ScenarioOptions } from '../../../shared/sim/scenario.js';
import { gridGeometryFor, rasterizeMappingRun } from '../../../shared/sim/stored-map.js';

/**
 * The map a remap run on scenario day `day` would make: the building as it stands that day (its
 * scripted changes in), rasterized like the scenario's own stored map (same geometry, same places
 * the mapping robot drove), except the scripted changes named in `notRedriven` (ids of
 * shared/sim/changes.ts), which stay as the old map had them. Returns the PGM and its YAML, ready to upload.
 */
export function remappedMap(scenario: Scenario, options: ScenarioOptions, day: number, notRedriven: string[] = []) {
  const { layout } = scenario;
  const plan = planChanges(layout, options.seed, options.days, options.changes);
  const redriven = { ...plan, changes: plan.changes.filter((c) => !notRedriven.includes(c.id)) };
  const structure = structureOnDay(layout, redriven, day);
  // The same drive as the scenario's mapping run (shared/sim/scenario.ts): every route and aisle, and the open area.
  const seeds: [number, number][] = [];
  for (const r of scenario.robots) for (let k = 0; k < r.route.points.length; k += 2) seeds.push([r.route.points[k], r.route.points[k + 1]]);
  for (const x of layout.aisleX) seeds.push([x, layout.crossAisleY]);
  seeds.push([(layout.openArea.minX + layout.openArea.maxX) / 2, (layout.openArea.minY + layout.openArea.maxY) / 2]);
  const geometry = gridGeometryFor({ minX: 0, minY: 0, maxX: layout.width, maxY: layout.depth }, SIM_MAP_RESOLUTION, 1);
  const grid = rasterizeMappingRun(geometry, { structure, seeds, blanked: plan.blanked });
  return { pgm: Buffer.from(encodePgm(gridToImage(grid))), yaml: Buffer.from(formatMapMetadata(scenario.metadata)) };
}
