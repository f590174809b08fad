import { inflateRawSync } from 'node:zlib';
import { In, MoreThan, type DataSource } from 'typeorm';
import { frameU, frameV, makeGridFrame } from '../../shared/grid/transform.js';
import { estimateMountError, type MountSamples } from '../../shared/scan/mount-estimate.js';
import { isReturn, parseScanLine } from '../../shared/scan/scan-record.js';
import { median, robustZScore } from '../../shared/stats/robust.js';
import type { Actor } from '../auth/actor.js';
import { AgreementBlocks, DailyStat, MapVersion, Robot, RobotFlag, ScanSample, Site } from '../entities/index.js';
import type { FlagFigures, MountFigures } from '../entities/robot-flag.entity.js';
import { conflict, notFound } from '../http-error.js';
import { decodeCounts } from './evidence-store.js';
import type { AuditService } from './audit.service.js';
import { newId } from './ids.js';
import type { MapVersionsService } from './map-versions.service.js';
import { completeDays, localDay } from './site-days.js';
import { siteSettings } from './site-settings.js';
import type { RobotsService } from './robots.service.js';
import type { SitesService } from './sites.service.js';

/** Days the consistency check looks back over (product choice). */
const CHECK_DAYS = 7;
/** Fewest days with enough returns before a scanner can be flagged (product choice). */
const MIN_DAYS = 3;
/** Fewest scanners of a fleet on a day for a fleet median to mean anything (product choice). */
const MIN_FLEET = 3;
/** Floor of the fleet's spread, agreement units: fleets that agree very closely do not make tiny dips look extreme (product choice). */
const MIN_SPREAD = 0.005;
/** A flagged robot explains at least this much less (share of returns) than the others in the same places (product choice). */
const MIN_DIFFERENCE = 0.03;
/** A block counts as "the fleet agrees with the map here" at this agreement with at least this many returns (product choice). */
const GOOD_BLOCK_AGREEMENT = 0.9;
const GOOD_BLOCK_MIN_RETURNS = 20;

/** The scanner of a robot with the lowest share of explained returns over the rows given. */
function worstScanner(rows: DailyStat[]): string | null {
  const by = new Map<string, { r: number; e: number }>();
  for (const row of rows) {
    const v = by.get(row.scanner) ?? { r: 0, e: 0 };
    v.r += row.returns;
    v.e += row.explained;
    by.set(row.scanner, v);
  }
  let worst: string | null = null;
  let lowest = Infinity;
  for (const [scanner, v] of by) if (v.r > 0 && v.e / v.r < lowest) [worst, lowest] = [scanner, v.e / v.r];
  return worst;
}

/**
 * Scanner consistency (DESIGN.md §4.5): a robot's scanner whose agreement sits well below its
 * fleet's on the same days (robust z-score against the fleet median) is flagged "scanner check
 * advised", its evidence is left out of change detection until cleared, and its mount error is
 * estimated from sampled scans by robust Gauss–Newton on the map's distance field, using only
 * returns that fall where the rest of the fleet agrees with the map.
 */
