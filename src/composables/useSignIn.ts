import { ref } from 'vue';
import { ApiError, errorMessage } from '@/api/client';
import type { Me } from '@/api/types';
import { useSessionStore } from '@/stores/session.store';

/** Sign-in state: `run(email, password)`, `isLoading`, the readable `error`, and whether it was a rate limit. */
export function useSignIn() {
  const session = useSessionStore();
  const isLoading = ref(false);
  const error = ref<string | null>(null);
  const isRateLimited = ref(false);

  async function run(email: string, password: string): Promise<Me | undefined> {
    isLoading.value = true;
    error.value = null;
    isRateLimited.value = false;
    try {
      return await session.signIn(email, password);
    } catch (cause) {
      isRateLimited.value = cause instanceof ApiError && cause.status === 429;
      error.value = isRateLimited.value
        ? `${errorMessage(cause)} For your account's protection, sign-in is paused for a while after several failed attempts.`
        : errorMessage(cause);
      return undefined;
    } finally {
      isLoading.value = false;
    }
  }

  return { run, isLoading, error, isRateLimited };
}
