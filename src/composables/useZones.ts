import { reactive, ref } from 'vue';
import { listZones, type Zone, type ZoneFilter, type ZonePage } from '@/api/zones.api';
import { useAsync } from './useAsync';

/** Largest page the API serves; the CSV export walks the filter's pages at this size. */
const EXPORT_PAGE_SIZE = 200;

/**
 * One site's zones table: `{ data, isLoading, error, run }` for the current page, the filter
 * (status 'active' by default), paging, a way to put a changed zone into the page, and `fetchAll`
 * for the CSV export of everything the filter matches.
 */
export function useZones(siteId: () => string) {
  const filter = reactive<ZoneFilter>({ status: 'active' });
  const page = ref(1);
  const pageSize = ref(25);
  const state = useAsync(() => listZones(siteId(), { ...filter }, page.value, pageSize.value));
  const exporting = useAsync(async () => {
    const zones: Zone[] = [];
    for (let p = 1; ; p++) {
      const answer = await listZones(siteId(), { ...filter }, p, EXPORT_PAGE_SIZE);
      zones.push(...answer.zones);
      if (answer.zones.length === 0 || zones.length >= answer.total) return zones;
    }
  });

  /** Shows page `next` (1-based) at `size` rows. */
  function goTo(next: number, size = pageSize.value): Promise<ZonePage | undefined> {
    page.value = next;
    pageSize.value = size;
    return state.run();
  }

  /** Sets the filter and goes back to the first page. */
  function applyFilter(next: ZoneFilter): Promise<ZonePage | undefined> {
    for (const key of Object.keys(filter) as (keyof ZoneFilter)[]) delete filter[key];
    Object.assign(filter, next);
    return goTo(1);
  }

  /** Puts a zone the user just changed into the shown page, so its new status shows without a reload. */
  function replace(zone: Zone): void {
    const current = state.data.value;
    if (!current) return;
    state.data.value = { ...current, zones: current.zones.map((z) => (z.id === zone.id ? { ...z, ...zone } : z)) };
  }

  return {
    ...state,
    filter,
    page,
    pageSize,
    goTo,
    applyFilter,
    replace,
    fetchAll: exporting.run,
    isExporting: exporting.isLoading,
    exportError: exporting.error,
  };
}
