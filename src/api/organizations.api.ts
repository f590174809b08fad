import { apiRequest } from './client';
import type { Organization } from './types';

/** Returns the organizations the user may see (admins: all; others: their own). */
export async function listOrganizations(): Promise<Organization[]> {
  return (await apiRequest<{ organizations: Organization[] }>('/organizations')).organizations;
}

/** Creates a customer organization (admin only) and returns it. */
export async function createOrganization(input: { name: string; timezone: string }): Promise<Organization> {
  return (await apiRequest<{ organization: Organization }>('/organizations', { method: 'POST', body: input })).organization;
}
