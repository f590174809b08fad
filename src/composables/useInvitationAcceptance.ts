import { acceptInvitation, fetchInvitationPreview } from '@/api/auth.api';
import { useSessionStore } from '@/stores/session.store';
import { useAsync } from './useAsync';

/** Loads a public invitation by its token and accepts it; on acceptance the new user is signed in. */
export function useInvitationAcceptance(token: () => string) {
  const session = useSessionStore();
  const preview = useAsync(() => fetchInvitationPreview(token()));
  const acceptance = useAsync(async (password: string) => {
    const me = await acceptInvitation(token(), password);
    session.setUser(me);
    return me;
  });
  return { preview, acceptance };
}
