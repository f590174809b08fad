import { DateTime } from 'luxon';
import type { DataSource } from 'typeorm';
import { drawZoneOutlines, previewStep } from '../../shared/render/zone-outlines.js';
import { renderGridImage } from '../../shared/render/grid-image.js';
import type { Actor } from '../auth/actor.js';
import { MapVersion, MonthlyReport, Organization } from '../entities/index.js';
import { badRequest, forbidden, notFound } from '../http-error.js';
import { renderReport, type ReportSiteView } from '../mail/report-template.js';
import { encodePng } from './grid-codec.js';
import { newId } from './ids.js';
import type { MailService } from './mail.service.js';
import type { MapVersionsService } from './map-versions.service.js';
import type { RecipientsService } from './recipients.service.js';
import { monthBounds, monthIsPast, type ReportFigures, type ReportFiguresService, type SiteReportFigures } from './report-figures.service.js';

/** Local hour of the 1st of the month when the reports go out (product choice). */
export const REPORT_HOUR = 7;

/** Longest side of the map picture in the mail, pixels. */
const MAP_IMAGE_SIDE = 560;

type MapImage = { cid: string; filename: string; contentBase64: string };

/** The content id of a site's map picture in the mail. */
const mapCid = (siteId: string) => `map-${siteId}@driftline`;

const pct = (v: number | null) => (v === null ? 'no scans' : `${v.toFixed(1)} %`);
const m2 = (v: number) => `${v.toFixed(v < 10 ? 1 : 0)} m²`;

/** Weekly agreement of a month's daily scores (days 1–7, 8–14, …): the mean of the days with scans. */
export function weeklyScores(daily: SiteReportFigures['daily'], timezone: string) {
  const weeks: Array<{ label: string; score: number | null }> = [];
  for (let k = 0; k < daily.length; k += 7) {
    const part = daily.slice(k, k + 7);
    const scored = part.map((d) => d.score).filter((s): s is number => s !== null);
    const first = DateTime.fromISO(part[0].day, { zone: timezone });
    const last = DateTime.fromISO(part[part.length - 1].day, { zone: timezone });
    weeks.push({ label: `${first.toFormat('d')}–${last.toFormat('d LLL')}`, score: scored.length ? scored.reduce((a, b) => a + b, 0) / scored.length : null });
  }
  return weeks;
}

/** The reader's words for one site's figures. */
function siteView(s: SiteReportFigures, imageCid: string | null, timezone: string): ReportSiteView {
  const kinds = [`${s.openZones.new} new`, `${s.openZones.missing} missing`, `${s.openZones.unmapped} unmapped`].join(', ');
  return {
    name: s.name,
    scoreText: pct(s.score),
    changeText: s.change === null ? (s.score === null ? '' : '(no scans the month before)') : `${s.change >= 0 ? '+' : '−'}${Math.abs(s.change).toFixed(1)} points against the month before`,
    changeColour: s.change !== null && s.change < 0 ? '#a4431b' : '#2d6a3e',
    weeks: weeklyScores(s.daily, timezone).map((w) => ({ label: w.label, scoreText: pct(w.score), bar: w.score === null ? 0 : Math.max(0, Math.min(100, Math.round(w.score))) })),
    facts: [
      { label: 'Open zones at month end', value: `${s.openZones.new + s.openZones.missing + s.openZones.unmapped} (${kinds})` },
      { label: 'Changed area', value: m2(s.changedAreaM2) },
      { label: 'Remaps verified / planned', value: `${s.remapsDone.length} / ${s.remapsPlanned.length}` },
      { label: 'Scanner checks raised', value: s.scannerFlags.length ? s.scannerFlags.map((f) => `${f.robot} (${f.scanner})`).join(', ') : 'none' },
      { label: 'Docking stations out of tolerance', value: s.docking.outOfTolerance.length ? s.docking.outOfTolerance.join(', ') : 'none' },
      { label: 'Docking stations drifting', value: s.docking.drifting.length ? s.docking.drifting.join(', ') : 'none' },
    ],
    remapsDone: s.remapsDone.map((r) => `R-${r.number} ${r.title}`),
    remapsPlanned: s.remapsPlanned.map((r) => `R-${r.number} ${r.title} (from ${DateTime.fromISO(r.windowStart, { zone: timezone }).toFormat('d LLL HH:mm')})`),
    imageCid,
    link: s.link,
  };
}

