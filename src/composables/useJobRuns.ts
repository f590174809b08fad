import { computed, onBeforeUnmount, watch } from 'vue';
import { getHealth } from '@/api/health.api';
import { listJobRuns, startJobRun, type JobName, type StartedJobRun } from '@/api/job-runs.api';
import { useAsync } from './useAsync';

/** How often the list refreshes while a run is under way, in milliseconds. */
const REFRESH_MS = 3000;

/**
 * The newest job runs as `{ data, isLoading, error, run }`, refreshing by itself every few seconds
 * while any run is 'running' (or one was just started), plus `start` for "run now" and `health`,
 * the last run of each job kind as GET /api/health reports it, refreshed with the list.
 */
export function useJobRuns(limit = 100) {
  const list = useAsync(() => listJobRuns(limit));
  const starting = useAsync((job: JobName, siteId?: string) => startJobRun(job, siteId));
  const health = useAsync(getHealth);
  const isRunning = computed(() => (list.data.value ?? []).some((r) => r.status === 'running'));
  let timer: ReturnType<typeof setTimeout> | undefined;
  /** A started run may not be in the list at the first refresh; keep polling a little while after "run now". */
  let pollUntil = 0;

  function schedule(): void {
    clearTimeout(timer);
    if (isRunning.value || Date.now() < pollUntil) timer = setTimeout(() => void list.run().then(schedule), REFRESH_MS);
  }

  watch(isRunning, schedule);
  // Every refresh of the list also refreshes the last run of each kind.
  watch(list.data, () => void health.run());
  onBeforeUnmount(() => clearTimeout(timer));

  /** Starts a job in the background and refreshes the list until its run has finished; the server's answer, or null when it failed (see `startError`). */
  async function start(job: JobName, siteId?: string): Promise<StartedJobRun | null> {
    const answer = await starting.run(job, siteId);
    if (starting.error.value || !answer) return null;
    if (answer.started) pollUntil = Date.now() + 4 * REFRESH_MS;
    await list.run();
    schedule();
    return answer;
  }

  return { ...list, isRunning, start, isStarting: starting.isLoading, startError: starting.error, health };
}
