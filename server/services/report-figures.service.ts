import { DateTime } from 'luxon';
import { And, In, LessThan, MoreThanOrEqual, type DataSource } from 'typeorm';
import { healthScore } from '../../shared/health/score.js';
import { DailyStat, MapVersion, Organization, RemapRequest, Robot, RobotFlag, Site, Zone } from '../entities/index.js';
import type { ZoneKind } from '../entities/zone.entity.js';
import type { Actor } from '../auth/actor.js';
import { badRequest, notFound } from '../http-error.js';
import type { DockingService } from './docking.service.js';
import type { HealthService } from './health.service.js';
import type { MapVersionsService } from './map-versions.service.js';

/** A report month: 'YYYY-MM'. */
const MONTH = /^(\d{4})-(0[1-9]|1[0-2])$/;

/** Zone states that count as still open at an instant when the zone's last status change came later. */
const CLOSED_ZONE_STATUSES = ['resolved', 'dismissed', 'cleared'];

/** The month's bounds in a time zone: first instant, first instant of the next month, and the site-local days. */
export function monthBounds(month: string, timezone: string) {
  const m = MONTH.exec(month);
  if (!m) throw badRequest(`The month must be written YYYY-MM (got "${month}").`);
  const start = DateTime.fromObject({ year: Number(m[1]), month: Number(m[2]), day: 1 }, { zone: timezone });
  if (!start.isValid) throw badRequest(`Unknown time zone "${timezone}".`);
  const end = start.plus({ months: 1 });
  const days = Array.from({ length: start.daysInMonth! }, (_, k) => start.plus({ days: k }).toISODate()!);
  return { start: start.toJSDate(), end: end.toJSDate(), days, previous: start.minus({ months: 1 }).toFormat('yyyy-MM') };
}

/** The calendar month before the one holding `now` in the time zone, as 'YYYY-MM'. */
export function previousMonth(timezone: string, now: Date): string {
  return DateTime.fromJSDate(now, { zone: timezone }).startOf('month').minus({ months: 1 }).toFormat('yyyy-MM');
}

/** True when the month has ended in the time zone at `now` (reports cover complete months only). */
export function monthIsPast(month: string, timezone: string, now: Date): boolean {
  return monthBounds(month, timezone).end.getTime() <= now.getTime();
}

export type ReportFigures = Awaited<ReturnType<ReportFiguresService['figures']>>;
export type SiteReportFigures = ReportFigures['sites'][number];

/**
 * The monthly report's figures per site of a customer organization, for a calendar month in the
 * organization's time zone (DESIGN.md §4.8). Instants (remaps, flags, zone states) are cut at the
 * organization's month bounds; the daily evidence is read by the site's own calendar days of that month.
 */
export class ReportFiguresService {
  constructor(
    private readonly db: DataSource,
    private readonly health: HealthService,
    private readonly mapVersions: MapVersionsService,
    private readonly docking: DockingService,
    private readonly baseUrl: string,
  ) {}

  async figures(organizationId: string, month: string) {
    const org = await this.db.getRepository(Organization).findOneBy({ id: organizationId });
    if (!org) throw notFound('The organization');
    const bounds = monthBounds(month, org.timezone);
    const sites = await this.db.getRepository(Site).find({ where: { organizationId: org.id }, order: { name: 'ASC' } });
    const reader: Actor = { id: 'monthly-report', email: 'reports@driftline.invalid', name: 'Monthly report', role: 'admin', organizationId: org.id };
    return {
      organization: { id: org.id, name: org.name, timezone: org.timezone },
      month,
      monthLabel: DateTime.fromJSDate(bounds.start, { zone: org.timezone }).toFormat('LLLL yyyy'),
      from: bounds.start.toISOString(),
      to: bounds.end.toISOString(),
      sites: await Promise.all(sites.map((s) => this.site(reader, s, month, bounds))),
    };
  }

