import { deflateRawSync, inflateRawSync } from 'node:zlib';
import type { Logger } from 'pino';
import { In, type DataSource } from 'typeorm';
import type { DetectionFigures } from '../../shared/types/jobs.js';
import { detectChanges, type DayCounters, type ZoneCandidate } from '../../shared/detect/change-detection.js';
import { createCounters } from '../../shared/scan/accumulate.js';
import type { Actor } from '../auth/actor.js';
import { AuditEvent, MapVersion, Site, Zone } from '../entities/index.js';
import { ACTIVE_ZONE_STATUSES, type ZoneKind, type ZoneStatus } from '../entities/zone.entity.js';
import { badRequest, conflict, notFound } from '../http-error.js';
import type { AuditService } from './audit.service.js';
import { EvidenceStore } from './evidence-store.js';
import type { HealthService } from './health.service.js';
import { newId } from './ids.js';
import type { MapVersionsService } from './map-versions.service.js';
import type { ScannerCheckService } from './scanner-check.service.js';
import { completeDays } from './site-days.js';
import { siteSettings } from './site-settings.js';
import type { SitesService } from './sites.service.js';

const encodeCells = (cells: Int32Array) => deflateRawSync(Buffer.from(cells.buffer, cells.byteOffset, cells.byteLength), { level: 6 });
function decodeCells(blob: Buffer): Int32Array {
  const raw = inflateRawSync(blob);
  return new Int32Array(raw.buffer.slice(raw.byteOffset, raw.byteOffset + raw.byteLength));
}


/** Zone filters of the zones table. */
export interface ZoneQuery {
  kind?: ZoneKind;
  status?: ZoneStatus | 'active';
  persistence?: 'persistent' | 'intermittent';
  seenFrom?: string;
  seenTo?: string;
  page: number;
  pageSize: number;
}

function zoneView(z: Zone) {
  return {
    id: z.id,
    siteId: z.siteId,
    mapVersionId: z.mapVersionId,
    number: z.number,
    label: `Z-${z.number}`,
    kind: z.kind,
    status: z.status,
    persistence: z.persistence,
    outline: z.outline,
    bbox: z.bbox,
    centroid: z.centroid,
    cellCount: z.cellCount,
    areaM2: z.areaM2,
    meanHitRate: z.meanHitRate,
    hitRateInterval: [z.hitRateLow, z.hitRateHigh] as [number, number],
    observations: z.observations,
    daysObserved: z.daysObserved,
    daysFlagged: z.daysFlagged,
    trafficPerM2PerDay: z.trafficPerM2PerDay,
    severity: z.severity,
    firstSeenDay: z.firstSeenDay,
    lastSeenDay: z.lastSeenDay,
    statusNote: z.statusNote,
    statusChangedAt: z.statusChangedAt?.toISOString() ?? null,
  };
}
export type ZoneView = ReturnType<typeof zoneView>;
export type { DetectionFigures };

/**
 * Nightly change detection of a site (DESIGN.md §4.4): pools the window's evidence on the active
 * map (robots with a scanner check left out), finds zones, and tracks them across runs by overlap
 * with the zones already known, so the same area never reappears as a new zone every night.
 */