export class ScannerCheckService {
  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly robots: RobotsService,
    private readonly mapVersions: MapVersionsService,
    private readonly audit: AuditService,
  ) {}

  /**
   * Runs the check for a site; returns the scanners flagged by this run. Robots drive different
   * routes past different parts of a building, so a robot is compared with the rest of the fleet
   * in the same places: per day, over the agreement blocks both saw, the robot's share of
   * explained returns minus the others' share there. That difference is scored against the
   * fleet's differences of the day (robust z); a robot is flagged when its median z over the
   * recent days is at or below −scannerFlagZ and it explains clearly fewer returns than the others.
   */
  async run(site: Site, now = new Date()) {
    const version = await this.mapVersions.activeFloor(site.id);
    if (!version) return { flagged: [] as string[], checked: 0 };
    const settings = siteSettings(site);
    const days = completeDays(site.timezone, now, CHECK_DAYS);
    const robots = new Map((await this.db.getRepository(Robot).findBy({ siteId: site.id })).map((r) => [r.id, r]));
    const flags = await this.db.getRepository(RobotFlag).find({ where: { robotId: In([...robots.keys()]) }, order: { raisedAt: 'DESC' } });
    const stats = await this.db.getRepository(DailyStat).find({ where: { siteId: site.id, mapVersionId: version.id, day: In(days) } });
    const blocks = await this.db.getRepository(AgreementBlocks).find({ where: { mapVersionId: version.id, day: In(days) } });

    // Per day: each robot's difference from the rest of the fleet over the blocks both saw.
    const perDay = new Map<string, Map<string, { agreement: number; others: number; diff: number }>>();
    for (const day of days) {
      const today = blocks.filter((b) => b.day === day);
      if (today.length < MIN_FLEET) continue;
      const counts = new Map(today.map((b) => [b.robotId, decodeCounts(b.data)]));
      const n = Math.min(...[...counts.values()].map((c) => c.length)) / 2;
      const total = new Float64Array(2 * n);
      for (const c of counts.values()) for (let k = 0; k < 2 * n; k++) total[k] += c[k];
      const result = new Map<string, { agreement: number; others: number; diff: number }>();
      for (const [robotId, c] of counts) {
        let ownReturns = 0;
        let ownExplained = 0;
        let otherReturns = 0;
        let otherExplained = 0;
        for (let k = 0; k < n; k++) {
          const oR = total[k] - c[k];
          if (c[k] < GOOD_BLOCK_MIN_RETURNS || oR < GOOD_BLOCK_MIN_RETURNS) continue;
          ownReturns += c[k];
          ownExplained += c[n + k];
          otherReturns += oR;
          otherExplained += total[n + k] - c[n + k];
        }
        if (ownReturns < settings.scannerMinReturnsPerDay || otherReturns === 0) continue;
        const agreement = ownExplained / ownReturns;
        const others = otherExplained / otherReturns;
        result.set(robotId, { agreement, others, diff: agreement - others });
      }
      if (result.size >= MIN_FLEET) perDay.set(day, result);
    }

    const flagged: string[] = [];
    let checked = 0;
    for (const [robotId, robot] of robots) {
      const own = flags.filter((f) => f.robotId === robotId);
      if (own.some((f) => f.status === 'active')) continue;
      // Days up to the last clearing belong to the fault that was fixed.
      const clearedAt = own.find((f) => f.clearedAt)?.clearedAt;
      const clearedDay = clearedAt ? localDay(site.timezone, clearedAt) : null;
      const figures: FlagFigures['days'] = [];
      for (const [day, fleet] of perDay) {
        const me = fleet.get(robotId);
        if (!me || (clearedDay && day <= clearedDay)) continue;
        const diffs = [...fleet.values()].map((v) => v.diff);
        figures.push({ day, agreement: me.agreement, fleetMedian: me.others, z: robustZScore(me.diff, diffs, MIN_SPREAD) });
      }
      if (figures.length === 0) continue;
      checked++;
      if (figures.length < MIN_DAYS) continue;
      const medianZ = median(figures.map((f) => f.z));
      const medianDiff = median(figures.map((f) => f.agreement - f.fleetMedian));
      if (medianZ > -settings.scannerFlagZ || medianDiff > -MIN_DIFFERENCE) continue;
      // The blocks are per robot; the scanner to check is the robot's scanner that explains least.
      const scanner = worstScanner(stats.filter((r) => r.robotId === robotId)) ?? robot.mounts[0]?.name ?? 'front';
      const mount = await this.estimateMount(version, robot, scanner, figures.map((f) => f.day)).catch(() => null);
      const flag = this.db.getRepository(RobotFlag).create({
        id: newId(),
        robotId,
        scanner,
        status: 'active',
        raisedAt: now,
        figures: { days: figures, meanAgreement: figures.reduce((a, f) => a + f.agreement, 0) / figures.length, fleetMedian: median(figures.map((f) => f.fleetMedian)), medianZ },
        mount,
      });
      await this.db.transaction(async (m) => {
        await m.save(flag);
        await this.audit.record(null, { action: 'robot.flag', targetType: 'robot', targetId: robotId, organizationId: site.organizationId, summary: `Scanner check advised for ${robot.name} (${scanner}) at ${site.name}: agreement ${(100 * flag.figures.meanAgreement).toFixed(1)} % where the rest of the fleet has ${(100 * flag.figures.fleetMedian).toFixed(1)} %.` }, m);
      });
      flagged.push(`${robot.name}/${scanner}`);
    }
    return { flagged, checked };
  }

  /** Mount error of one scanner from its sampled scans on `days`, fitted where the rest of the fleet agrees with the map. */
  async estimateMount(version: MapVersion, robot: Robot, scanner: string, days: string[]): Promise<MountFigures | null> {
    const mount = robot.mounts.find((m) => m.name === scanner) ?? { name: scanner, x: 0, y: 0, yaw: 0 };
    const grid = await this.mapVersions.grid(version);
    const field = await this.mapVersions.distanceField(version);
    const frame = makeGridFrame(grid);

    // Blocks where the other robots' returns agree with the map.
    const others = await this.db.getRepository(AgreementBlocks).find({ where: { mapVersionId: version.id, day: In(days) } });
    let good: Uint8Array | null = null;
    let blockCells = 0;
    let sums: Uint32Array | null = null;
    for (const b of others) {
      if (b.robotId === robot.id) continue;
      const counts = decodeCounts(b.data);
      if (!sums || b.blockCells !== blockCells) {
        sums = new Uint32Array(counts.length);
        blockCells = b.blockCells;
      }
      if (counts.length === sums.length) for (let k = 0; k < counts.length; k++) sums[k] += counts[k];
    }
    if (sums) {
      const n = sums.length / 2;
      good = new Uint8Array(n);
      for (let k = 0; k < n; k++) good[k] = sums[k] >= GOOD_BLOCK_MIN_RETURNS && sums[n + k] >= GOOD_BLOCK_AGREEMENT * sums[k] ? 1 : 0;
    }
    const blockCols = blockCells ? Math.ceil(grid.width / blockCells) : 0;

    const samples = await this.db.getRepository(ScanSample).find({ where: { mapVersionId: version.id, robotId: robot.id, scanner, day: In(days) } });
    const poses: number[] = [];
    const scanOf: number[] = [];
    const points: number[] = [];
    for (const s of samples) {
      for (const line of inflateRawSync(s.data).toString('utf8').split('\n')) {
        const parsed = parseScanLine(line, { now: new Date(8.64e15) });
        if (!parsed.ok) continue;
        const scan = parsed.scan;
        const [bx, by, bth] = scan.pose;
        const sx = bx + Math.cos(bth) * mount.x - Math.sin(bth) * mount.y;
        const sy = by + Math.sin(bth) * mount.x + Math.cos(bth) * mount.y;
        const syaw = bth + mount.yaw;
        const scanIndex = poses.length / 3;
        let used = 0;
        for (let k = 0; k < scan.ranges.length; k++) {
          const r = scan.ranges[k];
          if (!isReturn(scan, r)) continue;
          const a = scan.angleMin + k * scan.angleIncrement;
          const px = r * Math.cos(a);
          const py = r * Math.sin(a);
          if (good) {
            const wx = sx + Math.cos(syaw) * px - Math.sin(syaw) * py;
            const wy = sy + Math.sin(syaw) * px + Math.cos(syaw) * py;
            const i = Math.floor(frameU(frame, wx, wy));
            const j = Math.floor(frameV(frame, wx, wy));
            if (i < 0 || j < 0 || i >= grid.width || j >= grid.height) continue;
            if (!good[Math.floor(j / blockCells) * blockCols + Math.floor(i / blockCells)]) continue;
          }
          points.push(px, py);
          scanOf.push(scanIndex);
          used++;
        }
        if (used > 0) poses.push(sx, sy, syaw);
      }
    }
    if (scanOf.length < 50) return null;
    const input: MountSamples = { poses: Float64Array.from(poses), scanOf: Uint32Array.from(scanOf), points: Float64Array.from(points) };
    const e = estimateMountError(field, grid, input);
    return { dx: e.dx, dy: e.dy, dyaw: e.dyaw, sigma: e.sigma, inliers: e.inliers, converged: e.converged };
  }

  /** The site's robots with their scanner flags and each scanner's agreement over the last complete days. */
  async robotsWithHealth(actor: Actor, siteId: string, now = new Date()) {
    const site = await this.sites.getVisible(actor, siteId);
    const robots = await this.robots.list(actor, siteId);
    const flags = await this.flagsOf(site.id);
    const version = await this.mapVersions.activeFloor(site.id);
    const days = completeDays(site.timezone, now, CHECK_DAYS);
    const stats = version ? await this.db.getRepository(DailyStat).find({ where: { siteId: site.id, mapVersionId: version.id, day: In(days) } }) : [];
    return robots.map((r) => {
      const own = stats.filter((s) => s.robotId === r.id);
      const scanners = [...new Set(own.map((s) => s.scanner))].sort().map((scanner) => {
        const rows = own.filter((s) => s.scanner === scanner);
        const returns = rows.reduce((a, s) => a + s.returns, 0);
        const explained = rows.reduce((a, s) => a + s.explained, 0);
        return {
          scanner,
          agreement7d: returns ? explained / returns : null,
          returns7d: returns,
          days: days.map((day) => {
            const row = rows.find((s) => s.day === day);
            return { day, agreement: row && row.returns ? row.explained / row.returns : null, returns: row?.returns ?? 0 };
          }),
        };
      });
      return { ...r, scanners, flags: flags.filter((f) => f.robotId === r.id).map(flagView) };
    });
  }

  /** Active and recent flags of a site's robots, newest first. */
  async flagsOf(siteId: string, since = new Date(Date.now() - 90 * 86_400_000)) {
    const robots = await this.db.getRepository(Robot).findBy({ siteId });
    if (robots.length === 0) return [];
    return this.db.getRepository(RobotFlag).find({ where: [{ robotId: In(robots.map((r) => r.id)), status: 'active' }, { robotId: In(robots.map((r) => r.id)), raisedAt: MoreThan(since) }], relations: { clearedBy: true }, order: { raisedAt: 'DESC' } });
  }

  /** Clears an active flag after maintenance, with a note; the robot's evidence counts again from now on. */
  async clear(actor: Actor, siteId: string, robotId: string, flagId: string, note: string) {
    const site = await this.sites.getVisible(actor, siteId);
    const robot = await this.db.getRepository(Robot).findOneBy({ id: robotId, siteId: site.id });
    if (!robot) throw notFound('The robot');
    const flag = await this.db.getRepository(RobotFlag).findOneBy({ id: flagId, robotId: robot.id });
    if (!flag) throw notFound('The flag');
    if (flag.status !== 'active') throw conflict('This flag was already cleared.');
    await this.db.transaction(async (m) => {
      await m.update(RobotFlag, flag.id, { status: 'cleared', clearedAt: new Date(), clearedById: actor.id, note });
      await this.audit.record(actor, { action: 'robot.flag_clear', targetType: 'robot', targetId: robot.id, organizationId: site.organizationId, summary: `${actor.name} cleared the scanner check of ${robot.name} (${flag.scanner}): ${note}` }, m);
    });
    return this.db.getRepository(RobotFlag).findOneOrFail({ where: { id: flag.id }, relations: { clearedBy: true } });
  }
}

