import { ref } from 'vue';
import { createRemap, listRemaps, type RemapPage, type RemapStatus } from '@/api/remaps.api';
import { useAsync } from './useAsync';

/**
 * One site's remap requests table: `{ data, isLoading, error, run }` for the current page, the
 * status filter (all by default) and paging.
 */
export function useRemaps(siteId: () => string) {
  const status = ref<RemapStatus | null>(null);
  const page = ref(1);
  const pageSize = ref(25);
  const state = useAsync(() => listRemaps(siteId(), status.value ?? undefined, page.value, pageSize.value));

  /** Shows page `next` (1-based) at `size` rows. */
  function goTo(next: number, size = pageSize.value): Promise<RemapPage | undefined> {
    page.value = next;
    pageSize.value = size;
    return state.run();
  }

  /** Shows only requests of `next` status (null: every status), from the first page. */
  function filterStatus(next: RemapStatus | null): Promise<RemapPage | undefined> {
    status.value = next;
    return goTo(1);
  }

  return { ...state, status, page, pageSize, goTo, filterStatus };
}

/** Creating a request from zones as `{ data, isLoading, error, run }`; `run(zoneIds, title, note)` resolves to the new request. */
export function useCreateRemap(siteId: () => string) {
  return useAsync((zoneIds: string[], title: string, note: string) =>
    createRemap(siteId(), { zoneIds, ...(title ? { title } : {}), ...(note ? { note } : {}) }),
  );
}