/** Monthly reports: generated once per (organization, month), sent once per recipient through the mail queue (DESIGN.md §4.8). */
export class ReportsService {
  constructor(
    private readonly db: DataSource,
    private readonly figures: ReportFiguresService,
    private readonly mapVersions: MapVersionsService,
    private readonly recipients: RecipientsService,
    private readonly mail: MailService,
    private readonly baseUrl: string,
  ) {}

  /** The map picture of a site: the month-end floor map with its open zones outlined, as a PNG. */
  async mapImage(site: SiteReportFigures): Promise<Buffer | null> {
    if (!site.mapVersionId) return null;
    const version = await this.db.getRepository(MapVersion).findOneBy({ id: site.mapVersionId });
    if (!version) return null;
    const grid = await this.mapVersions.grid(version);
    const image = renderGridImage(grid, MAP_IMAGE_SIDE);
    drawZoneOutlines(image, grid, previewStep(grid, MAP_IMAGE_SIDE), site.zones, 2);
    return encodePng(image);
  }

  /** Figures, map pictures and the rendered preview of a month (nothing stored). */
  private async build(org: Organization, month: string) {
    const figures = await this.figures.figures(org.id, month);
    const images: MapImage[] = [];
    const cids = new Map<string, string>();
    for (const s of figures.sites) {
      const png = await this.mapImage(s);
      if (!png) continue;
      const cid = mapCid(s.id);
      cids.set(s.id, cid);
      images.push({ cid, filename: `${s.name.replace(/[^A-Za-z0-9]+/g, '-').toLowerCase()}-map.png`, contentBase64: png.toString('base64') });
    }
    return { figures, images, cids };
  }

  /** The app's read-only page of an organization's month, the report's link into the app. */
  reportLink(organizationId: string, month: string) {
    return `${this.baseUrl}/reports/${encodeURIComponent(organizationId)}/${month}`;
  }

  private async render(figures: ReportFigures, cids: Map<string, string>, unsubscribeLink: string | null) {
    const tz = figures.organization.timezone;
    const sites = figures.sites.length;
    return renderReport({
      organization: figures.organization.name,
      monthLabel: figures.monthLabel,
      intro: sites === 0 ? 'No sites yet.' : `${sites} site${sites === 1 ? '' : 's'}, calendar month in ${tz}.`,
      sites: figures.sites.map((s) => siteView(s, cids.get(s.id) ?? null, tz)),
      appLink: `${this.baseUrl}/`,
      reportLink: this.reportLink(figures.organization.id, figures.month),
      unsubscribeLink,
    });
  }

  subject(figures: ReportFigures) {
    return `Map health in ${figures.monthLabel} · ${figures.organization.name}`;
  }

  private async organization(organizationId: string) {
    const org = await this.db.getRepository(Organization).findOneBy({ id: organizationId });
    if (!org) throw notFound('The organization');
    if (org.kind !== 'customer') throw badRequest('Monthly reports are for customer organizations.');
    return org;
  }

  /**
   * The report row of (organization, month), made once: the unique index decides which caller
   * inserts it (INSERT … ON CONFLICT DO NOTHING); a row still 'generating' (a first run that
   * stopped, or a concurrent one) is rendered again, which writes the same content.
   */
  async generate(organizationId: string, month: string, now = new Date()): Promise<MonthlyReport> {
    const org = await this.organization(organizationId);
    if (!monthIsPast(month, org.timezone, now)) throw badRequest(`${month} has not ended yet in ${org.timezone}; reports cover complete months.`);
    const repo = this.db.getRepository(MonthlyReport);
    await this.db.query(`INSERT INTO monthly_reports (id, organization_id, month, status) VALUES (?, ?, ?, 'generating') ON CONFLICT (organization_id, month) DO NOTHING`, [newId(), org.id, month]);
    const row = await repo.findOneByOrFail({ organizationId: org.id, month });
    if (row.status !== 'generating') return row;
    const { figures, images, cids } = await this.build(org, month);
    const { html, text } = await this.render(figures, cids, null);
    await repo.update({ id: row.id, status: 'generating' }, { status: 'ready', figures, html, text, mapImages: images, generatedAt: now });
    return repo.findOneByOrFail({ id: row.id });
  }

