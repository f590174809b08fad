import { ref } from 'vue';
import { ApiError } from '@/api/client';
import { getStation, listStations } from '@/api/docking.api';
import { useAsync } from './useAsync';

/** A site's docking stations with their verdicts: `{ data, isLoading, error, run }`. */
export function useDockingStations(siteId: () => string) {
  return useAsync(() => listStations(siteId()));
}

/** One docking station with its dockings and drift figures: `{ data, isLoading, error, run }` and the HTTP status of a failure (404: not found). */
export function useDockingStation(siteId: () => string, stationId: () => string) {
  const errorStatus = ref<number | null>(null);
  const state = useAsync(async () => {
    errorStatus.value = null;
    try {
      return await getStation(siteId(), stationId());
    } catch (e) {
      errorStatus.value = e instanceof ApiError ? e.status : null;
      throw e;
    }
  });
  return { ...state, errorStatus };
}
