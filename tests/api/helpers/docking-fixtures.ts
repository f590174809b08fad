import type { DataSource } from 'typeorm';
import { formatMapMetadata } from '../../../shared/grid/map-metadata.js';
import { gridToImage } from '../../../shared/grid/image-to-grid.js';
import { encodePgm } from '../../../shared/grid/pgm.js';
import { chargerStationModel } from '../../../shared/sim/station-model.js';
import type { Actor } from '../../../server/auth/actor.js';
import type { Services } from '../../../server/services/index.js';

/** The invented charger model (shared/sim/station-model.ts) as a P5 PGM and its YAML. */
export function stationModelFiles(shape: Parameters<typeof chargerStationModel>[0] = {}) {
  const { grid, metadata } = chargerStationModel(shape);
  return { pgm: Buffer.from(encodePgm(gridToImage(grid))), yaml: Buffer.from(formatMapMetadata({ ...metadata, image: 'station.pgm' })) };
}

/** Uploads the invented charger as a station map version of a site; returns the version. */
export async function uploadStationModel(services: Services, actor: Actor, siteId: string, label: string) {
  const { pgm, yaml } = stationModelFiles();
  return services.mapVersions.upload(actor, siteId, { kind: 'station', label, image: { originalname: 'station.pgm', buffer: pgm }, metadataFile: { originalname: 'station.yaml', buffer: yaml } });
}

/** One docking line as a robot posts it (metres, radians). */
export function dockingLine(opts: { t?: string; station?: string; dx?: number; dy?: number; dyaw?: number; robot?: string }) {
  return JSON.stringify({ t: opts.t ?? '2026-11-03T08:15:02.120Z', station: opts.station ?? 'Charger bay 1', dx: opts.dx ?? 0.002, dy: opts.dy ?? -0.001, dyaw: opts.dyaw ?? 0.003, ...(opts.robot ? { robot: opts.robot } : {}) });
}

/** Counts the docking tables' rows, for "nothing changed" checks. */
export async function dockingCounts(db: DataSource) {
  const [batches, results] = await Promise.all([db.query('SELECT COUNT(*) AS n FROM docking_batches'), db.query('SELECT COUNT(*) AS n FROM docking_results')]);
  return { batches: batches[0].n as number, results: results[0].n as number };
}