  /**
   * Generates the month's report if needed and queues one mail per recipient who has not
   * unsubscribed, each under the dedupe key report:<reportId>:<recipientId>, so a re-run, a restart
   * between generating and sending, or a second process queues nothing twice.
   */
  async send(organizationId: string, month: string, now = new Date()) {
    const report = await this.generate(organizationId, month, now);
    const figures = report.figures as ReportFigures;
    const cids = new Map((report.mapImages ?? []).map((i) => [i.cid.replace(/^map-/, '').replace(/@driftline$/, ''), i.cid]));
    const attachments = (report.mapImages ?? []).map((i) => ({ filename: i.filename, contentType: 'image/png', cid: i.cid, content: Buffer.from(i.contentBase64, 'base64') }));
    let queued = 0;
    const recipients = await this.recipients.active(organizationId);
    for (const r of recipients) {
      const dedupeKey = `report:${report.id}:${r.id}`;
      const { html, text } = await this.render(figures, cids, this.recipients.unsubscribeLink(r.id));
      // One-click unsubscribe for mail clients (RFC 8058 §3.1, with the List-Unsubscribe header of RFC 2369): a POST to the API address.
      const headers = { 'List-Unsubscribe': `<${this.recipients.oneClickLink(r.id)}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' };
      const { created } = await this.mail.enqueue({ dedupeKey, kind: 'report', organizationId, to: { email: r.email, name: r.name || null }, subject: this.subject(figures), html, text, attachments, reportId: report.id, headers });
      if (created) queued++;
    }
    if (recipients.length > 0 && report.status !== 'sent') await this.db.getRepository(MonthlyReport).update(report.id, { status: 'sent', sentAt: now });
    return { report: await this.view(await this.db.getRepository(MonthlyReport).findOneByOrFail({ id: report.id })), recipients: recipients.length, queued };
  }

  /**
   * The customer organizations whose previous month's report is due at `now`: it is the 1st in the
   * organization's zone at or after `hour`, and the report is not made yet, was left half-made, or
   * was made but not sent while someone is on the list (a stop between generating and sending).
   */
  async due(now: Date, hour = REPORT_HOUR) {
    const orgs = await this.db.getRepository(Organization).find({ where: { kind: 'customer' }, order: { name: 'ASC' } });
    const out: Array<{ org: Organization; month: string }> = [];
    for (const org of orgs) {
      const local = DateTime.fromJSDate(now, { zone: org.timezone });
      if (local.day !== 1 || local.hour < hour) continue;
      const month = local.minus({ months: 1 }).toFormat('yyyy-MM');
      const row = await this.db.getRepository(MonthlyReport).findOne({ where: { organizationId: org.id, month }, select: { id: true, status: true } });
      if (row && (row.status === 'sent' || (row.status === 'ready' && (await this.recipients.active(org.id)).length === 0))) continue;
      out.push({ org, month });
    }
    return out;
  }

  /** Sends every due report (the monthly job); a re-run finds nothing due and queues nothing. */
  async sendDue(now: Date, hour = REPORT_HOUR) {
    const out: Array<{ organization: string; month: string; queued: number }> = [];
    for (const { org, month } of await this.due(now, hour)) {
      const { queued } = await this.send(org.id, month, now);
      out.push({ organization: org.name, month, queued });
    }
    return out;
  }

  /** Who may read an organization's reports: admins any customer's; its site managers; its viewers only reports that were sent. */
  private async readable(actor: Actor, organizationId: string) {
    if (actor.role === 'mapper') throw forbidden('Monthly reports are for the customer and the admins.');
    return this.recipients.organizationFor(actor, organizationId);
  }

  async history(actor: Actor, organizationId: string) {
    const org = await this.readable(actor, organizationId);
    const rows = await this.db.getRepository(MonthlyReport).find({ where: { organizationId: org.id }, select: { id: true, organizationId: true, month: true, status: true, generatedAt: true, sentAt: true }, order: { month: 'DESC' } });
    const counts = (await this.db.query(`SELECT report_id AS id, status, COUNT(*) AS n FROM outgoing_mail WHERE organization_id = ? AND kind = 'report' GROUP BY report_id, status`, [org.id])) as Array<{ id: string; status: string; n: number }>;
    return {
      organization: { id: org.id, name: org.name, timezone: org.timezone },
      reports: rows
        .filter((r) => actor.role !== 'viewer' || r.status === 'sent')
        .map((r) => ({ ...this.view(r), deliveries: Object.fromEntries(counts.filter((c) => c.id === r.id).map((c) => [c.status, Number(c.n)])) })),
    };
  }

  /** A past month's report as the actor may read it: the stored one when it exists, else built now from the figures (not stored). */
  private async month(actor: Actor, organizationId: string, month: string, now: Date) {
    const org = await this.readable(actor, organizationId);
    monthBounds(month, org.timezone);
    if (!monthIsPast(month, org.timezone, now)) throw badRequest(`${month} has not ended yet in ${org.timezone}; pick an earlier month.`);
    const stored = await this.db.getRepository(MonthlyReport).findOneBy({ organizationId: org.id, month });
    if (actor.role === 'viewer' && stored?.status !== 'sent') throw notFound('A sent report of that month');
    if (stored && stored.status !== 'generating' && stored.html && stored.text) {
      return { stored, figures: stored.figures as ReportFigures, html: stored.html, text: stored.text, images: stored.mapImages ?? [] };
    }
    const built = await this.build(org, month);
    return { stored, figures: built.figures, images: built.images, ...(await this.render(built.figures, built.cids, null)) };
  }

  /** The report of a past month for the app's preview frame: subject, HTML with its pictures as data addresses, text and figures. */
  async preview(actor: Actor, organizationId: string, month: string, now = new Date()) {
    const read = await this.month(actor, organizationId, month, now);
    const { stored, figures, text, images } = read;
    let { html } = read;
    // The app's frame has no mail client: inline pictures become data addresses.
    for (const i of images) html = html.split(`cid:${i.cid}`).join(`data:image/png;base64,${i.contentBase64}`);
    return { month, status: stored?.status ?? null, report: stored ? this.view(stored) : null, subject: this.subject(figures), html, text, figures };
  }

  /**
   * The same figures as the month's mail, for the app's read-only page: per site the score, its
   * change, the weekly agreement, the facts and the map picture (a data address), nothing to send.
   */
  async figuresView(actor: Actor, organizationId: string, month: string, now = new Date()) {
    const { stored, figures, images } = await this.month(actor, organizationId, month, now);
    const tz = figures.organization.timezone;
    const pictures = new Map(images.map((i) => [i.cid, `data:image/png;base64,${i.contentBase64}`]));
    return {
      month,
      monthLabel: figures.monthLabel,
      organization: figures.organization,
      report: stored ? this.view(stored) : null,
      subject: this.subject(figures),
      sites: figures.sites.map((s) => ({
        id: s.id,
        name: s.name,
        score: s.score,
        previousScore: s.previousScore,
        change: s.change,
        returns: s.returns,
        weeks: weeklyScores(s.daily, tz),
        openZones: s.openZones,
        changedAreaM2: s.changedAreaM2,
        remapsDone: s.remapsDone,
        remapsPlanned: s.remapsPlanned,
        scannerFlags: s.scannerFlags,
        docking: s.docking,
        mapImage: pictures.get(mapCid(s.id)) ?? null,
      })),
    };
  }

  view(r: Pick<MonthlyReport, 'id' | 'organizationId' | 'month' | 'status' | 'generatedAt' | 'sentAt'>) {
    return { id: r.id, organizationId: r.organizationId, month: r.month, status: r.status, generatedAt: r.generatedAt?.toISOString() ?? null, sentAt: r.sentAt?.toISOString() ?? null };
  }
}
