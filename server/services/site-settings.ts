import type { Site } from '../entities/index.js';

/** A site's settings with every default filled in (DESIGN.md §4). */
export interface SiteSettings {
  /** A return is explained within this distance of mapped structure, metres (DESIGN.md §4.3 default; a product choice). */
  agreementToleranceM: number;
  /** Side of an agreement block for the heat layer, metres (DESIGN.md §4.3 default; a product choice). */
  agreementBlockM: number;
  /** Count beams without a return as passes (default off: dark or shiny surfaces give no return). */
  countNoReturnAsPass: boolean;
  /** With countNoReturnAsPass: trace no-return beams this far, metres (default: the scan's rangeMax). */
  maxNoReturnTraceM?: number;
}

/** Product defaults of the site settings. */
export const SITE_SETTING_DEFAULTS: SiteSettings = {
  agreementToleranceM: 0.1,
  agreementBlockM: 2,
  countNoReturnAsPass: false,
};

/** The site's settings, defaults for what it does not set. */
export function siteSettings(site: Pick<Site, 'settings'>): SiteSettings {
  return { ...SITE_SETTING_DEFAULTS, ...(site.settings as Partial<SiteSettings>) };
}
