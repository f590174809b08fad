import {
  approveRemap,
  attachRemapMap,
  cancelRemap,
  getQuietWindows,
  getRemap,
  listRemapAssignees,
  scheduleRemap,
  startRemap,
  type PersonRef,
  type RemapRequest,
} from '@/api/remaps.api';
import { ref } from 'vue';
import { ApiError } from '@/api/client';
import { useAsync } from './useAsync';

/**
 * One remap request with its history as `{ data, isLoading, error, run }`, and its steps: approve,
 * schedule, start, attach the new map, cancel. Each step puts the changed request into `data`
 * (after reloading it, so its history gains the step) and resolves to it, or to undefined with the
 * reason in `action.error`.
 */
export function useRemap(siteId: () => string, remapId: () => string) {
  /** True when the last load answered 404: another site's or organization's request, or none. */
  const notFound = ref(false);
  const detail = useAsync(async () => {
    notFound.value = false;
    try {
      return await getRemap(siteId(), remapId());
    } catch (cause) {
      notFound.value = cause instanceof ApiError && cause.status === 404;
      throw cause;
    }
  });
  /** Who the last step's e-mail notice went to (schedule and cancel tell), or null. */
  const noticeSentTo = ref<PersonRef[] | null>(null);
  const action = useAsync(async (step: () => Promise<RemapRequest>) => {
    noticeSentTo.value = (await step()).noticeSentTo ?? null;
    // The step's answer lacks the history; the detail has it.
    return getRemap(siteId(), remapId());
  });

  async function take(step: () => Promise<RemapRequest>): Promise<RemapRequest | undefined> {
    const changed = await action.run(step);
    if (changed) detail.data.value = changed;
    return changed;
  }

  return {
    ...detail,
    notFound,
    noticeSentTo,
    approve: () => take(() => approveRemap(siteId(), remapId())),
    schedule: (start: string, assigneeId: string) => take(() => scheduleRemap(siteId(), remapId(), { start, assigneeId })),
    start: () => take(() => startRemap(siteId(), remapId())),
    attachMap: (mapVersionId: string) => take(() => attachRemapMap(siteId(), remapId(), mapVersionId)),
    cancel: (reason: string) => take(() => cancelRemap(siteId(), remapId(), reason)),
    isActing: action.isLoading,
    actionError: action.error,
  };
}

/** The site's traffic by hour of week and the quietest windows for one request, as `{ data, isLoading, error, run }`. */
export function useRemapQuietWindows(siteId: () => string, remapId: () => string) {
  return useAsync(() => getQuietWindows(siteId(), remapId()));
}

/** The people a request of the site may be assigned to (mappers and admins), as `{ data, isLoading, error, run }`. */
export function useRemapAssignees(siteId: () => string) {
  return useAsync(() => listRemapAssignees(siteId()));
}
