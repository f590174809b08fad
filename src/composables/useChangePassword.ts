import { changePassword } from '@/api/auth.api';
import { useAsync } from './useAsync';

/** Changing the signed-in user's password as `{ data, isLoading, error, run }`; data is true after success. */
export function useChangePassword() {
  return useAsync(async (currentPassword: string, newPassword: string) => {
    await changePassword(currentPassword, newPassword);
    return true as const;
  });
}
