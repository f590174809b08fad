import { appConfig } from '@/config';
import { apiRequest } from './client';
import { TILE_STYLE } from '../../shared/render/palette';

/** Counts per class of change, on the base version's cells: cells, or m² (cells × the base's resolution²). */
export interface MapDiffClasses {
  /** Base free or unknown → other occupied. */
  added: number;
  /** Base occupied → other free. */
  removed: number;
  /** Base unknown → other free or occupied. */
  revealed: number;
  /** Base free or occupied → other unknown (also where the other map does not reach). */
  hidden: number;
}

/** The difference of one floor version (other) against another (base), compared on the base's cells. */
export interface MapDiff {
  base: { id: string; version: number };
  other: { id: string; version: number };
  cells: MapDiffClasses;
  areasM2: MapDiffClasses;
  /** The base's resolution, metres per cell. */
  resolution: number;
  comparedOn: 'base';
}

const versionPath = (siteId: string, versionId: string) => `/sites/${encodeURIComponent(siteId)}/map-versions/${encodeURIComponent(versionId)}`;

/** Returns what version `otherId` changes against the base `baseId` (both floor versions of the site), in cells and m² of the base. */
export async function getMapDiff(siteId: string, baseId: string, otherId: string): Promise<MapDiff> {
  return (await apiRequest<{ diff: MapDiff }>(`${versionPath(siteId, baseId)}/diff`, { query: { against: otherId } })).diff;
}

/**
 * Returns the Leaflet URL template ({z}/{x}/{y}) of the overlay tiles of `otherId` against `baseId`,
 * in the base's tile pyramid; the tile style makes browsers fetch anew after a change of look.
 */
export function diffTileUrlTemplate(siteId: string, baseId: string, otherId: string): string {
  return `${appConfig.apiBaseUrl}${versionPath(siteId, baseId)}/diff-tiles/{z}/{x}/{y}.png?against=${encodeURIComponent(otherId)}&style=${TILE_STYLE}`;
}
