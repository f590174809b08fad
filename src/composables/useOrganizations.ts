import { computed } from 'vue';
import { createOrganization, listOrganizations } from '@/api/organizations.api';
import type { Organization, OrganizationKind } from '@/api/types';
import { useAsync } from './useAsync';

/** Organizations as `{ data, isLoading, error, run }`, a kind-by-id lookup, and `create` for customer organizations. */
export function useOrganizations() {
  const list = useAsync(listOrganizations);
  const creation = useAsync((input: { name: string; timezone: string }) => createOrganization(input));

  const kindById = computed(() => new Map<string, OrganizationKind>((list.data.value ?? []).map((o) => [o.id, o.kind])));
  const sorted = computed<Organization[]>(() =>
    [...(list.data.value ?? [])].sort((a, b) => (a.kind === b.kind ? a.name.localeCompare(b.name) : a.kind === 'operator' ? -1 : 1)),
  );

  async function create(input: { name: string; timezone: string }): Promise<Organization | undefined> {
    const created = await creation.run(input);
    if (created) await list.run();
    return created;
  }

  return { ...list, sorted, kindById, create, isCreating: creation.isLoading, createError: creation.error };
}
