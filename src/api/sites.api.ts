import { apiRequest } from './client';
import type { Site } from './types';

/** Returns every site the signed-in user may see (the server scopes by organization). */
export async function listSites(): Promise<Site[]> {
  return (await apiRequest<{ sites: Site[] }>('/sites')).sites;
}

/** Returns one site; 404 when it does not exist or belongs to another organization. */
export async function getSite(siteId: string): Promise<Site> {
  return (await apiRequest<{ site: Site }>(`/sites/${encodeURIComponent(siteId)}`)).site;
}
