import { computed, ref } from 'vue';
import { listSites } from '@/api/sites.api';
import type { Site } from '@/api/types';
import { useAsync } from './useAsync';

/** A customer organization that owns at least one of the listed sites. */
export interface CustomerOption {
  id: string;
  name: string;
}

/** Loads the visible sites and filters them by free text and customer: `{ data, isLoading, error, run }` plus filter state. */
export function useSites() {
  const state = useAsync(listSites);
  const text = ref('');
  const customerId = ref<string | null>(null);

  const customers = computed<CustomerOption[]>(() => {
    const byId = new Map<string, string>();
    for (const site of state.data.value ?? []) byId.set(site.organization.id, site.organization.name);
    return [...byId].map(([id, name]) => ({ id, name })).sort((a, b) => a.name.localeCompare(b.name));
  });

  const filtered = computed<Site[]>(() => {
    const needle = text.value.trim().toLocaleLowerCase();
    return (state.data.value ?? []).filter((site) => {
      if (customerId.value && site.organization.id !== customerId.value) return false;
      if (!needle) return true;
      return [site.name, site.city, site.organization.name, site.timezone].some((field) => field.toLocaleLowerCase().includes(needle));
    });
  });

  const isFiltered = computed(() => text.value.trim().length > 0 || customerId.value !== null);

  function clearFilters(): void {
    text.value = '';
    customerId.value = null;
  }

  return { ...state, text, customerId, customers, filtered, isFiltered, clearFilters };
}
