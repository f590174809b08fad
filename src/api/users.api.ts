import { apiRequest } from './client';
import type { Role, UserRow, UserStatus } from './types';

/** Returns every user (admin only). */
export async function listUsers(): Promise<UserRow[]> {
  return (await apiRequest<{ users: UserRow[] }>('/users')).users;
}

/** Changes a user's role or status and returns the updated row (admin only; not for yourself). */
export async function updateUser(userId: string, change: { role?: Role; status?: UserStatus }): Promise<UserRow> {
  return (await apiRequest<{ user: UserRow }>(`/users/${encodeURIComponent(userId)}`, { method: 'PATCH', body: change })).user;
}
