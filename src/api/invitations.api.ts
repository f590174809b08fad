import { apiRequest } from './client';
import type { Invitation, Role } from './types';

/** Input for inviting someone: the role must fit the organization's kind (the server checks). */
export interface InvitationInput {
  email: string;
  name: string;
  role: Role;
  organizationId: string;
}

/** Returns pending and recent invitations (admin only). */
export async function listInvitations(): Promise<Invitation[]> {
  return (await apiRequest<{ invitations: Invitation[] }>('/invitations')).invitations;
}

/** Creates an invitation; returns it with the absolute link to hand to the invited person. */
export async function createInvitation(input: InvitationInput): Promise<{ invitation: Invitation; link: string }> {
  return apiRequest<{ invitation: Invitation; link: string }>('/invitations', { method: 'POST', body: input });
}

/** Revokes a pending invitation; its link stops working. */
export async function revokeInvitation(invitationId: string): Promise<void> {
  await apiRequest<void>(`/invitations/${encodeURIComponent(invitationId)}`, { method: 'DELETE' });
}
