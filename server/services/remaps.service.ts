import { inflateRawSync } from 'node:zlib';
import { DateTime } from 'luxon';
import type { Logger } from 'pino';
import { Between, In, LessThan, MoreThan, type DataSource, type EntityManager } from 'typeorm';
import { cellsInOutlines, remapArea } from '../../shared/remap/area.js';
import { coverageEstimate, transitLength } from '../../shared/remap/coverage.js';
import { PRIORITY_HIGH_MIN, PRIORITY_MEDIUM_MIN, remapPriority } from '../../shared/remap/priority.js';
import { hourOfWeekProfile, localStamp, quietWindows } from '../../shared/remap/quiet-windows.js';
import { createCounters } from '../../shared/scan/accumulate.js';
import type { GridGeometry } from '../../shared/types/grid.js';
import type { Actor } from '../auth/actor.js';
import { AuditEvent, DailyStat, MapVersion, RemapRequest, RemapRequestZone, Site, User, Zone } from '../entities/index.js';
import type { RemapSide, RemapStatus, RemapVerification } from '../entities/remap-request.entity.js';
import type { Role } from '../entities/user.entity.js';
import { ACTIVE_ZONE_STATUSES } from '../entities/zone.entity.js';
import { badRequest, conflict, forbidden, notFound } from '../http-error.js';
import type { AuditService } from './audit.service.js';
import { remapCalendarFile, type RemapCalendarEntry } from './remap-calendar.js';
import type { RemapNotice, RemapNoticesService } from './remap-notices.service.js';
import { EvidenceStore } from './evidence-store.js';
import type { HealthService } from './health.service.js';
import { newId } from './ids.js';
import type { MapVersionsService } from './map-versions.service.js';
import { addDays, completeDays, localDay } from './site-days.js';
import { siteSettings } from './site-settings.js';
import type { SitesService } from './sites.service.js';
import type { TrafficService } from './traffic.service.js';

/** Days of evidence on the new map, covering the request's area, before its zones count as resolved (issue 6 contract). */
export const VERIFY_MIN_DAYS = 3;
/** Days of such evidence after which zones that still flag make the request "not fixed" (issue 6 contract). */
export const NOT_FIXED_DAYS = 7;
/** A day's evidence covers the area when at least this share of its cells was observed that day (product choice: racks' insides are never seen). */
export const AREA_COVERED_SHARE = 0.3;
/** Weeks of hourly traffic the quiet-window profile pools (product choice: a month of working weeks). */
export const QUIET_HISTORY_WEEKS = 4;
/** Longest remap window, hours (product choice: one day; a longer job is two requests). */
export const MAX_WINDOW_HOURS = 24;
/** Days of the old map's agreement that the "before" figure pools (issue 6 contract). */
const BEFORE_DAYS = 7;
/** Longest calendar range one request may ask for, days. */
export const CALENDAR_MAX_DAYS = 93;

const DAY_MS = 86_400_000;
const WEEK_MS = 7 * DAY_MS;

/** Who may move a request where (DESIGN.md §2 and the issue): site managers request and approve, mappers plan and perform, admins all. */
export const REMAP_ROLES = {
  create: ['admin', 'site_manager', 'mapper'],
  approve: ['admin', 'site_manager'],
  schedule: ['admin', 'mapper'],
  start: ['admin', 'mapper'],
  attachMap: ['admin', 'mapper'],
  cancel: ['admin', 'site_manager', 'mapper'],
} as const satisfies Record<string, readonly Role[]>;

/** Statuses a calendar shows: every request with a window that was not cancelled. */
const CALENDAR_STATUSES: RemapStatus[] = ['scheduled', 'in_progress', 'map_uploaded', 'verified', 'not_fixed'];
const OPEN_STATUSES: RemapStatus[] = ['proposed', 'scheduled', 'in_progress', 'map_uploaded', 'not_fixed'];

const STATUS_WORDS: Record<RemapStatus, string> = {
  proposed: 'proposed',
  scheduled: 'scheduled',
  in_progress: 'in progress',
  map_uploaded: 'waiting for verification of its new map',
  verified: 'verified',
  not_fixed: 'marked not fixed',
  cancelled: 'cancelled',
};

/** The columns a move changes. */
type RemapChange = Partial<Pick<RemapRequest, 'status' | 'approvedById' | 'approvedAt' | 'windowStart' | 'windowEnd' | 'windowTimezone' | 'assigneeId' | 'mapVersionAfterId' | 'verification' | 'cancelReason'>>;

/** List filters of a site's requests. */
export interface RemapQuery {
  status?: RemapStatus;
  page: number;
  pageSize: number;
}

function decodeCells(blob: Buffer): Int32Array {
  const raw = inflateRawSync(blob);
  return new Int32Array(raw.buffer.slice(raw.byteOffset, raw.byteOffset + raw.byteLength));
}

