import { computed, ref } from 'vue';
import { listSites } from '@/api/sites.api';
import type { HealthBand, Site } from '@/api/types';
import { useAsync } from './useAsync';

/** A customer organization that owns at least one of the listed sites. */
export interface CustomerOption {
  id: string;
  name: string;
}

/** The band filter: one band, or sites without a score yet. */
export type BandFilter = HealthBand | 'none';

/** How the card view orders sites; the table sorts by its own column headers, starting with the same worst-first order. */
export type SiteOrder = 'worst-score' | 'biggest-drop' | 'most-zones' | 'name';

/** Sites without a score go last in every order: there is nothing to compare yet. */
const byScore = (a: Site, b: Site) => (a.health.score ?? Infinity) - (b.health.score ?? Infinity);
const byChange = (a: Site, b: Site) => (a.health.change7d ?? Infinity) - (b.health.change7d ?? Infinity);
const zoneTotal = (site: Site) => site.health.openZones.new + site.health.openZones.missing + site.health.openZones.unmapped;
const comparators: Record<SiteOrder, (a: Site, b: Site) => number> = {
  'worst-score': (a, b) => byScore(a, b) || a.name.localeCompare(b.name),
  'biggest-drop': (a, b) => byChange(a, b) || byScore(a, b) || a.name.localeCompare(b.name),
  'most-zones': (a, b) => zoneTotal(b) - zoneTotal(a) || b.health.changedAreaM2 - a.health.changedAreaM2 || a.name.localeCompare(b.name),
  name: (a, b) => a.name.localeCompare(b.name),
};

/** Loads the visible sites and filters them by free text, customer and health band: `{ data, isLoading, error, run }` plus filter state. */
export function useSites() {
  const state = useAsync(listSites);
  const text = ref('');
  const customerId = ref<string | null>(null);
  const band = ref<BandFilter | null>(null);
  const order = ref<SiteOrder>('worst-score');

  const customers = computed<CustomerOption[]>(() => {
    const byId = new Map<string, string>();
    for (const site of state.data.value ?? []) byId.set(site.organization.id, site.organization.name);
    return [...byId].map(([id, name]) => ({ id, name })).sort((a, b) => a.name.localeCompare(b.name));
  });

  const filtered = computed<Site[]>(() => {
    const needle = text.value.trim().toLocaleLowerCase();
    const matching = (state.data.value ?? []).filter((site) => {
      if (customerId.value && site.organization.id !== customerId.value) return false;
      if (band.value && (site.health.band ?? 'none') !== band.value) return false;
      if (!needle) return true;
      return [site.name, site.city, site.organization.name, site.timezone].some((field) => field.toLocaleLowerCase().includes(needle));
    });
    return matching.sort(comparators[order.value]);
  });

  const isFiltered = computed(() => text.value.trim().length > 0 || customerId.value !== null || band.value !== null);

  function clearFilters(): void {
    text.value = '';
    customerId.value = null;
    band.value = null;
  }

  return { ...state, text, customerId, band, order, customers, filtered, isFiltered, clearFilters };
}
