import { createHash } from 'node:crypto';
import { gunzipSync } from 'node:zlib';
import type { Database } from 'better-sqlite3';
import { DateTime } from 'luxon';
import { In, MoreThanOrEqual, type DataSource } from 'typeorm';
import { summarizeAccuracy, dailyAccuracy, type AccuracySummary, type DockingSample, type DockingTolerance } from '../../shared/docking/accuracy.js';
import { dockingBodyLines, parseDockingLine, STATION_NAME_MAX } from '../../shared/docking/docking-record.js';
import { driftSentence } from '../../shared/docking/drift-sentence.js';
import { DAY_MS, detectDrift, DRIFT_DEFAULTS, type ChannelDrift, type DriftVerdict } from '../../shared/docking/drift.js';
import type { Actor } from '../auth/actor.js';
import { DockingBatch, DockingResult, DockingStation, MapVersion, Robot, Site } from '../entities/index.js';
import type { RejectedLine } from '../entities/scan-batch.entity.js';
import { badRequest, conflict, HttpError, notFound } from '../http-error.js';
import { exclusive } from '../transaction-lock.js';
import type { AuditService } from './audit.service.js';
import { rawHandle, sqliteDatetime } from './evidence-store.js';
import { newId } from './ids.js';
import { MAX_REJECTED_KEPT } from './scan-accumulator.js';
import { localDayFinder } from './site-days.js';
import { siteSettings } from './site-settings.js';
import type { SitesService } from './sites.service.js';

/** Largest decompressed docking batch, bytes: thousands of results, far more than a day of any station (product choice). */
export const DOCKING_BATCH_MAX_BYTES = 1024 * 1024;
/** Days of dockings the station page shows and the drift check reads, ending now (product choice: four weeks). */
export const DOCKING_WINDOW_DAYS = 28;
/** Most dockings a station page lists in its series; the figures use all (product choice). */
const SERIES_MAX = 5000;

const DEG = Math.PI / 180;
const mm = (m: number) => +(m * 1000).toFixed(2);
const deg = (rad: number) => +(rad / DEG).toFixed(3);

/** Where a tolerance comes from: the station's own, the site setting, or the product default. */
export type ToleranceSource = 'station' | 'site' | 'default';

function batchView(b: DockingBatch) {
  return {
    id: b.id,
    siteId: b.siteId,
    robotId: b.robotId,
    idempotencyKey: b.idempotencyKey,
    receivedAt: b.receivedAt.toISOString(),
    lines: b.lines,
    counted: b.counted,
    rejectedCount: b.rejectedCount,
    rejectedLines: b.rejectedLines,
  };
}

/** A docking receipt's batch as robots and the API see it. */
export type DockingBatchView = ReturnType<typeof batchView>;

function summaryView(s: AccuracySummary | null) {
  if (!s) return null;
  return { count: s.count, meanDxMm: mm(s.meanDx), meanDyMm: mm(s.meanDy), meanOffsetMm: mm(s.meanOffset), p95RadialMm: mm(s.p95Radial), meanYawDeg: deg(s.meanYaw), p95YawDeg: deg(s.p95AbsYaw), withinShare: s.withinShare };
}

/** A channel's drift figures in millimetres (position) or degrees (heading), times as ISO text. */
function channelView(c: ChannelDrift) {
  const u = c.channel === 'position' ? mm : deg;
  const iso = (ms: number) => new Date(ms).toISOString();
  return {
    unit: c.channel === 'position' ? ('mm' as const) : ('deg' as const),
    tolerance: u(c.tolerance),
    recentOffset: c.recentOffset === null ? null : u(c.recentOffset),
    recentCount: c.recentCount,
    state: c.state,
    finding: c.finding,
    step: { test: 'Pettitt change-point test', pValue: c.step.pValue, at: iso(c.step.atMs), before: c.step.before.map(u), after: c.step.after.map(u), shift: u(c.step.shift), offsetAfter: u(c.step.offsetAfter), significant: c.step.significant, relevant: c.step.relevant },
    trend: c.trend && {
      test: 'Mann–Kendall test, Theil–Sen slope',
      pValue: c.trend.pValue,
      slopesPerDay: c.trend.slopes.map(u),
      speedPerDay: u(c.trend.speedPerDay),
      offsetNow: u(c.trend.offsetNow),
      projected: u(c.trend.projected),
      crossingAt: c.trend.crossingMs === null ? null : iso(c.trend.crossingMs),
      days: c.trend.days,
      significant: c.trend.significant,
      relevant: c.trend.relevant,
    },
  };
}

