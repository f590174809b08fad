import { inflateRawSync } from 'node:zlib';
import { LessThanOrEqual, MoreThanOrEqual, type DataSource } from 'typeorm';
import { decodeTrail, simplifyTrack, splitTracks, type TrailPoints } from '../../shared/scan/trail.js';
import type { Actor } from '../auth/actor.js';
import { PoseTrail, Robot } from '../entities/index.js';
import { AnswerCache } from './answer-cache.js';
import type { MapVersionsService } from './map-versions.service.js';
import type { SitesService } from './sites.service.js';

/** Most poses drawn per robot; beyond it the oldest tracks are left out (a product choice that keeps the layer light). */
export const MAX_POSES_PER_ROBOT = 4000;
/** Tracks are simplified to within this distance of the driven line, metres (a product choice: a quarter of an aisle's half-width). */
export const PATH_TOLERANCE_M = 0.25;

/** Simplifies each track, then keeps the newest poses up to `max` (tracks are in time order). */
function lighten(tracks: Array<Array<[number, number]>>, max: number) {
  const simple = tracks.map((t) => simplifyTrack(t, PATH_TOLERANCE_M));
  const out: Array<Array<[number, number]>> = [];
  let left = max;
  for (let k = simple.length - 1; k >= 0 && left >= 2; k--) {
    const t = simple[k].length > left ? simple[k].slice(simple[k].length - left) : simple[k];
    out.unshift(t);
    left -= t.length;
  }
  return out;
}

/** Robots' recent paths on a site's active map, from the thinned poses ingest keeps. */
export class PathsService {
  constructor(
    private readonly db: DataSource,
    private readonly sites: SitesService,
    private readonly mapVersions: MapVersionsService,
  ) {}

  /**
   * The paths of the `hours` up to the newest pose recorded on the active map (not up to now: a site
   * whose robots last sent scans yesterday still shows that shift), per robot as tracks in map metres.
   * Null when the site has no active floor map.
   */
  async recent(actor: Actor, siteId: string, hours: number, now = new Date()) {
    const site = await this.sites.getVisible(actor, siteId);
    const version = await this.mapVersions.activeFloor(site.id);
    if (!version) return null;
    const repo = this.db.getRepository(PoseTrail);
    const newest = await repo.findOne({ where: { mapVersionId: version.id, lastMs: LessThanOrEqual(now.getTime()) }, order: { lastMs: 'DESC' }, select: { id: true, lastMs: true } });
    const to = newest?.lastMs ?? now.getTime();
    const from = to - hours * 3_600_000;
    // Trails are only added (ingest) and removed (retention): their count and newest row id change with every write.
    const [{ n, r }] = (await this.db.query('SELECT COUNT(*) AS n, MAX(rowid) AS r FROM pose_trails WHERE map_version_id = ?', [version.id])) as Array<{ n: number; r: number | null }>;
    const tracks = await this.tracks.get(`${version.id}|${hours}`, `${to}|${n}|${r}`, () => this.tracksOf(version.id, from, to, newest !== null));
    const robots = await this.db.getRepository(Robot).find({ where: { siteId: site.id }, order: { name: 'ASC' } });
    return {
      mapVersionId: version.id,
      from: new Date(from).toISOString(),
      to: new Date(to).toISOString(),
      robots: robots.map((robot) => ({ robotId: robot.id, name: robot.name, tracks: tracks.get(robot.id) ?? [] })).filter((robot) => robot.tracks.length > 0),
    };
  }

  // Decoding and simplifying a day of poses takes a good part of a second: remembered per version
  // and window until a trail is added or removed.
  private readonly tracks = new AnswerCache<Map<string, Array<Array<[number, number]>>>>(32);

  /** Each robot's simplified tracks between `from` and `to` (ms) on a map version, by robot id. */
  private async tracksOf(mapVersionId: string, from: number, to: number, any: boolean) {
    const rows = any ? await this.db.getRepository(PoseTrail).find({ where: { mapVersionId, lastMs: MoreThanOrEqual(from), firstMs: LessThanOrEqual(to) } }) : [];
    const byRobot = new Map<string, TrailPoints>();
    for (const row of rows) {
      const p = decodeTrail(inflateRawSync(row.data));
      let into = byRobot.get(row.robotId);
      if (!into) byRobot.set(row.robotId, (into = { t: [], x: [], y: [] }));
      for (let k = 0; k < p.t.length; k++) {
        if (p.t[k] < from || p.t[k] > to) continue;
        into.t.push(p.t[k]);
        into.x.push(p.x[k]);
        into.y.push(p.y[k]);
      }
    }
    const out = new Map<string, Array<Array<[number, number]>>>();
    for (const [robotId, points] of byRobot) out.set(robotId, lighten(splitTracks(points), MAX_POSES_PER_ROBOT));
    return out;
  }
}