const geometryOf = (v: MapVersion): GridGeometry => ({ width: v.width, height: v.height, resolution: v.resolution, origin: { x: v.originX, y: v.originY, yaw: v.originYaw } });
const person = (u: User | null | undefined) => (u ? { id: u.id, name: u.name } : null);
const round = (v: number, digits: number) => Math.round(v * 10 ** digits) / 10 ** digits;
const ref = (r: Pick<RemapRequest, 'number'>) => `R-${r.number}`;
const priorityLabel = (score: number) => (score >= PRIORITY_HIGH_MIN ? 'high' : score >= PRIORITY_MEDIUM_MIN ? 'medium' : 'low');

/** Whole minutes of a window that holds the estimate (rounded up; a hair over a whole minute from floating point stays that minute). */
export const windowMinutes = (totalMinutes: number) => Math.ceil(totalMinutes - 1e-9);

function minutesText(minutes: number): string {
  const m = windowMinutes(minutes);
  const h = Math.floor(m / 60);
  return h > 0 ? `${h} h ${m % 60} min` : `${m} min`;
}

const RELATIONS = { assignee: true, requestedBy: true, approvedBy: true, mapVersionBefore: true, mapVersionAfter: true, site: true } as const;

/**
 * Remap requests (DESIGN.md §4.6): zones grouped into an area to re-drive with a coverage estimate
 * and a priority, quiet windows from the site's hourly traffic, the state machine by role with
 * every move audited, and the nightly verification of the new map against fresh evidence.
 */