/** A flag as the client sees it, with the mount estimate in degrees where people read it. */
export function flagView(f: RobotFlag) {
  const deg = (rad: number) => (rad * 180) / Math.PI;
  return {
    id: f.id,
    robotId: f.robotId,
    scanner: f.scanner,
    status: f.status,
    raisedAt: f.raisedAt.toISOString(),
    figures: f.figures,
    mount: f.mount && { dx: f.mount.dx, dy: f.mount.dy, dyawDeg: deg(f.mount.dyaw), sigma: { dx: f.mount.sigma.dx, dy: f.mount.sigma.dy, dyawDeg: deg(f.mount.sigma.dyaw) }, inliers: f.mount.inliers, converged: f.mount.converged },
    summary: mountSentence(f),
    clearedAt: f.clearedAt?.toISOString() ?? null,
    clearedBy: f.clearedBy ? { id: f.clearedBy.id, name: f.clearedBy.name } : null,
    note: f.note,
  };
}

/** "scanner check advised — mount appears turned 1.4° ± 0.1°" and the like. */
export function mountSentence(f: RobotFlag): string {
  const head = `Scanner check advised: ${(100 * f.figures.meanAgreement).toFixed(1)} % of returns explained where the rest of the fleet has ${(100 * f.figures.fleetMedian).toFixed(1)} %`;
  const m = f.mount;
  if (!m || !m.converged) return `${head}; the mount error could not be estimated.`;
  const yaw = (m.dyaw * 180) / Math.PI;
  const yawSigma = (m.sigma.dyaw * 180) / Math.PI;
  const shift = Math.hypot(m.dx, m.dy);
  const parts: string[] = [];
  // Report what stands out of its own uncertainty; a turn of a tenth of a degree is already 2 cm at 10 m.
  if (Math.abs(yaw) >= Math.max(0.2, 3 * yawSigma)) parts.push(`mount appears turned ${Math.abs(yaw).toFixed(1)}° ${yaw > 0 ? 'anticlockwise' : 'clockwise'} (± ${Math.max(yawSigma, 0.05).toFixed(1)}°)`);
  if (shift >= Math.max(0.02, 3 * Math.hypot(m.sigma.dx, m.sigma.dy))) parts.push(`shifted ${(100 * shift).toFixed(1)} cm (dx ${(100 * m.dx).toFixed(1)} cm, dy ${(100 * m.dy).toFixed(1)} cm)`);
  return parts.length ? `${head}; ${parts.join(', ')}.` : `${head}; the mount itself looks right, so check the window and the calibration.`;
}
