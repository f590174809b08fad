import { computed, onBeforeUnmount, watch } from 'vue';
import { listJobRuns, startJobRun, type JobName } from '@/api/job-runs.api';
import { useAsync } from './useAsync';

/** How often the list refreshes while a run is under way, in milliseconds. */
const REFRESH_MS = 3000;

/**
 * The newest job runs as `{ data, isLoading, error, run }`, refreshing by itself every few seconds
 * while any run is 'running' (or one was just started), plus `start` for "run now".
 */
export function useJobRuns(limit = 100) {
  const list = useAsync(() => listJobRuns(limit));
  const starting = useAsync((job: JobName, siteId?: string) => startJobRun(job, siteId));
  const isRunning = computed(() => (list.data.value ?? []).some((r) => r.status === 'running'));
  let timer: ReturnType<typeof setTimeout> | undefined;
  /** A started run may not be in the list at the first refresh; keep polling a little while after "run now". */
  let pollUntil = 0;

  function schedule(): void {
    clearTimeout(timer);
    if (isRunning.value || Date.now() < pollUntil) timer = setTimeout(() => void list.run().then(schedule), REFRESH_MS);
  }

  watch(isRunning, schedule);
  onBeforeUnmount(() => clearTimeout(timer));

  /** Starts a job in the background and refreshes the list until its run has finished. */
  async function start(job: JobName, siteId?: string): Promise<boolean> {
    await starting.run(job, siteId);
    if (starting.error.value) return false;
    pollUntil = Date.now() + 4 * REFRESH_MS;
    await list.run();
    schedule();
    return true;
  }

  return { ...list, isRunning, start, isStarting: starting.isLoading, startError: starting.error };
}