export class RemapsService {
  private readonly store: EvidenceStore;

  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly mapVersions: MapVersionsService,
    private readonly health: HealthService,
    private readonly traffic: TrafficService,
    private readonly audit: AuditService,
    private readonly log: Logger,
    private readonly baseUrl: string,
    private readonly notices: RemapNoticesService,
  ) {
    this.store = new EvidenceStore(db);
  }

  private allow(actor: Actor, action: keyof typeof REMAP_ROLES, words: string) {
    if (!(REMAP_ROLES[action] as readonly Role[]).includes(actor.role)) throw forbidden(`Your role does not allow you to ${words} remap requests.`);
  }

  private async views(rows: RemapRequest[]) {
    if (rows.length === 0) return [];
    const links = await this.db.getRepository(RemapRequestZone).find({ where: { remapId: In(rows.map((r) => r.id)) } });
    const zones = links.length ? await this.db.getRepository(Zone).find({ where: { id: In(links.map((l) => l.zoneId)) } }) : [];
    const byId = new Map(zones.map((z) => [z.id, z]));
    return rows.map((r) => {
      const own = links
        .filter((l) => l.remapId === r.id)
        .map((l) => byId.get(l.zoneId))
        .filter((z): z is Zone => !!z)
        .sort((a, b) => a.number - b.number);
      return view(r, own);
    });
  }

  private async find(actor: Actor, siteId: string, remapId: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const remap = await this.db.getRepository(RemapRequest).findOne({ where: { id: remapId, siteId: site.id }, relations: RELATIONS });
    if (!remap) throw notFound('The remap request');
    return { site, remap };
  }

  /** A site's requests, newest first, optionally of one status. */
  async list(actor: Actor, siteId: string, q: RemapQuery) {
    const site = await this.sites.getVisible(actor, siteId);
    const [rows, total] = await this.db.getRepository(RemapRequest).findAndCount({
      where: { siteId: site.id, ...(q.status ? { status: q.status } : {}) },
      relations: RELATIONS,
      order: { number: 'DESC' },
      skip: (q.page - 1) * q.pageSize,
      take: q.pageSize,
    });
    return { remaps: await this.views(rows), total, page: q.page, pageSize: q.pageSize };
  }

  /** The people a request of a visible site may be assigned to: active mappers and admins, by name. */
  async assignees(actor: Actor, siteId: string) {
    this.allow(actor, 'schedule', 'schedule');
    await this.sites.getVisible(actor, siteId);
    const users = await this.db.getRepository(User).find({ where: { role: In(['mapper', 'admin']), status: 'active' }, order: { name: 'ASC' } });
    return users.map((u) => ({ id: u.id, name: u.name, role: u.role as 'mapper' | 'admin' }));
  }

  /** One request with its history of moves. */
  async get(actor: Actor, siteId: string, remapId: string) {
    const { remap } = await this.find(actor, siteId, remapId);
    const [v] = await this.views([remap]);
    const history = await this.db.getRepository(AuditEvent).find({ where: { targetType: 'remap_request', targetId: remap.id }, relations: { actor: true }, order: { at: 'ASC', id: 'ASC' } });
    return { ...v, history: history.map((e) => ({ at: e.at.toISOString(), action: e.action, actor: person(e.actor), summary: e.summary })) };
  }

  /**
   * Creates a request from zones of the site's active floor map that are open or acknowledged; they
   * become planned. A site manager's or admin's request is approved at once; a mapper's is proposed
   * and waits for the customer's approval.
   */
  async create(actor: Actor, siteId: string, input: { zoneIds: string[]; title?: string; note?: string }) {
    this.allow(actor, 'create', 'create');
    const site = await this.sites.getVisible(actor, siteId);
    const active = await this.mapVersions.activeFloor(site.id);
    if (!active) throw conflict(`${site.name} has no active floor map, so it has no zones to re-map.`);
    const repo = this.db.getRepository(Zone);
    const zones = await repo.find({ where: { id: In(input.zoneIds), siteId: site.id }, select: { id: true, number: true, kind: true, status: true, mapVersionId: true, areaM2: true, severity: true, trafficPerM2PerDay: true, persistence: true, cells: true } });
    const missing = input.zoneIds.filter((id) => !zones.some((z) => z.id === id));
    if (missing.length > 0) throw badRequest(`${missing.length === 1 ? 'One zone is' : `${missing.length} zones are`} not zones of ${site.name}: ${missing.join(', ')}.`, { fieldErrors: { zoneIds: ['must be zones of this site'] } });
    zones.sort((a, b) => a.number - b.number);
    for (const z of zones) {
      if (z.mapVersionId !== active.id) throw conflict(`Z-${z.number} was found on an earlier map version, not on the active version ${active.version}; only zones of the active map can be re-mapped.`);
      if (z.status === 'planned') {
        const other = await this.db.getRepository(RemapRequestZone).createQueryBuilder('l').innerJoinAndSelect('l.remap', 'r').where('l.zone_id = :z', { z: z.id }).andWhere('r.status IN (:...s)', { s: OPEN_STATUSES }).getOne();
        throw conflict(`Z-${z.number} is already planned${other ? ` in remap request R-${other.remap.number}` : ''}.`);
      }
      if (z.status !== 'open' && z.status !== 'acknowledged') throw conflict(`Z-${z.number} is ${z.status}; only open or acknowledged zones can join a remap request.`);
    }
    const settings = siteSettings(site);
    const area = remapArea(zones.map((z) => decodeCells(z.cells)), geometryOf(active), settings.remapMarginM);
    const estimate = coverageEstimate({
      areaM2: area.areaM2,
      sweepWidthM: settings.remapSweepWidthM,
      driveSpeedMps: settings.remapDriveSpeedMps,
      transitM: transitLength(area.parts.map((p) => p.centre)),
      setupMinutes: settings.remapSetupMinutes,
    });
    const siteZones = await repo.find({ where: { siteId: site.id, mapVersionId: active.id, status: In(ACTIVE_ZONE_STATUSES) }, select: { id: true, trafficPerM2PerDay: true } });
    const siteTraffic = siteZones.length ? siteZones.reduce((a, z) => a + z.trafficPerM2PerDay, 0) / siteZones.length : 0;
    const priority = remapPriority(zones, siteTraffic);
    const approved = actor.role === 'site_manager' || actor.role === 'admin';
    const labels = zones.map((z) => `Z-${z.number}`).join(', ');
    const id = newId();
    const now = new Date();
    await this.db.transaction(async (m) => {
      const last = await m.getRepository(RemapRequest).findOne({ where: { siteId: site.id }, order: { number: 'DESC' }, select: { id: true, number: true } });
      const number = (last?.number ?? 0) + 1;
      await m.insert(RemapRequest, {
        id,
        siteId: site.id,
        number,
        title: input.title?.trim() || `Re-map ${labels}`,
        status: 'proposed',
        priorityScore: priority.score,
        note: input.note?.trim() ?? '',
        cancelReason: null,
        area: { parts: area.parts, areaM2: area.areaM2, marginM: settings.remapMarginM },
        estimate,
        windowStart: null,
        windowEnd: null,
        windowTimezone: null,
        assigneeId: null,
        requestedById: actor.id,
        approvedById: approved ? actor.id : null,
        approvedAt: approved ? now : null,
        mapVersionBeforeId: active.id,
        mapVersionAfterId: null,
        verification: null,
      });
      for (const z of zones) {
        await m.insert(RemapRequestZone, { remapId: id, zoneId: z.id, previousStatus: z.status as 'open' | 'acknowledged' });
        await m.update(Zone, z.id, { status: 'planned', statusChangedAt: now, statusNote: `Planned in remap request R-${number}.` });
        await this.audit.record(actor, { action: 'zone.plan', targetType: 'zone', targetId: z.id, organizationId: site.organizationId, summary: `${actor.name} planned Z-${z.number} in remap request R-${number}.` }, m);
      }
      await this.audit.record(actor, {
        action: 'remap.create',
        targetType: 'remap_request',
        targetId: id,
        organizationId: site.organizationId,
        summary: `${actor.name} ${approved ? 'requested' : 'proposed'} remap R-${number} of ${labels} at ${site.name}: ${area.areaM2.toFixed(1)} m² to re-drive, about ${minutesText(estimate.totalMinutes)} incl. setup${approved ? '' : '; it waits for the customer’s approval'}.`,
        details: { zoneIds: zones.map((z) => z.id), priority: priority.score },
      }, m);
    });
    return this.get(actor, site.id, id);
  }

  /** A site manager or admin approves a mapper's proposal. */
  async approve(actor: Actor, siteId: string, remapId: string) {
    this.allow(actor, 'approve', 'approve');
    const { site, remap } = await this.find(actor, siteId, remapId);
    if (remap.status !== 'proposed') throw conflict(`${ref(remap)} is ${STATUS_WORDS[remap.status]}; only a proposed request waits for approval.`);
    if (remap.approvedAt) throw conflict(`${ref(remap)} was already approved by ${remap.approvedBy?.name ?? 'someone'} on ${remap.approvedAt.toISOString().slice(0, 10)}.`);
    await this.move(actor, site, remap, { approvedById: actor.id, approvedAt: new Date() }, 'remap.approve', `${actor.name} approved ${ref(remap)}.`);
    return this.get(actor, site.id, remap.id);
  }

  /**
   * Sets (or moves) the window and the assignee of an approved request: the window is stored as
   * UTC instants with the site's time zone; without an end it lasts the estimate, rounded up to the minute.
   */
  async schedule(actor: Actor, siteId: string, remapId: string, input: { start: Date; end?: Date; assigneeId: string }, now = new Date()) {
    this.allow(actor, 'schedule', 'schedule');
    const { site, remap } = await this.find(actor, siteId, remapId);
    if (remap.status !== 'proposed' && remap.status !== 'scheduled') throw conflict(`${ref(remap)} is ${STATUS_WORDS[remap.status]}; only proposed or scheduled requests can be given a window.`);
    if (!remap.approvedAt) throw conflict(`${ref(remap)} is waiting for the customer’s approval: a site manager of ${site.organization.name} (or an admin) approves it before it can be scheduled.`);
    const start = input.start;
    const end = input.end ?? new Date(start.getTime() + windowMinutes(remap.estimate.totalMinutes) * 60_000);
    if (start.getTime() < now.getTime()) throw badRequest('The window must start in the future.', { fieldErrors: { start: ['must be in the future'] } });
    if (end.getTime() <= start.getTime()) throw badRequest('The window must end after it starts.', { fieldErrors: { end: ['must be after start'] } });
    if (end.getTime() - start.getTime() > MAX_WINDOW_HOURS * 3_600_000) throw badRequest(`A remap window may last at most ${MAX_WINDOW_HOURS} hours; split a longer job into two requests.`, { fieldErrors: { end: [`must be within ${MAX_WINDOW_HOURS} h of start`] } });
    const assignee = await this.db.getRepository(User).findOneBy({ id: input.assigneeId });
    if (!assignee) throw badRequest('The assignee was not found.', { fieldErrors: { assigneeId: ['must be a user'] } });
    if (assignee.status !== 'active' || (assignee.role !== 'mapper' && assignee.role !== 'admin')) {
      throw badRequest(`${assignee.name} cannot be assigned: remaps are performed by active mappers or admins.`, { fieldErrors: { assigneeId: ['must be an active mapper or admin'] } });
    }
    const tz = site.timezone;
    const when = `${localStamp(start.getTime(), tz)} – ${localStamp(end.getTime(), tz)} (${tz})`;
    const again = remap.status === 'scheduled';
    // The same window and assignee again (a repeated request) change nothing: no move, no second notice.
    if (again && remap.windowStart?.getTime() === start.getTime() && remap.windowEnd?.getTime() === end.getTime() && remap.assigneeId === assignee.id) return this.get(actor, site.id, remap.id);
    const before = { start: remap.windowStart, end: remap.windowEnd, assignee: remap.assignee };
    await this.move(
      actor,
      site,
      remap,
      { status: 'scheduled', windowStart: start, windowEnd: end, windowTimezone: tz, assigneeId: assignee.id },
      again ? 'remap.reschedule' : 'remap.schedule',
      `${actor.name} ${again ? 'moved' : 'scheduled'} ${ref(remap)} ${again ? 'to' : 'for'} ${when}, assigned to ${assignee.name}.`,
    );
    const noticeSentTo = await this.notify(again ? 'rescheduled' : 'scheduled', site, remap.id, { actorName: actor.name, before });
    return { ...(await this.get(actor, site.id, remap.id)), noticeSentTo };
  }

  /** The calendar SEQUENCE of a request: how often its window was set, moved or cancelled, less one (RFC 5545 §3.8.7.4). */
  private async calendarSequence(remapId: string) {
    const moves = await this.db.getRepository(AuditEvent).countBy({ targetType: 'remap_request', targetId: remapId, action: In(['remap.schedule', 'remap.reschedule', 'remap.cancel']) });
    return Math.max(0, moves - 1);
  }

  /** The calendar entry of a request with a window (relations loaded), as the download and the notices share it. */
  private calendarEntry(site: Site, remap: RemapRequest, v: RemapView, sequence: number): RemapCalendarEntry | null {
    if (!remap.windowStart || !remap.windowEnd) return null;
    return {
      remapId: remap.id,
      label: v.label,
      title: remap.title,
      siteName: site.name,
      start: remap.windowStart,
      end: remap.windowEnd,
      cancelled: remap.status === 'cancelled',
      areaM2: remap.area.areaM2,
      totalMinutes: remap.estimate.totalMinutes,
      zoneLabels: v.zones.map((z) => z.label),
      assignee: remap.assignee ? { name: remap.assignee.name, email: remap.assignee.email } : null,
      link: this.link(site.id, remap.id),
      sequence,
    };
  }

  private link(siteId: string, remapId: string) {
    return `${this.baseUrl}/sites/${siteId}/remaps/${remapId}`;
  }

  /**
   * Queues the e-mail notices of a committed move (RemapNoticesService) and returns who they go to.
   * The move stands whatever happens here: a notice that cannot be queued is logged, not thrown.
   */
  private async notify(event: RemapNotice['event'], site: Site, remapId: string, extra: Pick<RemapNotice, 'actorName'> & Partial<Pick<RemapNotice, 'before' | 'zones'>>) {
    try {
      const remap = await this.db.getRepository(RemapRequest).findOneOrFail({ where: { id: remapId }, relations: RELATIONS });
      const [v] = await this.views([remap]);
      const calendar = await this.calendarSequence(remap.id);
      const action = event === 'verified' ? 'remap.verify' : 'remap.not_fixed';
      const sequence = event === 'verified' || event === 'not_fixed' ? await this.db.getRepository(AuditEvent).countBy({ targetType: 'remap_request', targetId: remap.id, action }) : calendar;
      return await this.notices.send({ event, site, remap, calendar: this.calendarEntry(site, remap, v, calendar), sequence, link: this.link(site.id, remap.id), ...extra });
    } catch (err) {
      this.log.error({ err, remapId, event }, 'remap notice could not be queued');
      return [];
    }
  }

  /**
   * The iCalendar file (RFC 5545) of a request's window, for the assignee's calendar; 409 before the
   * request has a window. Its SEQUENCE counts the window's changes, so a calendar updates the entry.
   */
  async calendarFile(actor: Actor, siteId: string, remapId: string): Promise<{ fileName: string; text: string }> {
    const { site, remap } = await this.find(actor, siteId, remapId);
    if (!remap.windowStart || !remap.windowEnd) throw conflict(`${ref(remap)} has no window yet: a mapper schedules it first.`);
    const [v] = await this.views([remap]);
    const text = remapCalendarFile(this.calendarEntry(site, remap, v, await this.calendarSequence(remap.id))!);
    return { fileName: `driftline-remap-${v.label}.ics`, text };
  }

  /** The mapper starts the remap run. */
  async start(actor: Actor, siteId: string, remapId: string) {
    this.allow(actor, 'start', 'start');
    const { site, remap } = await this.find(actor, siteId, remapId);
    if (remap.status !== 'scheduled') throw conflict(`${ref(remap)} is ${STATUS_WORDS[remap.status]}; only a scheduled request can be started.`);
    await this.move(actor, site, remap, { status: 'in_progress' }, 'remap.start', `${actor.name} started the remap run of ${ref(remap)}.`);
    return this.get(actor, site.id, remap.id);
  }

  /**
   * Attaches the floor map uploaded for the request (a draft or active version of the site, newer
   * than the one the zones were found on, uploaded after the request); activating it starts the
   * verification. A request marked not fixed may be given another new map.
   */
  async attachMap(actor: Actor, siteId: string, remapId: string, mapVersionId: string) {
    this.allow(actor, 'attachMap', 'attach maps to');
    const { site, remap } = await this.find(actor, siteId, remapId);
    const before = remap.mapVersionBefore;
    // An attached map that is not (or no longer, after a roll back) the active one may be replaced.
    const replaceable = remap.status === 'map_uploaded' && remap.mapVersionAfter?.status !== 'active';
    if (remap.status !== 'in_progress' && remap.status !== 'not_fixed' && !replaceable) {
      const why = remap.status === 'map_uploaded' ? `its new map version ${remap.mapVersionAfter?.version} is active and under verification` : `it is ${STATUS_WORDS[remap.status]}`;
      throw conflict(`A new map can be attached to ${ref(remap)} only while its remap run is in progress, while its attached map is not active, or after it was marked not fixed; ${why}.`);
    }
    const version = await this.db.getRepository(MapVersion).findOneBy({ id: mapVersionId, siteId: site.id });
    if (!version) throw badRequest(`The map version was not found at ${site.name}.`, { fieldErrors: { mapVersionId: ['must be a map version of this site'] } });
    if (version.kind !== 'floor') throw badRequest(`Version ${version.version} is a station model; a remap needs a floor map.`, { fieldErrors: { mapVersionId: ['must be a floor map'] } });
    if (version.version <= before.version) throw conflict(`Version ${version.version} is not newer than version ${before.version}, the map the zones were found on.`);
    if (version.uploadedAt.getTime() < remap.createdAt.getTime()) throw conflict(`Version ${version.version} was uploaded before ${ref(remap)} was created, so it cannot be the result of this remap.`);
    if (version.status === 'archived') throw conflict(`Version ${version.version} is archived; attach the version that is to become active.`);
    if (remap.mapVersionAfterId === version.id && remap.status === 'map_uploaded') throw conflict(`Version ${version.version} is already attached to ${ref(remap)}.`);
    await this.move(
      actor,
      site,
      remap,
      { status: 'map_uploaded', mapVersionAfterId: version.id, verification: null },
      'remap.attach_map',
      `${actor.name} attached floor map version ${version.version} to ${ref(remap)}${version.status === 'active' ? '; it is active, so the nightly check verifies it' : '; activating it starts the verification'}.`,
    );
    return this.get(actor, site.id, remap.id);
  }

  /** Cancels an unfinished request with a reason; its zones go back to the status they had before. */
  async cancel(actor: Actor, siteId: string, remapId: string, reason: string) {
    this.allow(actor, 'cancel', 'cancel');
    const { site, remap } = await this.find(actor, siteId, remapId);
    if (remap.status === 'verified' || remap.status === 'cancelled') throw conflict(`${ref(remap)} is ${STATUS_WORDS[remap.status]}; it can no longer be cancelled.`);
    const links = await this.db.getRepository(RemapRequestZone).find({ where: { remapId: remap.id } });
    const zones = links.length ? await this.db.getRepository(Zone).find({ where: { id: In(links.map((l) => l.zoneId)) }, select: { id: true, number: true, status: true } }) : [];
    await this.db.transaction(async (m) => {
      await m.update(RemapRequest, remap.id, { status: 'cancelled', cancelReason: reason });
      await this.audit.record(actor, { action: 'remap.cancel', targetType: 'remap_request', targetId: remap.id, organizationId: site.organizationId, summary: `${actor.name} cancelled ${ref(remap)}: ${reason}` }, m);
      for (const z of zones) {
        // A zone dismissed meanwhile keeps that status; only the planned ones go back.
        if (z.status !== 'planned') continue;
        const back = links.find((l) => l.zoneId === z.id)!.previousStatus;
        await m.update(Zone, z.id, { status: back, statusChangedAt: new Date(), statusNote: `${ref(remap)} was cancelled.` });
        await this.audit.record(actor, { action: 'zone.unplan', targetType: 'zone', targetId: z.id, organizationId: site.organizationId, summary: `Z-${z.number} is ${back} again: ${ref(remap)} was cancelled.` }, m);
      }
    });
    const noticeSentTo = await this.notify('cancelled', site, remap.id, { actorName: actor.name });
    return { ...(await this.get(actor, site.id, remap.id)), noticeSentTo };
  }

  private async move(actor: Actor | null, site: Site, remap: RemapRequest, change: RemapChange, action: string, summary: string, manager?: EntityManager) {
    const work = async (m: EntityManager) => {
      await m.update(RemapRequest, remap.id, change);
      await this.audit.record(actor, { action, targetType: 'remap_request', targetId: remap.id, organizationId: site.organizationId, summary }, m);
    };
    if (manager) await work(manager);
    else await this.db.transaction(work);
  }

  /**
   * The site's mean returns per local hour of the week over the last weeks of hourly traffic, and
   * the quietest windows of the request's estimated length in the next `days` days.
   */
  async quietWindows(actor: Actor, siteId: string, remapId: string, q: { days: number; count: number }, now = new Date()) {
    const { site, remap } = await this.find(actor, siteId, remapId);
    const tz = site.timezone;
    const nowMs = now.getTime();
    const hours = await this.traffic.hourly(site.id, nowMs - QUIET_HISTORY_WEEKS * WEEK_MS, nowMs);
    // Before the site's first scans there is no history, not a quiet spell: start on that day.
    const first = hours.length ? DateTime.fromMillis(hours[0].hourStartMs, { zone: tz }).startOf('day').toMillis() : nowMs;
    const fromMs = Math.max(nowMs - QUIET_HISTORY_WEEKS * WEEK_MS, first);
    const profile = hourOfWeekProfile(hours, tz, fromMs, nowMs);
    const durationMinutes = windowMinutes(remap.estimate.totalMinutes);
    const windows = quietWindows(profile, { timezone: tz, nowMs, days: q.days, durationMinutes, count: q.count });
    return {
      durationMinutes,
      timezone: tz,
      weeks: round((nowMs - fromMs) / WEEK_MS, 1),
      historyFrom: hours.length ? new Date(fromMs).toISOString() : null,
      hourOfWeek: profile.map((h) => ({ ...h, meanReturns: h.meanReturns === null ? null : round(h.meanReturns, 1) })),
      windows: windows.map((w) => ({ start: new Date(w.startMs).toISOString(), end: new Date(w.endMs).toISOString(), localStart: w.localStart, localEnd: w.localEnd, expectedReturns: Math.round(w.expectedReturns), rank: w.rank })),
    };
  }

  /** Requests with a window overlapping [from, to) across every site the actor may see, by window start. */
  async calendar(actor: Actor, from: Date, to: Date) {
    if (to.getTime() <= from.getTime()) throw badRequest('"to" must be after "from".', { fieldErrors: { to: ['must be after from'] } });
    if (to.getTime() - from.getTime() > CALENDAR_MAX_DAYS * DAY_MS) throw badRequest(`Ask for at most ${CALENDAR_MAX_DAYS} days at a time.`, { fieldErrors: { to: [`must be within ${CALENDAR_MAX_DAYS} days of from`] } });
    const sites = await this.sites.listVisible(actor);
    if (sites.length === 0) return { remaps: [] };
    const rows = await this.db.getRepository(RemapRequest).find({
      where: { siteId: In(sites.map((s) => s.id)), status: In(CALENDAR_STATUSES), windowStart: LessThan(to), windowEnd: MoreThan(from) },
      relations: RELATIONS,
      order: { windowStart: 'ASC', number: 'ASC' },
    });
    return { remaps: await this.views(rows) };
  }

  /**
   * The nightly check of a site's requests whose new map is active (called after the site's change
   * detection has tracked its zones): counts the days of fresh evidence covering the area, finds
   * zones of the new map inside it, records before/after figures, and decides verified (≥ 3 days,
   * nothing flags: the old zones resolve) or not fixed (≥ 7 days, zones still flag).
   */
  async verify(site: Site, now = new Date()) {
    const figures = { checked: 0, verified: 0, notFixed: 0 };
    const active = await this.mapVersions.activeFloor(site.id);
    if (!active?.activatedAt) return figures;
    const requests = await this.db.getRepository(RemapRequest).find({ where: { siteId: site.id, status: 'map_uploaded', mapVersionAfterId: active.id }, relations: RELATIONS });
    if (requests.length === 0) return figures;
    const tz = site.timezone;
    const exclusions = await this.health.exclusions(site);
    const activationDay = localDay(tz, active.activatedAt);
    // Evidence on the new version was counted after its activation, whatever day its scans are of (a
    // recorded drive uploaded later counts too); look as far back as detection does, and at least far
    // enough to reach the "not fixed" decision.
    const window = completeDays(tz, now, Math.max(siteSettings(site).detectionWindowDays, NOT_FIXED_DAYS));
    const days = this.store.daysWithEvidence(active.id, window[0], window[window.length - 1]);
    const geometry = geometryOf(active);
    const counters = createCounters(geometry);
    const robots: Array<{ robotId: string }> = await this.db.query('SELECT DISTINCT robot_id AS robotId FROM daily_stats WHERE map_version_id = ?', [active.id]);
    const newZones = await this.db.getRepository(Zone).find({ where: { siteId: site.id, mapVersionId: active.id, status: In(ACTIVE_ZONE_STATUSES) }, select: { id: true, number: true, areaM2: true, cells: true } });
    // One day's counters serve every request of the site.
    const observedByDay = new Map<string, Uint32Array>();
    for (const day of days) {
      counters.hits.fill(0);
      counters.passes.fill(0);
      this.store.loadIntoSync(active.id, [day], geometry.width, geometry.height, counters, robots.map((r) => r.robotId).filter((r) => exclusions.excludes(r, day)));
      const observed = new Uint32Array(counters.hits.length);
      for (let k = 0; k < observed.length; k++) observed[k] = counters.hits[k] + counters.passes[k];
      observedByDay.set(day, observed);
    }
    for (const remap of requests) {
      figures.checked++;
      const areaCells = cellsInOutlines(remap.area.parts.map((p) => p.outline), geometry);
      const inArea = new Set(areaCells);
      const evidenceDays = days.filter((day) => {
        const observed = observedByDay.get(day)!;
        let seen = 0;
        for (const c of areaCells) if (observed[c] > 0) seen++;
        return areaCells.length > 0 && seen / areaCells.length >= AREA_COVERED_SHARE;
      }).length;
      const flagging = newZones.filter((z) => decodeCells(z.cells).some((c) => inArea.has(c)));
      const links = await this.db.getRepository(RemapRequestZone).find({ where: { remapId: remap.id } });
      const oldZones = links.length ? await this.db.getRepository(Zone).find({ where: { id: In(links.map((l) => l.zoneId)) }, select: { id: true, number: true, status: true, areaM2: true } }) : [];
      const beforeSide: RemapSide = remap.verification?.before ?? {
        agreement: await this.agreement(site.id, remap.mapVersionBeforeId, addDays(activationDay, -BEFORE_DAYS), addDays(activationDay, -1), exclusions.excludes),
        changedAreaM2: round(oldZones.reduce((a, z) => a + z.areaM2, 0), 3),
      };
      const afterSide: RemapSide = {
        agreement: days.length ? await this.agreement(site.id, active.id, days[0], days[days.length - 1], exclusions.excludes) : null,
        changedAreaM2: round(flagging.reduce((a, z) => a + z.areaM2, 0), 3),
      };
      const state: RemapVerification['state'] = evidenceDays >= VERIFY_MIN_DAYS && flagging.length === 0 ? 'verified' : evidenceDays >= NOT_FIXED_DAYS && flagging.length > 0 ? 'not_fixed' : 'waiting';
      const verification: RemapVerification = { state, evidenceDays, zonesStillFlagging: flagging.length, before: beforeSide, after: afterSide, checkedAt: now.toISOString() };
      const pct = (a: number | null) => (a === null ? 'no returns' : `${(a * 100).toFixed(1)} %`);
      await this.db.transaction(async (m) => {
        if (state === 'waiting') {
          await m.update(RemapRequest, remap.id, { verification });
          return;
        }
        if (state === 'verified') {
          figures.verified++;
          await this.move(null, site, remap, { status: 'verified', verification }, 'remap.verify', `${ref(remap)} is verified: after ${evidenceDays} days of evidence on map version ${active.version}, no zone flags in its area; agreement ${pct(beforeSide.agreement)} → ${pct(afterSide.agreement)}.`, m);
          for (const z of oldZones) {
            if (z.status !== 'planned') continue;
            await m.update(Zone, z.id, { status: 'resolved', statusChangedAt: now, statusNote: `Resolved by ${ref(remap)}: map version ${active.version} no longer shows the change.` });
            await this.audit.record(null, { action: 'zone.resolve', targetType: 'zone', targetId: z.id, organizationId: site.organizationId, summary: `Z-${z.number} was resolved by ${ref(remap)} (map version ${active.version}).` }, m);
          }
        } else {
          figures.notFixed++;
          await this.move(null, site, remap, { status: 'not_fixed', verification }, 'remap.not_fixed', `${ref(remap)} is not fixed: after ${evidenceDays} days of evidence on map version ${active.version}, ${flagging.length} zone${flagging.length === 1 ? '' : 's'} (${flagging.map((z) => `Z-${z.number}`).join(', ')}, ${afterSide.changedAreaM2.toFixed(1)} m²) still flag in its area; agreement ${pct(beforeSide.agreement)} → ${pct(afterSide.agreement)}.`, m);
        }
      });
      if (state !== 'waiting') {
        const zones = { resolved: state === 'verified' ? oldZones.filter((z) => z.status === 'planned').map((z) => `Z-${z.number}`) : [], flagging: flagging.map((z) => `Z-${z.number}`) };
        await this.notify(state, site, remap.id, { actorName: null, zones });
      }
    }
    if (figures.checked > 0) this.log.info({ site: site.name, ...figures }, 'remap verification ran');
    return figures;
  }

  /** Explained / returns of a map version over site-local days [from, to], flagged robots' days left out; null without returns. */
  private async agreement(siteId: string, mapVersionId: string, from: string, to: string, excludes: (robotId: string, day: string) => boolean): Promise<number | null> {
    const rows = await this.db.getRepository(DailyStat).find({ where: { siteId, mapVersionId, day: Between(from, to) }, select: { robotId: true, day: true, returns: true, explained: true } });
    let returns = 0;
    let explained = 0;
    for (const r of rows) {
      if (excludes(r.robotId, r.day)) continue;
      returns += r.returns;
      explained += r.explained;
    }
    return returns > 0 ? round(explained / returns, 5) : null;
  }
}

