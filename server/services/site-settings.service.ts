import type { DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { Site } from '../entities/index.js';
import { badRequest } from '../http-error.js';
import type { AuditService } from './audit.service.js';
import { SITE_SETTING_DEFAULTS, siteSettings, type SiteSettings } from './site-settings.js';
import type { SitesService } from './sites.service.js';

/** The settings an admin may change (the agreement block size stays: stored blocks are counted in it). */
export type EditableSettings = Omit<SiteSettings, 'agreementBlockM' | 'maxNoReturnTraceM'>;

/** A change to a site's settings: its time zone and any editable setting. */
export type SettingsChange = Partial<EditableSettings> & { timezone?: string };

/** Evidence days that retention must keep beyond the detection window, so that the score's two weeks stay. */
export const RETENTION_MARGIN_DAYS = 14;

/** Reads and changes a site's settings (DESIGN.md §2: thresholds are the admins'). */
export class SiteSettingsService {
  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly audit: AuditService,
  ) {}

  /** The site's time zone, the settings that apply, the defaults, and whether the actor may change them. */
  async view(actor: Actor, siteId: string) {
    return this.describe(actor, await this.sites.getVisible(actor, siteId));
  }

  /**
   * Applies a change after checking the rules that span fields (good band above watch band, retention
   * longer than the detection window); a rule broken answers 400 naming the field, and nothing is stored.
   * Values equal to the default are stored as absent, so that a later change of a default reaches them.
   */
  async update(actor: Actor, siteId: string, change: SettingsChange) {
    const site = await this.sites.getVisible(actor, siteId);
    const { timezone, ...values } = change;
    const next = { ...siteSettings(site), ...values };
    if (next.healthGoodMin <= next.healthWatchMin) {
      const field = 'healthGoodMin' in values ? 'healthGoodMin' : 'healthWatchMin';
      throw badRequest(`The "good" band must start above the "watch" band (good ≥ ${next.healthGoodMin} %, watch ≥ ${next.healthWatchMin} %).`, {
        fieldErrors: { [field]: ['must keep good above watch'] },
      });
    }
    if (next.retentionDays < next.detectionWindowDays + RETENTION_MARGIN_DAYS) {
      const field = 'retentionDays' in values ? 'retentionDays' : 'detectionWindowDays';
      throw badRequest(`Evidence must be kept at least ${RETENTION_MARGIN_DAYS} days longer than the detection window (${next.detectionWindowDays} days), so at least ${next.detectionWindowDays + RETENTION_MARGIN_DAYS} days.`, {
        fieldErrors: { [field]: [`must keep retention ≥ window + ${RETENTION_MARGIN_DAYS} days`] },
      });
    }
    const stored: Record<string, unknown> = { ...site.settings };
    const changed: string[] = [];
    for (const [key, value] of Object.entries(values) as [keyof EditableSettings, unknown][]) {
      if (siteSettings(site)[key] !== value) changed.push(key);
      if (value === SITE_SETTING_DEFAULTS[key]) delete stored[key];
      else stored[key] = value;
    }
    if (timezone !== undefined && timezone !== site.timezone) changed.push('timezone');
    if (changed.length > 0) {
      const before = { timezone: site.timezone, ...siteSettings(site) };
      site.settings = stored;
      if (timezone !== undefined) site.timezone = timezone;
      await this.db.transaction(async (m) => {
        await m.getRepository(Site).save(site);
        await this.audit.record(actor, {
          action: 'site.settings',
          targetType: 'site',
          targetId: site.id,
          organizationId: site.organizationId,
          summary: `${actor.name} changed the settings of ${site.name}: ${changed.map((k) => `${k} ${String(before[k as keyof typeof before])} → ${String(k === 'timezone' ? site.timezone : next[k as keyof EditableSettings])}`).join(', ')}.`,
          details: { changed },
        }, m);
      });
    }
    return this.describe(actor, site);
  }

  private describe(actor: Actor, site: Site) {
    return { timezone: site.timezone, values: siteSettings(site), defaults: SITE_SETTING_DEFAULTS, canEdit: actor.role === 'admin' };
  }
}
