import { listZones, type Zone, type ZoneStatus } from '@/api/zones.api';
import { useAsync } from './useAsync';

/** Largest page the zones API serves. */
const PAGE_SIZE = 200;
/** The statuses the map draws: zones still to deal with ('active' in the zones filter). */
const SHOWN: readonly ZoneStatus[] = ['open', 'acknowledged', 'planned'];

/**
 * The zones the map draws: every zone of the site still to deal with (open, acknowledged, planned)
 * on the given map version, all pages, as `{ data, isLoading, error, run }`; `replace` puts a zone
 * the user just changed into the list (or takes it out once it is no longer to deal with).
 */
export function useSiteMapZones(siteId: () => string) {
  const state = useAsync(async (mapVersionId: string) => {
    const zones: Zone[] = [];
    for (let page = 1; ; page++) {
      const answer = await listZones(siteId(), { status: 'active' }, page, PAGE_SIZE);
      zones.push(...answer.zones);
      if (answer.zones.length === 0 || zones.length >= answer.total) break;
    }
    // Zones belong to the version they were found on; after an activation the old ones stay listed until they clear.
    return zones.filter((z) => z.mapVersionId === mapVersionId);
  });

  function replace(zone: Zone): void {
    const current = state.data.value;
    if (!current) return;
    const merged = current.map((z) => (z.id === zone.id ? { ...z, ...zone } : z));
    state.data.value = merged.filter((z) => SHOWN.includes(z.status));
  }

  return { ...state, replace };
}