function view(r: RemapRequest, zones: Zone[]) {
  const tz = r.windowTimezone ?? r.site?.timezone ?? 'UTC';
  const e = r.estimate;
  const version = (v: MapVersion | null) => (v ? { id: v.id, version: v.version, status: v.status, activatedAt: v.activatedAt?.toISOString() ?? null } : null);
  return {
    id: r.id,
    siteId: r.siteId,
    siteName: r.site?.name ?? null,
    number: r.number,
    label: ref(r),
    title: r.title,
    status: r.status,
    priority: { score: round(r.priorityScore, 3), label: priorityLabel(r.priorityScore) },
    zones: zones.map((z) => ({ id: z.id, label: `Z-${z.number}`, kind: z.kind, persistence: z.persistence, status: z.status, areaM2: z.areaM2 })),
    area: { outlines: r.area.parts.map((p) => p.outline), areaM2: round(r.area.areaM2, 2), marginM: r.area.marginM },
    estimate: {
      areaM2: round(e.areaM2, 2),
      sweepWidthM: e.sweepWidthM,
      driveSpeedMps: e.driveSpeedMps,
      laneLengthM: round(e.laneLengthM, 1),
      transitM: round(e.transitM, 1),
      driveLengthM: round(e.driveLengthM, 1),
      driveMinutes: round(e.driveMinutes, 1),
      overheadMinutes: e.overheadMinutes,
      totalMinutes: round(e.totalMinutes, 1),
      windowMinutes: windowMinutes(e.totalMinutes),
    },
    window:
      r.windowStart && r.windowEnd
        ? { start: r.windowStart.toISOString(), end: r.windowEnd.toISOString(), timezone: tz, localStart: localStamp(r.windowStart.getTime(), tz), localEnd: localStamp(r.windowEnd.getTime(), tz) }
        : null,
    assignee: person(r.assignee),
    requestedBy: person(r.requestedBy),
    approvedBy: person(r.approvedBy),
    approvedAt: r.approvedAt?.toISOString() ?? null,
    mapVersionBefore: version(r.mapVersionBefore),
    mapVersionAfter: version(r.mapVersionAfter),
    verification: r.verification,
    note: r.note,
    cancelReason: r.cancelReason,
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  };
}

export type RemapView = ReturnType<typeof view>;
