import { checkPasswordResetLink, fetchMe, requestPasswordReset, resetPassword } from '@/api/auth.api';
import { useSessionStore } from '@/stores/session.store';
import { useAsync } from './useAsync';

/** Asks for a reset link by e-mail address: `run(email)` resolves to true once the server has taken the request. */
export function usePasswordResetRequest() {
  return useAsync(async (email: string) => {
    await requestPasswordReset(email);
    return true;
  });
}

/** A reset link's state: `check` asks whether it still works, `reset` sets the new password with it. */
export function usePasswordResetLink(token: () => string) {
  const session = useSessionStore();
  const check = useAsync(async () => {
    await checkPasswordResetLink(token());
    return true;
  });
  const reset = useAsync(async (password: string) => {
    await resetPassword(token(), password);
    // The server has closed every session of the account; ask again who this browser is signed in as.
    const me = await fetchMe().catch(() => null);
    if (me) session.setUser(me);
    else session.clearLocal();
    return true;
  });
  return { check, reset };
}
