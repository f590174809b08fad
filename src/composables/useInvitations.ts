import { computed } from 'vue';
import { createInvitation, listInvitations, revokeInvitation, type InvitationInput } from '@/api/invitations.api';
import type { Invitation } from '@/api/types';
import { useAsync } from './useAsync';

/** The state an invitation is in, derived from its timestamps. */
export type InvitationState = 'pending' | 'accepted' | 'expired';

/** Returns whether an invitation is pending, accepted or expired at `now`. */
export function invitationState(invitation: Invitation, now: Date): InvitationState {
  if (invitation.acceptedAt) return 'accepted';
  return new Date(invitation.expiresAt).getTime() <= now.getTime() ? 'expired' : 'pending';
}

/** Invitations as `{ data, isLoading, error, run }`, split into pending and past, with create and revoke. */
export function useInvitations() {
  const list = useAsync(listInvitations);
  const creation = useAsync((input: InvitationInput) => createInvitation(input));
  const revocation = useAsync((id: string) => revokeInvitation(id));

  const pending = computed(() => (list.data.value ?? []).filter((i) => invitationState(i, new Date()) === 'pending'));
  const past = computed(() => (list.data.value ?? []).filter((i) => invitationState(i, new Date()) !== 'pending'));

  /** Creates an invitation and returns the link to hand over, or undefined on failure. */
  async function create(input: InvitationInput): Promise<{ invitation: Invitation; link: string } | undefined> {
    const created = await creation.run(input);
    if (created) await list.run();
    return created;
  }

  async function revoke(id: string): Promise<boolean> {
    await revocation.run(id);
    const ok = revocation.error.value === null;
    await list.run();
    return ok;
  }

  return {
    ...list,
    pending,
    past,
    create,
    isCreating: creation.isLoading,
    createError: creation.error,
    revoke,
    revokeError: revocation.error,
  };
}
