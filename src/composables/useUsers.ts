import { listUsers, updateUser } from '@/api/users.api';
import type { Role, UserRow, UserStatus } from '@/api/types';
import { useAsync } from './useAsync';

/** All users as `{ data, isLoading, error, run }`, with `update` that patches one row in place. */
export function useUsers() {
  const list = useAsync(listUsers);
  const change = useAsync((userId: string, patch: { role?: Role; status?: UserStatus }) => updateUser(userId, patch));

  async function update(userId: string, patch: { role?: Role; status?: UserStatus }): Promise<UserRow | undefined> {
    const updated = await change.run(userId, patch);
    if (updated && list.data.value) list.data.value = list.data.value.map((u) => (u.id === updated.id ? updated : u));
    return updated;
  }

  return { ...list, update, isUpdating: change.isLoading, updateError: change.error };
}
