import { ApiError, apiRequest } from './client';
import type { InvitationPreview, Me } from './types';

/** Signs in with e-mail and password; returns the signed-in user (the server sets the session cookie). */
export async function signIn(email: string, password: string): Promise<Me> {
  const body = await apiRequest<{ user: Me }>('/auth/sign-in', {
    method: 'POST',
    body: { email, password },
    expectUnauthorized: true,
  });
  return body.user;
}

/** Ends the session on the server. */
export async function signOut(): Promise<void> {
  await apiRequest<void>('/auth/sign-out', { method: 'POST', expectUnauthorized: true });
}

/** Returns the signed-in user, or null when there is no session. */
export async function fetchMe(): Promise<Me | null> {
  try {
    const body = await apiRequest<{ user: Me }>('/auth/me', { expectUnauthorized: true });
    return body.user;
  } catch (error) {
    if (error instanceof ApiError && error.status === 401) return null;
    throw error;
  }
}

/** Changes the signed-in user's password. */
export async function changePassword(currentPassword: string, newPassword: string): Promise<void> {
  await apiRequest<void>('/auth/change-password', {
    method: 'POST',
    body: { currentPassword, newPassword },
    // A 401 here means "current password wrong", not "session ended".
    expectUnauthorized: true,
  });
}

/** Returns what an invitation link is for (public; 404 when unknown, expired or used). */
export async function fetchInvitationPreview(token: string): Promise<InvitationPreview> {
  return apiRequest<InvitationPreview>(`/invitations/token/${encodeURIComponent(token)}`, { expectUnauthorized: true });
}

/** Accepts an invitation by choosing a password; returns the new, signed-in user. */
export async function acceptInvitation(token: string, password: string): Promise<Me> {
  const body = await apiRequest<{ user: Me }>(`/invitations/token/${encodeURIComponent(token)}/accept`, {
    method: 'POST',
    body: { password },
    expectUnauthorized: true,
  });
  return body.user;
}

/** Asks for a password reset link for the address; resolves alike whether or not it has an account. */
export async function requestPasswordReset(email: string): Promise<void> {
  await apiRequest<unknown>('/auth/password-reset', { method: 'POST', body: { email }, expectUnauthorized: true });
}

/** Resolves when a reset link can still set a password; throws the server's 400 sentence when it cannot. */
export async function checkPasswordResetLink(token: string): Promise<void> {
  await apiRequest<void>(`/auth/password-reset/${encodeURIComponent(token)}`, { expectUnauthorized: true });
}

/** Sets a new password through a reset link; every session of the account ends on the server. */
export async function resetPassword(token: string, password: string): Promise<void> {
  await apiRequest<void>(`/auth/password-reset/${encodeURIComponent(token)}`, { method: 'POST', body: { password }, expectUnauthorized: true });
}
