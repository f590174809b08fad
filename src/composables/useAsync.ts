import { ref, shallowRef, type Ref, type ShallowRef } from 'vue';
import { errorMessage } from '@/api/client';

/** The state of one async operation, as every composable in the app exposes it. */
export interface AsyncState<T, A extends unknown[]> {
  data: ShallowRef<T | undefined>;
  isLoading: Ref<boolean>;
  /** The readable failure of the last run, or null. */
  error: Ref<string | null>;
  /** Runs the operation; resolves to its result, or undefined when it failed (the error is in `error`). */
  run: (...args: A) => Promise<T | undefined>;
}

/**
 * Wraps an async function in `{ data, isLoading, error, run }`. Only the newest run may write the
 * state, so a slow earlier answer never overwrites a newer one (e.g. after switching sites).
 */
export function useAsync<T, A extends unknown[] = []>(operation: (...args: A) => Promise<T>): AsyncState<T, A> {
  const data = shallowRef<T | undefined>(undefined);
  const isLoading = ref(false);
  const error = ref<string | null>(null);
  let latest = 0;

  async function run(...args: A): Promise<T | undefined> {
    const ticket = ++latest;
    isLoading.value = true;
    error.value = null;
    try {
      const result = await operation(...args);
      if (ticket === latest) data.value = result;
      return result;
    } catch (cause) {
      if (ticket === latest) error.value = errorMessage(cause);
      return undefined;
    } finally {
      if (ticket === latest) isLoading.value = false;
    }
  }

  return { data, isLoading, error, run };
}