/**
 * Docking stations of a site: their models and tolerances, the docking results robots post
 * (same batch policy as scans), and per station its accuracy and drift verdict (DESIGN §4.7).
 */
export class DockingService {
  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly audit: AuditService,
  ) {}

  // ---- ingest ----------------------------------------------------------------------------

  private findReplay(raw: Database, siteId: string, key: string | null, hash: string) {
    const byKey = key ? (raw.prepare('SELECT id, content_hash AS hash FROM docking_batches WHERE site_id = ? AND idempotency_key = ?').get(siteId, key) as { id: string; hash: string } | undefined) : undefined;
    if (byKey) return byKey;
    return raw.prepare('SELECT id, content_hash AS hash FROM docking_batches WHERE site_id = ? AND content_hash = ?').get(siteId, hash) as { id: string; hash: string } | undefined;
  }

  private async replayAnswer(replayed: { id: string; hash: string }, hash: string) {
    if (replayed.hash !== hash) throw conflict('This Idempotency-Key was already used for a batch with different content; use a new key for new docking results.');
    return { status: 'already_received' as const, batch: batchView(await this.db.getRepository(DockingBatch).findOneByOrFail({ id: replayed.id })) };
  }

  private inflate(body: Buffer): Buffer {
    if (body.length >= 2 && body[0] === 0x1f && body[1] === 0x8b) {
      try {
        return gunzipSync(body, { maxOutputLength: DOCKING_BATCH_MAX_BYTES });
      } catch (e) {
        if ((e as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE') throw new HttpError(413, 'payload_too_large', `The batch unpacks to more than ${DOCKING_BATCH_MAX_BYTES / 1024 / 1024} MB; send smaller batches.`);
        throw new HttpError(400, 'invalid_gzip', 'The batch looks gzip-compressed but could not be unpacked.');
      }
    }
    return body;
  }

  /**
   * Counts a robot's posted docking results (JSON Lines or one JSON object, plain or gzip).
   * Policy as for scans: good lines are counted, refused lines reported with line and reason; a
   * batch with no good line counts nothing (422); a replay (same key or content) counts nothing
   * and says "already_received"; a key reused for other content is refused (409). A docking
   * already stored (same station, robot and time) is refused as already received.
   */
  async ingestRobotBatch(robot: Robot, body: Buffer, idempotencyKey: string | null, now = new Date()) {
    const text = this.inflate(body);
    const hash = createHash('sha256').update(text).digest('hex');
    const raw = rawHandle(this.db);
    const replayed = this.findReplay(raw, robot.siteId, idempotencyKey, hash);
    if (replayed) return this.replayAnswer(replayed, hash);

    const stations = await this.db.getRepository(DockingStation).findBy({ siteId: robot.siteId });
    const byName = new Map(stations.map((s) => [s.name, s]));
    const ctx = { now, stations: new Set(byName.keys()), expectedRobot: robot.name };
    const lines = dockingBodyLines(text.toString('utf8'));
    const rejected: RejectedLine[] = [];
    let rejectedCount = 0;
    const reject = (line: number, reason: string) => {
      rejectedCount++;
      if (rejected.length < MAX_REJECTED_KEPT) rejected.push({ line, reason });
    };
    const good: Array<{ line: number; station: DockingStation; tMs: number; dx: number; dy: number; dyaw: number }> = [];
    const seen = new Map<string, number>();
    for (const { line, text: l } of lines) {
      const parsed = parseDockingLine(l, ctx);
      if (!parsed.ok) {
        reject(line, parsed.reason);
        continue;
      }
      const r = parsed.record;
      const station = byName.get(r.station)!;
      const key = `${station.id}|${r.timeMs}`;
      const earlier = seen.get(key);
      if (earlier !== undefined) {
        reject(line, `The docking at ${r.station} at ${r.t} repeats line ${earlier}; it is counted once.`);
        continue;
      }
      seen.set(key, line);
      good.push({ line, station, tMs: r.timeMs, dx: r.dx, dy: r.dy, dyaw: r.dyaw });
    }
    if (good.length === 0) {
      throw new HttpError(422, 'no_valid_dockings', lines.length === 0 ? 'The batch holds no docking lines.' : `None of the batch's ${lines.length} lines could be counted; nothing was stored.`, { rejectedCount, rejectedLines: rejected });
    }

    const id = newId();
    const insertResult = raw.prepare('INSERT INTO docking_results (id, station_id, robot_id, batch_id, model_version_id, t_ms, dx, dy, dyaw) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT (station_id, robot_id, t_ms) DO NOTHING');
    const insertBatch = raw.prepare('INSERT INTO docking_batches (id, site_id, robot_id, idempotency_key, content_hash, received_at, lines, counted, rejected_count, rejected_lines) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)');
    const countBatch = raw.prepare('UPDATE docking_batches SET counted = ?, rejected_count = ?, rejected_lines = ? WHERE id = ?');
    const nothingNew = Symbol('nothing new');
    let replay: { id: string; hash: string } | undefined;
    const run = raw.transaction(() => {
      // Checked again inside the transaction: two copies posted at once count once.
      replay = this.findReplay(raw, robot.siteId, idempotencyKey, hash);
      if (replay) return;
      insertBatch.run(id, robot.siteId, robot.id, idempotencyKey, hash, sqliteDatetime(now), lines.length, 0, 0, '[]');
      let counted = 0;
      for (const g of good) {
        const changes = insertResult.run(newId(), g.station.id, robot.id, id, g.station.modelVersionId, g.tMs, g.dx, g.dy, g.dyaw).changes;
        if (changes === 1) counted++;
        else reject(g.line, `The docking at ${g.station.name} at ${new Date(g.tMs).toISOString()} was already received in an earlier batch; it is counted once.`);
      }
      // Every good line was a docking already stored: nothing new, so nothing is kept of the batch.
      if (counted === 0) throw nothingNew;
      countBatch.run(counted, rejectedCount, JSON.stringify(rejected), id);
    });
    try {
      await exclusive(this.db, () => run());
    } catch (e) {
      if (e !== nothingNew) throw e;
      throw new HttpError(422, 'no_valid_dockings', `None of the batch's ${lines.length} lines could be counted; nothing was stored.`, { rejectedCount, rejectedLines: rejected });
    }
    if (replay) return this.replayAnswer(replay, hash);
    return { status: 'counted' as const, batch: batchView(await this.db.getRepository(DockingBatch).findOneByOrFail({ id })) };
  }

  // ---- stations --------------------------------------------------------------------------

  private async station(actor: Actor, siteId: string, stationId: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const station = await this.db.getRepository(DockingStation).findOne({ where: { id: stationId, siteId: site.id }, relations: { createdBy: true, modelVersion: true } });
    if (!station) throw notFound('The docking station');
    return { site, station };
  }

  /** The tolerance that applies to a station (metres, radians) and where each part comes from. */
  tolerance(site: Site, station: DockingStation): DockingTolerance & { positionSource: ToleranceSource; yawSource: ToleranceSource; positionMm: number; yawDeg: number } {
    const settings = siteSettings(site);
    const siteSource = (key: string): ToleranceSource => (key in (site.settings ?? {}) ? 'site' : 'default');
    const positionMm = station.toleranceMm ?? settings.dockingToleranceMm;
    const yawDeg = station.toleranceDeg ?? settings.dockingToleranceDeg;
    return {
      positionM: positionMm / 1000,
      yawRad: yawDeg * DEG,
      positionMm,
      yawDeg,
      positionSource: station.toleranceMm !== null ? 'station' : siteSource('dockingToleranceMm'),
      yawSource: station.toleranceDeg !== null ? 'station' : siteSource('dockingToleranceDeg'),
    };
  }

  private async windowResults(stationIds: string[], now: Date) {
    if (stationIds.length === 0) return new Map<string, DockingResult[]>();
    const from = now.getTime() - DOCKING_WINDOW_DAYS * DAY_MS;
    const rows = await this.db.getRepository(DockingResult).find({ where: { stationId: In(stationIds), tMs: MoreThanOrEqual(from) }, order: { tMs: 'ASC' } });
    const out = new Map<string, DockingResult[]>(stationIds.map((id) => [id, []]));
    for (const r of rows) if (r.tMs <= now.getTime() + 5 * 60_000) out.get(r.stationId)!.push(r);
    return out;
  }

  /** Accuracy and verdict of one station over the window, from its results against the current model. */
  private assess(site: Site, station: DockingStation, results: DockingResult[], now: Date) {
    const tol = this.tolerance(site, station);
    const current = results.filter((r) => r.modelVersionId === station.modelVersionId);
    const samples: DockingSample[] = current.map((r) => ({ tMs: r.tMs, dx: r.dx, dy: r.dy, dyaw: r.dyaw }));
    const dayOf = localDayFinder(site.timezone);
    const verdict: DriftVerdict = detectDrift(samples, tol, now.getTime(), dayOf);
    const today = DateTime.fromJSDate(now, { zone: site.timezone });
    // "22 Nov" this year, "3 Feb 2027" in another.
    const dayText = (ms: number) => {
      const d = DateTime.fromMillis(ms, { zone: site.timezone });
      return d.toFormat(d.year === today.year ? 'd LLL' : 'd LLL yyyy');
    };
    const recentFrom = now.getTime() - DRIFT_DEFAULTS.recentDays * DAY_MS;
    return { tol, samples, dayOf, verdict, sentence: driftSentence(verdict, { day: dayText }), latest: summarizeAccuracy(samples.filter((s) => s.tMs >= recentFrom), tol), earlierModel: results.length - current.length };
  }

  private view(site: Site, station: DockingStation, a: ReturnType<DockingService['assess']>, lastDockedAt: number | null) {
    const m = station.modelVersion;
    return {
      id: station.id,
      siteId: station.siteId,
      name: station.name,
      createdAt: station.createdAt.toISOString(),
      createdBy: station.createdBy ? { id: station.createdBy.id, name: station.createdBy.name } : null,
      tolerance: { positionMm: a.tol.positionMm, yawDeg: a.tol.yawDeg, positionSource: a.tol.positionSource, yawSource: a.tol.yawSource, stationMm: station.toleranceMm, stationDeg: station.toleranceDeg },
      model: m
        ? { id: m.id, version: m.version, label: m.label, resolution: m.resolution, width: m.width, height: m.height, widthM: +(m.width * m.resolution).toFixed(4), heightM: +(m.height * m.resolution).toFixed(4), origin: { x: m.originX, y: m.originY, yaw: m.originYaw }, attachedAt: station.modelAttachedAt?.toISOString() ?? null }
        : null,
      lastDockedAt: lastDockedAt === null ? null : new Date(lastDockedAt).toISOString(),
      latest: summaryView(a.latest),
      verdict: { state: a.verdict.state, kind: a.verdict.kind, channel: a.verdict.channel, results: a.verdict.results, days: a.verdict.days, sentence: a.sentence },
    };
  }

  private async lastDocked(stationIds: string[]) {
    if (stationIds.length === 0) return new Map<string, number>();
    const rows = (await this.db.query(`SELECT station_id AS id, MAX(t_ms) AS last FROM docking_results WHERE station_id IN (${stationIds.map(() => '?').join(',')}) GROUP BY station_id`, stationIds)) as Array<{ id: string; last: number }>;
    return new Map(rows.map((r) => [r.id, r.last]));
  }

  /** The stations of a visible site, by name, each with its recent accuracy and drift verdict; and how many drift. */
  async list(actor: Actor, siteId: string, now = new Date()) {
    const site = await this.sites.getVisible(actor, siteId);
    const stations = await this.db.getRepository(DockingStation).find({ where: { siteId: site.id }, relations: { createdBy: true, modelVersion: true }, order: { name: 'ASC' } });
    const ids = stations.map((s) => s.id);
    const [results, last] = await Promise.all([this.windowResults(ids, now), this.lastDocked(ids)]);
    const views = stations.map((s) => this.view(site, s, this.assess(site, s, results.get(s.id)!, now), last.get(s.id) ?? null));
    return {
      stations: views,
      summary: { total: views.length, drifting: views.filter((v) => v.verdict.state === 'drifting').length, outOfTolerance: views.filter((v) => v.verdict.state === 'out_of_tolerance').length },
      windowDays: DOCKING_WINDOW_DAYS,
    };
  }

  /** One station with its dockings of the window, daily figures, and the drift verdict with its figures. */
  async detail(actor: Actor, siteId: string, stationId: string, now = new Date()) {
    const { site, station } = await this.station(actor, siteId, stationId);
    const [results, last] = await Promise.all([this.windowResults([station.id], now), this.lastDocked([station.id])]);
    const rows = results.get(station.id)!;
    const a = this.assess(site, station, rows, now);
    const robotIds = [...new Set(rows.map((r) => r.robotId))];
    const robots = robotIds.length ? await this.db.getRepository(Robot).findBy({ id: In(robotIds) }) : [];
    const names = new Map(robots.map((r) => [r.id, r.name]));
    const shown = rows.slice(-SERIES_MAX);
    return {
      ...this.view(site, station, a, last.get(station.id) ?? null),
      window: { from: new Date(now.getTime() - DOCKING_WINDOW_DAYS * DAY_MS).toISOString(), to: now.toISOString(), days: DOCKING_WINDOW_DAYS, timezone: site.timezone },
      robots: robotIds.map((id) => ({ id, name: names.get(id) ?? 'removed robot' })).sort((x, y) => x.name.localeCompare(y.name)),
      results: shown.map((r) => ({ t: new Date(r.tMs).toISOString(), robotId: r.robotId, dx: r.dx, dy: r.dy, dyaw: r.dyaw, currentModel: r.modelVersionId === station.modelVersionId })),
      resultsTruncated: rows.length > shown.length,
      earlierModelResults: a.earlierModel,
      daily: dailyAccuracy(a.samples, a.tol, a.dayOf).map((d) => ({ day: d.day, ...summaryView(d)! })),
      drift: {
        state: a.verdict.state,
        kind: a.verdict.kind,
        channel: a.verdict.channel,
        sentence: a.sentence,
        results: a.verdict.results,
        days: a.verdict.days,
        thresholds: { alpha: DRIFT_DEFAULTS.alpha, minResults: DRIFT_DEFAULTS.minResults, relevantShare: DRIFT_DEFAULTS.relevantShare, horizonDays: DRIFT_DEFAULTS.horizonDays, recentDays: DRIFT_DEFAULTS.recentDays },
        position: a.verdict.position && channelView(a.verdict.position),
        heading: a.verdict.heading && channelView(a.verdict.heading),
      },
    };
  }

  private async nameFree(siteId: string, name: string, except?: string) {
    const other = await this.db.getRepository(DockingStation).findOneBy({ siteId, name });
    if (other && other.id !== except) throw conflict(`This site already has a docking station named "${name}".`);
  }

  /** Creates a station of a visible site; its name is what robots write in their docking results. */
  async create(actor: Actor, siteId: string, input: { name: string }, now = new Date()) {
    const site = await this.sites.getVisible(actor, siteId);
    const name = input.name.trim();
    if (name.length === 0 || name.length > STATION_NAME_MAX) throw badRequest(`A station name has 1 to ${STATION_NAME_MAX} characters.`);
    await this.nameFree(site.id, name);
    const id = newId();
    await this.db.transaction(async (m) => {
      await m.insert(DockingStation, { id, siteId: site.id, name, toleranceMm: null, toleranceDeg: null, modelVersionId: null, modelAttachedAt: null, createdById: actor.id, createdAt: now });
      await this.audit.record(actor, { action: 'station.create', targetType: 'docking_station', targetId: id, organizationId: site.organizationId, summary: `${actor.name} added the docking station ${name} to ${site.name}.` }, m);
    });
    return this.detail(actor, site.id, id, now);
  }

  /** Renames a station; robots must use the new name from then on. */
  async rename(actor: Actor, siteId: string, stationId: string, newName: string) {
    const { site, station } = await this.station(actor, siteId, stationId);
    const name = newName.trim();
    if (name === station.name) return this.detail(actor, site.id, station.id);
    await this.nameFree(site.id, name, station.id);
    await this.db.transaction(async (m) => {
      await m.update(DockingStation, station.id, { name });
      await this.audit.record(actor, { action: 'station.rename', targetType: 'docking_station', targetId: station.id, organizationId: site.organizationId, summary: `${actor.name} renamed the docking station ${station.name} of ${site.name} to ${name}.` }, m);
    });
    return this.detail(actor, site.id, station.id);
  }

  /** Makes a station map version of the same site the station's current model; the drift check starts afresh on its dockings. */
  async attachModel(actor: Actor, siteId: string, stationId: string, mapVersionId: string, now = new Date()) {
    const { site, station } = await this.station(actor, siteId, stationId);
    const version = await this.db.getRepository(MapVersion).findOneBy({ id: mapVersionId, siteId: site.id });
    if (!version) throw notFound('The map version');
    if (version.kind !== 'station') throw badRequest(`Map version ${version.version} is a floor map; a station needs a station model (a map version of kind "station").`);
    if (station.modelVersionId === version.id) throw conflict(`Station model version ${version.version} is already the model of ${station.name}.`);
    await this.db.transaction(async (m) => {
      await m.update(DockingStation, station.id, { modelVersionId: version.id, modelAttachedAt: now });
      await this.audit.record(actor, { action: 'station.model', targetType: 'docking_station', targetId: station.id, organizationId: site.organizationId, summary: `${actor.name} made station model version ${version.version} the model of ${station.name} at ${site.name}.` }, m);
    });
    return this.detail(actor, site.id, station.id, now);
  }

  /** Sets or clears (null) a station's own tolerances, millimetres and degrees. */
  async setTolerance(actor: Actor, siteId: string, stationId: string, input: { toleranceMm: number | null; toleranceDeg: number | null }) {
    const { site, station } = await this.station(actor, siteId, stationId);
    const text = (v: number | null, unit: string) => (v === null ? 'the site setting' : `${v} ${unit}`);
    await this.db.transaction(async (m) => {
      await m.update(DockingStation, station.id, { toleranceMm: input.toleranceMm, toleranceDeg: input.toleranceDeg });
      await this.audit.record(actor, {
        action: 'station.tolerance',
        targetType: 'docking_station',
        targetId: station.id,
        organizationId: site.organizationId,
        summary: `${actor.name} set the tolerance of ${station.name} at ${site.name}: position ${text(input.toleranceMm, 'mm')}, heading ${text(input.toleranceDeg, '°')}.`,
      }, m);
    });
    return this.detail(actor, site.id, station.id);
  }
}

