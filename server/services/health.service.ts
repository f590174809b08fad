import { In, type DataSource } from 'typeorm';
import { forecastHealth, healthBand, healthScore } from '../../shared/health/score.js';
import { AgreementBlocks, RemapRequest, RobotFlag, Robot, Site, Zone } from '../entities/index.js';
import { ACTIVE_ZONE_STATUSES } from '../entities/zone.entity.js';
import type { Actor } from '../auth/actor.js';
import { decodeCounts } from './evidence-store.js';
import type { MapVersionsService } from './map-versions.service.js';
import type { SitesService } from './sites.service.js';
import { addDays, completeDays, daysBetween, localDay } from './site-days.js';
import { siteSettings } from './site-settings.js';

/** Whose evidence a site's figures leave out (see HealthService.exclusions). */
export interface Exclusions {
  /** Robots with an active scanner check. */
  active: string[];
  /** Robots whose check was cleared, with the site-local day it was cleared. */
  clearedUntil: Map<string, string>;
  /** True when that robot's evidence of that day is left out. */
  excludes: (robotId: string, day: string) => boolean;
}

/** Days of the score (DESIGN.md §4.3) and of the forecast's fit. */
const SCORE_DAYS = 7;
const SERIES_DAYS = 30;
const FORECAST_DAYS = 28;

