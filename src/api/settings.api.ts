import { apiRequest } from './client';
import type { SettingsChange, SettingsValues } from '@/components/settings/settings-rules';

export type { SettingsChange, SettingsValues };

/** A site's settings as the server answers them: its time zone, what applies now, the product defaults, and whether the user may change them. */
export interface SiteSettings {
  timezone: string;
  values: SettingsValues;
  defaults: SettingsValues;
  canEdit: boolean;
}

const settingsPath = (siteId: string) => `/sites/${encodeURIComponent(siteId)}/settings`;

/** Returns a site's settings; every role that sees the site may read them. */
export async function getSiteSettings(siteId: string): Promise<SiteSettings> {
  return (await apiRequest<{ settings: SiteSettings }>(settingsPath(siteId))).settings;
}

/**
 * Changes some of a site's settings (admins only) and returns them as they apply afterwards. A value
 * the server refuses answers 400 with `details.fieldErrors` keyed by field, and nothing changes.
 */
export async function updateSiteSettings(siteId: string, change: SettingsChange): Promise<SiteSettings> {
  return (await apiRequest<{ settings: SiteSettings }>(settingsPath(siteId), { method: 'PATCH', body: change })).settings;
}
