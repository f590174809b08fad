import { computed } from 'vue';
import { appConfig } from '@/config';
import { listMapVersions, type MapVersion } from '@/api/maps.api';
import { TILE_STYLE } from '../../shared/render/palette';
import type { GridGeometry } from '../../shared/types/grid';
import { useAsync } from './useAsync';

/**
 * The site map's base: the site's map versions as `{ data, isLoading, error, run }` and the active
 * floor version among them (null when none is active), whose grid the map shows.
 */
export function useSiteMap(siteId: () => string) {
  const versions = useAsync(() => listMapVersions(siteId()));
  const activeFloor = computed<MapVersion | null>(() => versions.data.value?.find((v) => v.kind === 'floor' && v.status === 'active') ?? null);
  return { ...versions, activeFloor };
}

/** Returns a map version's size and placement (cells, m/cell, origin in metres and radians) for the CRS and tile maths. */
export function versionGeometry(version: MapVersion): GridGeometry {
  return { width: version.width, height: version.height, resolution: version.resolution, origin: { ...version.origin } };
}

/**
 * Returns the Leaflet URL template ({z}/{x}/{y}) of a version's grid tiles, which the server renders
 * in the map palette; the tile style in the query makes browsers fetch anew after a change of look.
 */
export function gridTileUrlTemplate(siteId: string, versionId: string): string {
  return `${appConfig.apiBaseUrl}/sites/${encodeURIComponent(siteId)}/map-versions/${encodeURIComponent(versionId)}/tiles/{z}/{x}/{y}.png?style=${TILE_STYLE}`;
}