/** Map health of sites: score and band, daily series, 7-day change, forecast, zones and flags in numbers. */
export class HealthService {
  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly mapVersions: MapVersionsService,
  ) {}

  /** The sites the actor may see, each with its health figures (fleet overview). */
  async fleet(actor: Actor, now = new Date()) {
    const sites = await this.sites.listVisible(actor);
    return Promise.all(sites.map(async (s) => ({ ...(await this.sites.view(s)), health: await this.siteHealth(s, now) })));
  }

  /** One visible site with its health figures (site header). */
  async site(actor: Actor, siteId: string, now = new Date()) {
    const site = await this.sites.getVisible(actor, siteId);
    return { ...(await this.sites.view(site)), health: await this.siteHealth(site, now) };
  }

  /**
   * Agreement per block of the active map over the last `days` complete days (flagged robots left
   * out), for the heat layer: block size, grid of blocks from the map's origin, returns and share explained.
   */
  async agreementBlocks(actor: Actor, siteId: string, days: number, now = new Date()) {
    const site = await this.sites.getVisible(actor, siteId);
    const version = await this.mapVersions.activeFloor(site.id);
    if (!version) return null;
    const window = completeDays(site.timezone, now, days);
    const { excludes } = await this.exclusions(site);
    const rows = (await this.db.getRepository(AgreementBlocks).find({ where: { mapVersionId: version.id, day: In(window) } })).filter((r) => !excludes(r.robotId, r.day));
    const blockCells = rows[0]?.blockCells ?? Math.round(siteSettings(site).agreementBlockM / version.resolution);
    const cols = Math.ceil(version.width / blockCells);
    const rowsCount = Math.ceil(version.height / blockCells);
    const n = cols * rowsCount;
    const returns = new Array<number>(n).fill(0);
    const explained = new Array<number>(n).fill(0);
    for (const r of rows) {
      if (r.blockCells !== blockCells) continue;
      const counts = decodeCounts(r.data);
      if (counts.length !== 2 * n) continue;
      for (let k = 0; k < n; k++) {
        returns[k] += counts[k];
        explained[k] += counts[n + k];
      }
    }
    return { mapVersionId: version.id, days: window, blockCells, blockM: blockCells * version.resolution, cols, rows: rowsCount, returns, agreement: returns.map((r, k) => (r > 0 ? explained[k] / r : null)) };
  }


  /**
   * Whose evidence is left out: robots with an active scanner check entirely, and robots whose
   * check was cleared up to the day it was cleared (site-local), since those scans hold the fault.
   */
  async exclusions(site: Site): Promise<Exclusions> {
    const siteId = site.id;
    const flags = await this.db.getRepository(RobotFlag).createQueryBuilder('f').innerJoin(Robot, 'r', 'r.id = f.robot_id').where('r.site_id = :siteId', { siteId }).getMany();
    const active = [...new Set(flags.filter((f) => f.status === 'active').map((f) => f.robotId))];
    const clearedUntil = new Map<string, string>();
    for (const f of flags) {
      if (f.status !== 'cleared' || !f.clearedAt) continue;
      const day = localDay(site.timezone, f.clearedAt);
      if ((clearedUntil.get(f.robotId) ?? '') < day) clearedUntil.set(f.robotId, day);
    }
    const activeSet = new Set(active);
    return { active, clearedUntil, excludes: (robotId, day) => activeSet.has(robotId) || (clearedUntil.get(robotId) ?? '') >= day };
  }

  /** Per site-local day of the last `count` complete days: returns and explained returns on the active map (flagged robots left out). */
  async dailySeries(site: Site, now: Date, count = SERIES_DAYS, exclusions?: Exclusions) {
    const days = completeDays(site.timezone, now, count);
    const version = await this.mapVersions.activeFloor(site.id);
    if (!version) return days.map((day) => ({ day, returns: 0, explained: 0, score: null as number | null }));
    const { excludes } = exclusions ?? (await this.exclusions(site));
    // Plain SQL: the fleet overview asks this for every site, and building the query cost more than running it.
    const rows: Array<{ day: string; robotId: string; returns: number; explained: number }> = await this.db.query(
      'SELECT day, robot_id AS robotId, SUM(returns) AS returns, SUM(explained) AS explained FROM daily_stats WHERE site_id = ? AND map_version_id = ? AND day >= ? AND day <= ? GROUP BY day, robot_id',
      [site.id, version.id, days[0], days[days.length - 1]],
    );
    const byDay = new Map<string, { returns: number; explained: number }>();
    for (const r of rows) {
      if (excludes(r.robotId, r.day)) continue;
      const v = byDay.get(r.day) ?? { returns: 0, explained: 0 };
      v.returns += Number(r.returns);
      v.explained += Number(r.explained);
      byDay.set(r.day, v);
    }
    return days.map((day) => {
      const { returns, explained } = byDay.get(day) ?? { returns: 0, explained: 0 };
      return { day, returns, explained, score: healthScore(explained, returns) };
    });
  }

  /** Everything the site header and the fleet overview show about a site's map health. */
  async siteHealth(site: Site, now = new Date()) {
    const settings = siteSettings(site);
    const exclusions = await this.exclusions(site);
    const series = await this.dailySeries(site, now, SERIES_DAYS, exclusions);
    const sum = (rows: typeof series) => rows.reduce((a, r) => ({ returns: a.returns + r.returns, explained: a.explained + r.explained }), { returns: 0, explained: 0 });
    const last7 = sum(series.slice(-SCORE_DAYS));
    const prev7 = sum(series.slice(-2 * SCORE_DAYS, -SCORE_DAYS));
    const score = healthScore(last7.explained, last7.returns);
    const previous = healthScore(prev7.explained, prev7.returns);
    const limits = { goodMin: settings.healthGoodMin, watchMin: settings.healthWatchMin };
    const withData = series.slice(-FORECAST_DAYS).filter((r) => r.score !== null);
    const lastDay = series[series.length - 1].day;
    const forecast = withData.length ? forecastHealth(withData.map((r) => daysBetween(lastDay, r.day)), withData.map((r) => r.score!), settings.healthWatchMin) : null;
    const zones = await this.db.getRepository(Zone).find({ where: { siteId: site.id, status: In(ACTIVE_ZONE_STATUSES) }, select: { id: true, kind: true, areaM2: true, persistence: true } });
    const openZones = { new: 0, missing: 0, unmapped: 0 };
    for (const z of zones) openZones[z.kind]++;
    // One read for both remap figures: the requests waiting to be scheduled and the next window.
    const open = await this.db.getRepository(RemapRequest).find({ where: { siteId: site.id, status: In(['proposed', 'scheduled', 'in_progress']) }, select: { id: true, number: true, title: true, status: true, windowStart: true, windowEnd: true } });
    // As ORDER BY window_start would: a request without a start comes first.
    const next = open
      .filter((r) => r.status !== 'proposed' && r.windowEnd !== null && r.windowEnd.getTime() >= now.getTime())
      .sort((a, b) => (a.windowStart === null || b.windowStart === null ? Number(b.windowStart === null) - Number(a.windowStart === null) : a.windowStart.getTime() - b.windowStart.getTime()))[0];
    return {
      score,
      band: score === null ? null : healthBand(score, limits),
      bands: limits,
      sentence: score === null ? 'No scans on the active map in the last 7 days yet.' : `The map explains ${score.toFixed(1)} % of laser returns over the last 7 days.`,
      change7d: score !== null && previous !== null ? score - previous : null,
      returns7d: last7.returns,
      series: series.map(({ day, score: s, returns }) => ({ day, score: s, returns })),
      forecast: forecast && {
        ...forecast,
        threshold: settings.healthWatchMin,
        crossesOn: forecast.daysToThreshold === null ? null : addDays(lastDay, Math.ceil(forecast.daysToThreshold)),
        earliestOn: forecast.earliestDays === null || !Number.isFinite(forecast.earliestDays) ? null : addDays(lastDay, Math.floor(forecast.earliestDays)),
        latestOn: forecast.latestDays === null || !Number.isFinite(forecast.latestDays) ? null : addDays(lastDay, Math.ceil(forecast.latestDays)),
      },
      openZones,
      changedAreaM2: zones.reduce((a, z) => a + z.areaM2, 0),
      flaggedRobots: exclusions.active.length,
      nextRemap: next && next.windowStart && next.windowEnd ? { id: next.id, number: next.number, title: next.title, status: next.status, start: next.windowStart.toISOString(), end: next.windowEnd.toISOString() } : null,
      // Requests waiting to be scheduled (proposed).
      remapsWaiting: open.filter((r) => r.status === 'proposed').length,
    };
  }
}