export class DetectionService {
  private readonly store: EvidenceStore;

  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly mapVersions: MapVersionsService,
    private readonly health: HealthService,
    private readonly scannerCheck: ScannerCheckService,
    private readonly audit: AuditService,
    private readonly log: Logger,
  ) {
    this.store = new EvidenceStore(db);
  }

  /** Runs the scanner check, then change detection and zone tracking for one site. */
  async runForSite(site: Site, now = new Date()): Promise<DetectionFigures> {
    const version = await this.mapVersions.activeFloor(site.id);
    const empty: DetectionFigures = { mapVersion: null, days: 0, excludedRobots: 0, candidates: 0, zonesNew: 0, zonesUpdated: 0, zonesCleared: 0, flagged: [] };
    if (!version) return { ...empty, skipped: 'The site has no active floor map.' };
    const { flagged } = await this.scannerCheck.run(site, now);
    const settings = siteSettings(site);
    const window = completeDays(site.timezone, now, settings.detectionWindowDays);
    const days = this.store.daysWithEvidence(version.id, window[0], window[window.length - 1]);
    if (days.length === 0) return { ...empty, mapVersion: version.version, flagged, skipped: 'No evidence in the detection window.' };
    const exclusions = await this.health.exclusions(site);
    const robotIds = await this.robotIdsWithEvidence(version.id);
    const grid = await this.mapVersions.grid(version);
    const field = await this.mapVersions.distanceField(version);
    const store = this.store;
    // One day's counters at a time: the detector pools and then revisits days in order.
    const counters = createCounters(grid);
    const dayIterator = function* (): Generator<DayCounters> {
      for (const day of days) {
        counters.hits.fill(0);
        counters.passes.fill(0);
        store.loadIntoSync(version.id, [day], grid.width, grid.height, counters, robotIds.filter((r) => exclusions.excludes(r, day)));
        yield { day, hits: counters.hits, passes: counters.passes };
      }
    };
    const started = Date.now();
    const result = detectChanges(grid, field.values, dayIterator, { windowDays: settings.detectionWindowDays, toleranceM: settings.agreementToleranceM });
    const tracked = await this.track(site, version, result.zones, days[days.length - 1], settings.clearZoneAfterRuns);
    this.log.info({ site: site.name, days: days.length, zones: result.zones.length, ms: Date.now() - started }, 'change detection ran');
    return { mapVersion: version.version, days: days.length, excludedRobots: exclusions.active.length, candidates: result.zones.length, ...tracked, flagged };
  }

  private async robotIdsWithEvidence(mapVersionId: string): Promise<string[]> {
    const rows: Array<{ robotId: string }> = await this.db.query('SELECT DISTINCT robot_id AS robotId FROM daily_stats WHERE map_version_id = ?', [mapVersionId]);
    return rows.map((r) => r.robotId);
  }

  private async track(site: Site, version: MapVersion, candidates: ZoneCandidate[], lastDay: string, clearAfterRuns: number) {
    const repo = this.db.getRepository(Zone);
    const known = await repo.find({ where: { siteId: site.id, mapVersionId: version.id, status: In([...ACTIVE_ZONE_STATUSES, 'dismissed']) }, select: { id: true, kind: true, status: true, number: true, missedRuns: true, cells: true, firstSeenDay: true } });
    // Which known zone owns each cell, per kind: matching by overlap needs no geometry library.
    const owner = new Map<string, Map<number, number>>();
    known.forEach((z, index) => {
      let m = owner.get(z.kind);
      if (!m) owner.set(z.kind, (m = new Map()));
      for (const c of decodeCells(z.cells)) m.set(c, index);
    });
    const seen = new Set<number>();
    let next = ((await repo.createQueryBuilder('z').select('MAX(z.number)', 'n').where('z.site_id = :s', { s: site.id }).getRawOne<{ n: number | null }>())?.n ?? 0) + 1;
    let zonesNew = 0;
    let zonesUpdated = 0;
    let zonesCleared = 0;
    await this.db.transaction(async (m) => {
      for (const c of candidates) {
        const overlap = new Map<number, number>();
        const cellsOwner = owner.get(c.kind);
        if (cellsOwner) for (const cell of c.cells) {
          const k = cellsOwner.get(cell);
          if (k !== undefined && !seen.has(k)) overlap.set(k, (overlap.get(k) ?? 0) + 1);
        }
        const best = [...overlap.entries()].sort((a, b) => b[1] - a[1])[0];
        const figures = {
          persistence: c.persistence,
          outline: c.outline,
          bbox: c.bbox,
          centroid: c.centroid,
          cellCount: c.cellCount,
          areaM2: c.areaM2,
          meanHitRate: c.meanHitRate,
          hitRateLow: c.hitRateInterval[0],
          hitRateHigh: c.hitRateInterval[1],
          observations: c.observations,
          daysObserved: c.daysObserved,
          daysFlagged: c.daysFlagged,
          trafficPerM2PerDay: c.trafficPerM2PerDay,
          severity: c.severity,
          timeline: c.timeline,
          cells: encodeCells(c.cells),
          lastSeenDay: c.lastFlaggedDay ?? lastDay,
          missedRuns: 0,
        };
        if (best) {
          seen.add(best[0]);
          // A dismissed zone stays dismissed: its figures follow the evidence, its status does not.
          await m.update(Zone, known[best[0]].id, figures);
          zonesUpdated++;
        } else {
          const id = newId();
          await m.insert(Zone, { id, siteId: site.id, mapVersionId: version.id, number: next, kind: c.kind, status: 'open', firstSeenDay: c.firstFlaggedDay ?? lastDay, statusNote: null, statusChangedAt: null, ...figures });
          await this.audit.record(null, { action: 'zone.detect', targetType: 'zone', targetId: id, organizationId: site.organizationId, summary: `Detection found Z-${next}: ${c.kind} structure, ${c.persistence}, ${c.areaM2.toFixed(1)} m² at ${site.name}.` }, m);
          next++;
          zonesNew++;
        }
      }
      for (const [index, z] of known.entries()) {
        if (seen.has(index) || z.status === 'dismissed') continue;
        const missed = z.missedRuns + 1;
        if (missed >= clearAfterRuns) {
          await m.update(Zone, z.id, { missedRuns: missed, status: 'cleared', statusChangedAt: new Date(), statusNote: `Not seen in ${missed} detection runs.` });
          await this.audit.record(null, { action: 'zone.clear', targetType: 'zone', targetId: z.id, organizationId: site.organizationId, summary: `Z-${z.number} was not seen in ${missed} detection runs and was cleared.` }, m);
          zonesCleared++;
        } else {
          await m.update(Zone, z.id, { missedRuns: missed });
        }
      }
    });
    return { zonesNew, zonesUpdated, zonesCleared };
  }

  /** Zones of a visible site with filters and paging, highest severity first. */
  async list(actor: Actor, siteId: string, q: ZoneQuery) {
    const site = await this.sites.getVisible(actor, siteId);
    const qb = this.db.getRepository(Zone).createQueryBuilder('z').where('z.site_id = :s', { s: site.id });
    if (q.kind) qb.andWhere('z.kind = :kind', { kind: q.kind });
    if (q.status === 'active') qb.andWhere('z.status IN (:...st)', { st: ACTIVE_ZONE_STATUSES });
    else if (q.status) qb.andWhere('z.status = :status', { status: q.status });
    if (q.persistence) qb.andWhere('z.persistence = :p', { p: q.persistence });
    if (q.seenFrom) qb.andWhere('z.last_seen_day >= :f', { f: q.seenFrom });
    if (q.seenTo) qb.andWhere('z.first_seen_day <= :t', { t: q.seenTo });
    const [rows, total] = await qb.orderBy('z.severity', 'DESC').addOrderBy('z.number', 'ASC').skip((q.page - 1) * q.pageSize).take(q.pageSize).getManyAndCount();
    return { zones: rows.map(zoneView), total, page: q.page, pageSize: q.pageSize };
  }

  private async find(actor: Actor, siteId: string, zoneId: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const zone = await this.db.getRepository(Zone).findOneBy({ id: zoneId, siteId: site.id });
    if (!zone) throw notFound('The zone');
    return { site, zone };
  }

  /** One zone with its daily timeline and status history. */
  async get(actor: Actor, siteId: string, zoneId: string) {
    const { zone } = await this.find(actor, siteId, zoneId);
    const history = await this.db.getRepository(AuditEvent).find({ where: { targetType: 'zone', targetId: zone.id }, relations: { actor: true }, order: { at: 'ASC', id: 'ASC' } });
    return {
      ...zoneView(zone),
      timeline: zone.timeline,
      history: history.map((e) => ({ at: e.at.toISOString(), action: e.action, actor: e.actor ? { id: e.actor.id, name: e.actor.name } : null, summary: e.summary })),
    };
  }

  /** The cells of a zone as map indices j·width + i (i across, j up from the map's bottom row), ascending. */
  async zoneCells(actor: Actor, siteId: string, zoneId: string): Promise<Int32Array> {
    const { zone } = await this.find(actor, siteId, zoneId);
    // The blob is left out of ordinary reads (select: false); fetch it on its own.
    const { cells } = await this.db.getRepository(Zone).findOneOrFail({ where: { id: zone.id }, select: { id: true, cells: true } });
    return decodeCells(cells);
  }

  /** Moves a zone to a new status with a note, checking that the move is allowed from where it is. */
  async changeStatus(actor: Actor, siteId: string, zoneId: string, to: 'acknowledged' | 'dismissed', note: string) {
    const { site, zone } = await this.find(actor, siteId, zoneId);
    const allowedFrom: Record<typeof to, ZoneStatus[]> = { acknowledged: ['open'], dismissed: ['open', 'acknowledged', 'planned'] };
    if (!allowedFrom[to].includes(zone.status)) throw conflict(`Z-${zone.number} is ${zone.status}; it cannot be ${to} from there.`);
    if (to === 'dismissed' && note.trim() === '') throw badRequest('Give a reason for dismissing the zone, e.g. "volatile area".');
    await this.db.transaction(async (m) => {
      await m.update(Zone, zone.id, { status: to, statusNote: note || null, statusChangedAt: new Date() });
      await this.audit.record(actor, { action: `zone.${to === 'acknowledged' ? 'acknowledge' : 'dismiss'}`, targetType: 'zone', targetId: zone.id, organizationId: site.organizationId, summary: `${actor.name} ${to} Z-${zone.number}${note ? `: ${note}` : '.'}` }, m);
    });
    return this.get(actor, siteId, zoneId);
  }
}
