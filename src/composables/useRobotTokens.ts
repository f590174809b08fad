import { computed } from 'vue';
import { createRobotToken, listRobotTokens, revokeRobotToken } from '@/api/robots.api';
import { useAsync } from './useAsync';

/** One robot's ingest tokens as `{ data, isLoading, error, run }`, with create and revoke that refresh the list. */
export function useRobotTokens(siteId: () => string, robotId: () => string) {
  const list = useAsync(() => listRobotTokens(siteId(), robotId()));
  const creation = useAsync((label: string) => createRobotToken(siteId(), robotId(), label));
  const revocation = useAsync((tokenId: string) => revokeRobotToken(siteId(), robotId(), tokenId));

  /** Tokens that still work, newest first; revoked ones are kept apart so the list reads as "what can upload now". */
  const active = computed(() => (list.data.value ?? []).filter((t) => t.revokedAt === null).sort((a, b) => b.createdAt.localeCompare(a.createdAt)));
  const revoked = computed(() => (list.data.value ?? []).filter((t) => t.revokedAt !== null));

  /** Creates a token and returns its secret (shown once), or undefined on failure. */
  async function create(label: string): Promise<string | undefined> {
    const created = await creation.run(label);
    if (!created) return undefined;
    await list.run();
    return created.secret;
  }

  async function revoke(tokenId: string): Promise<boolean> {
    await revocation.run(tokenId);
    const ok = revocation.error.value === null;
    await list.run();
    return ok;
  }

  return {
    ...list,
    active,
    revoked,
    create,
    isCreating: creation.isLoading,
    createError: creation.error,
    revoke,
    isRevoking: revocation.isLoading,
    revokeError: revocation.error,
  };
}