  private async site(reader: Actor, site: Site, month: string, bounds: ReturnType<typeof monthBounds>) {
    const { start, end } = bounds;
    const exclusions = await this.health.exclusions(site);
    const previousDays = monthBounds(bounds.previous, site.timezone).days;
    const daily = await this.daily(site, [...previousDays, ...bounds.days], exclusions.excludes);
    const sum = (days: string[]) => days.reduce((a, d) => ({ returns: a.returns + (daily.get(d)?.returns ?? 0), explained: a.explained + (daily.get(d)?.explained ?? 0) }), { returns: 0, explained: 0 });
    const now = sum(bounds.days);
    const before = sum(previousDays);
    const score = healthScore(now.explained, now.returns);
    const previousScore = healthScore(before.explained, before.returns);

    const zones = await this.db.getRepository(Zone).find({ where: { siteId: site.id, createdAt: LessThan(end) }, select: { id: true, number: true, kind: true, status: true, statusChangedAt: true, areaM2: true, outline: true, mapVersionId: true } });
    const openAtEnd = zones.filter((z) => !CLOSED_ZONE_STATUSES.includes(z.status) || (z.statusChangedAt !== null && z.statusChangedAt.getTime() >= end.getTime()));
    const openZones: Record<ZoneKind, number> = { new: 0, missing: 0, unmapped: 0 };
    for (const z of openAtEnd) openZones[z.kind]++;

    const remaps = await this.db.getRepository(RemapRequest).find({ where: { siteId: site.id }, order: { number: 'ASC' } });
    const remapsDone = remaps
      .filter((r) => r.status === 'verified' && r.verification?.checkedAt && new Date(r.verification.checkedAt) >= start && new Date(r.verification.checkedAt) < end)
      .map((r) => ({ number: r.number, title: r.title, verifiedAt: r.verification!.checkedAt! }));
    const remapsPlanned = remaps
      .filter((r) => (r.status === 'scheduled' || r.status === 'in_progress') && r.windowStart !== null && r.windowStart >= end)
      .map((r) => ({ number: r.number, title: r.title, windowStart: r.windowStart!.toISOString() }));

    const robots = await this.db.getRepository(Robot).find({ where: { siteId: site.id }, select: { id: true, name: true } });
    const flags = robots.length
      ? await this.db.getRepository(RobotFlag).find({ where: { robotId: In(robots.map((r) => r.id)), raisedAt: And(MoreThanOrEqual(start), LessThan(end)) }, order: { raisedAt: 'ASC' } })
      : [];
    const robotName = new Map(robots.map((r) => [r.id, r.name]));

    // The docking verdicts as they stood at the month's end (the window closes there).
    const dock = await this.docking.list(reader, site.id, new Date(end.getTime() - 1));
    const version = await this.mapVersionAt(site.id, end);

    return {
      id: site.id,
      name: site.name,
      timezone: site.timezone,
      link: `${this.baseUrl}/sites/${site.id}`,
      score,
      previousScore,
      change: score !== null && previousScore !== null ? score - previousScore : null,
      returns: now.returns,
      daily: bounds.days.map((day) => ({ day, score: daily.has(day) ? healthScore(daily.get(day)!.explained, daily.get(day)!.returns) : null })),
      changedAreaM2: openAtEnd.reduce((a, z) => a + z.areaM2, 0),
      openZones,
      zones: openAtEnd.filter((z) => version && z.mapVersionId === version.id).map((z) => ({ number: z.number, kind: z.kind, outline: z.outline })),
      remapsDone,
      remapsPlanned,
      scannerFlags: flags.map((f) => ({ robot: robotName.get(f.robotId) ?? 'Unknown robot', scanner: f.scanner, raisedAt: f.raisedAt.toISOString() })),
      docking: {
        total: dock.summary.total,
        outOfTolerance: dock.stations.filter((s) => s.verdict.state === 'out_of_tolerance').map((s) => s.name),
        drifting: dock.stations.filter((s) => s.verdict.state === 'drifting').map((s) => s.name),
      },
      mapVersionId: version?.id ?? null,
    };
  }

  /** Returns and explained returns per site-local day, over every floor map each day's evidence was read against, flagged robots left out. */
  private async daily(site: Site, days: string[], excludes: (robotId: string, day: string) => boolean) {
    const rows: Array<{ day: string; robotId: string; returns: number; explained: number }> = await this.db
      .getRepository(DailyStat)
      .createQueryBuilder('d')
      .select('d.day', 'day')
      .addSelect('d.robot_id', 'robotId')
      .addSelect('SUM(d.returns)', 'returns')
      .addSelect('SUM(d.explained)', 'explained')
      .where('d.site_id = :siteId AND d.day >= :from AND d.day <= :to', { siteId: site.id, from: days[0], to: days[days.length - 1] })
      .groupBy('d.day')
      .addGroupBy('d.robot_id')
      .getRawMany();
    const byDay = new Map<string, { returns: number; explained: number }>();
    for (const r of rows) {
      if (excludes(r.robotId, r.day)) continue;
      const v = byDay.get(r.day) ?? { returns: 0, explained: 0 };
      v.returns += Number(r.returns);
      v.explained += Number(r.explained);
      byDay.set(r.day, v);
    }
    return byDay;
  }

  /** The floor map that was active at an instant: the last one activated before it (the active one when none was). */
  private async mapVersionAt(siteId: string, at: Date) {
    const last = await this.db.getRepository(MapVersion).findOne({ where: { siteId, kind: 'floor', activatedAt: LessThan(at) }, order: { activatedAt: 'DESC' }, select: { id: true, version: true } });
    return last ?? (await this.mapVersions.activeFloor(siteId));
  }
}
