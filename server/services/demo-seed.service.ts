import { DateTime } from 'luxon';
import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import { formatMapMetadata } from '../../shared/grid/map-metadata.js';
import { gridToImage } from '../../shared/grid/image-to-grid.js';
import { encodePgm } from '../../shared/grid/pgm.js';
import { createScenario, type ScenarioOptions } from '../../shared/sim/scenario.js';
import type { Actor } from '../auth/actor.js';
import { hashPassword } from '../auth/password.js';
import { AuditEvent, Organization, Robot, ScanBatch, Site, User } from '../entities/index.js';
import type { Role } from '../entities/user.entity.js';
import { seedDemoDocking } from './demo-docking.js';
import { newId } from './ids.js';
import type { Services } from './index.js';

// The demo scenario is invented: Kestrelway Fleet Services runs the fleets; Ambergate Provisions
// and Corvane Parts & Supply are its customers. Towns, people, robots and buildings are made up;
// the buildings and their weeks of scans come from the warehouse simulator.

/** Demo accounts with their passwords, as the README lists them. */
export const DEMO_ACCOUNTS: ReadonlyArray<{ email: string; name: string; role: Role; org: string; password: string }> = [
  { email: 'iris.admin@kestrelway.example', name: 'Iris Achterberg', role: 'admin', org: 'Kestrelway Fleet Services', password: 'demo-admin-2026' },
  { email: 'tomas.mapper@kestrelway.example', name: 'Tomas Ferreira-Lund', role: 'mapper', org: 'Kestrelway Fleet Services', password: 'demo-mapper-2026' },
  { email: 'nadia.manager@ambergate.example', name: 'Nadia Okonkwo-Hale', role: 'site_manager', org: 'Ambergate Provisions', password: 'demo-manager-2026' },
  { email: 'owen.viewer@ambergate.example', name: 'Owen Marchetti', role: 'viewer', org: 'Ambergate Provisions', password: 'demo-viewer-2026' },
  { email: 'priya.manager@corvane.example', name: 'Priya Vanterpool', role: 'site_manager', org: 'Corvane Parts & Supply', password: 'demo-manager-2026' },
];

const ORGS = [
  { name: 'Kestrelway Fleet Services', kind: 'operator' as const, timezone: 'Europe/London' },
  { name: 'Ambergate Provisions', kind: 'customer' as const, timezone: 'Europe/London' },
  { name: 'Corvane Parts & Supply', kind: 'customer' as const, timezone: 'America/Chicago' },
];

/** Interval of the demo robots' pose reports, ms (robots report their pose every second or two: from memory). */
const POSE_REPORT_STEP_MS = 2000;
/** Days of simulated evidence each demo site gets, ending yesterday (site-local). */
export const DEMO_DAYS = 28;

/** A demo site: its customer, place, zone and the simulator settings of its building and fleet. */
export interface DemoSite {
  org: string;
  name: string;
  city: string;
  timezone: string;
  sim: Omit<ScenarioOptions, 'days' | 'startDate' | 'siteTimezone'>;
}

// Simulation settings for the demo: every fourth beam (2° apart) and 60 scans per robot and day
// keep the first start short while leaving weeks of evidence; tracing dominates the cost.
const LIGHT = { beamStep: 4, scansPerRobotPerDay: 60 };

/** The demo sites; the load test simulates more robots in the same buildings. */
export const SITES: readonly DemoSite[] = [
  // Pallets in the staging lane on about two days in five: an intermittent change to leave out of the map.
  { org: 'Ambergate Provisions', name: 'Fennick Cross DC', city: 'Fennick Cross', timezone: 'Europe/London', sim: { seed: 7101, robots: 4, ...LIGHT, changes: { palletDays: [3, 5, 8, 9, 13, 16, 17, 21, 24, 26] }, mountErrors: [{ robot: 'AMR-02', scanner: 'front', dyaw: (1.4 * Math.PI) / 180 }] } },
  { org: 'Ambergate Provisions', name: 'Tarrow Heath Cold Store', city: 'Tarrow Heath', timezone: 'Europe/London', sim: { seed: 7202, robots: 3, site: { width: 48, depth: 32 }, ...LIGHT, changes: { missingFromDay: null, fenceFromDay: 20, unmappedFromDay: null } } },
  { org: 'Corvane Parts & Supply', name: 'Lowen Harbour Hub', city: 'Lowen Harbour', timezone: 'America/Chicago', sim: { seed: 7303, robots: 3, ...LIGHT } },
  { org: 'Corvane Parts & Supply', name: 'Brindle Ford Crossdock', city: 'Brindle Ford', timezone: 'America/Denver', sim: { seed: 7404, robots: 2, site: { width: 40, depth: 30 }, ...LIGHT, changes: { missingFromDay: null, fenceFromDay: null, palletDays: null, unmappedFromDay: null } } },
  { org: 'Corvane Parts & Supply', name: 'Quarrington Vale Returns', city: 'Quarrington Vale', timezone: 'America/New_York', sim: { seed: 7505, robots: 2, site: { width: 44, depth: 30 }, ...LIGHT, changes: { missingFromDay: 10, fenceFromDay: null, unmappedFromDay: null } } },
];

/** True when the database holds no organization yet, i.e. it is a fresh data directory. */
export async function isEmptyDatabase(db: DataSource): Promise<boolean> {
  return (await db.getRepository(Organization).count()) === 0;
}

/** Seeds organizations, users and sites with robots; does nothing when any data exists. Returns whether it seeded. */
export async function seedDemoAccounts(db: DataSource, log: Logger): Promise<boolean> {
  if (!(await isEmptyDatabase(db))) return false;
  const hashes = new Map<string, string>();
  for (const a of DEMO_ACCOUNTS) if (!hashes.has(a.password)) hashes.set(a.password, await hashPassword(a.password));
  await db.transaction(async (m) => {
    const orgIds = new Map<string, string>();
    for (const o of ORGS) {
      const id = newId();
      orgIds.set(o.name, id);
      await m.insert(Organization, { id, ...o });
    }
    for (const a of DEMO_ACCOUNTS) {
      await m.insert(User, { id: newId(), email: a.email, name: a.name, role: a.role, organizationId: orgIds.get(a.org)!, passwordHash: hashes.get(a.password)!, status: 'active' });
    }
    for (const s of SITES) {
      const siteId = newId();
      await m.insert(Site, { id: siteId, name: s.name, city: s.city, timezone: s.timezone, organizationId: orgIds.get(s.org)!, settings: {} });
      // The registered robots are the simulator's fleet with its configured (nominal) mounts.
      const scenario = createScenario({ ...s.sim, days: 1, startDate: '2026-01-05', siteTimezone: s.timezone });
      for (const r of scenario.truth.robots) {
        await m.insert(Robot, { id: newId(), siteId, name: r.name, model: r.mounts.length > 1 ? 'Tugline T2 tugger' : 'Palletmole PM-1 lifter', mounts: r.mounts.map(({ name, x, y, yaw }) => ({ name, x, y, yaw })) });
      }
    }
  });
  log.info({ organizations: ORGS.length, sites: SITES.length, users: DEMO_ACCOUNTS.length }, 'seeded the demo accounts and sites');
  return true;
}

/** Where the background seeding of demo evidence stands; /api/health reports it. */
export class DemoSeedProgress {
  state: 'none' | 'seeding' | 'ready' | 'failed' = 'none';
  sitesDone = 0;
  sitesTotal = SITES.length;
  currentSite: string | null = null;

  /** A plain object for the health endpoint. */
  toJSON() {
    return { state: this.state, sitesDone: this.sitesDone, sitesTotal: this.sitesTotal, currentSite: this.currentSite };
  }
}

const SEEDED_ACTION = 'demo.seeded';

/** True when the demo accounts were seeded here but their evidence is not complete (e.g. a restart cut it short). */
export async function demoEvidencePending(db: DataSource): Promise<boolean> {
  const ours = await db.getRepository(User).existsBy({ email: DEMO_ACCOUNTS[0].email });
  if (!ours) return false;
  const done = await db.getRepository(AuditEvent).existsBy({ action: SEEDED_ACTION });
  return !done;
}

/**
 * Gives each demo site its simulated stored map (active, uploaded by the demo mapper) and
 * `days` days of scans ending yesterday (site-local), counted through the ingest service like
 * uploads. Resumable: a site that has its map and a day that has its batch are skipped.
 */
export async function seedDemoEvidence(db: DataSource, services: Services, log: Logger, today = new Date(), days = DEMO_DAYS, progress = new DemoSeedProgress()): Promise<void> {
  const mapper = await db.getRepository(User).findOneByOrFail({ email: 'tomas.mapper@kestrelway.example' });
  const actor: Actor = { id: mapper.id, email: mapper.email, name: mapper.name, role: mapper.role, organizationId: mapper.organizationId };
  progress.state = 'seeding';
  progress.sitesDone = 0;
  // Docking stations and their weeks of dockings first: a few seconds, independent of the scans.
  await seedDemoDocking(db, services, actor, today, days);
  for (const s of SITES) {
    const started = Date.now();
    progress.currentSite = s.name;
    const site = await db.getRepository(Site).findOneByOrFail({ name: s.name });
    const startDate = DateTime.fromJSDate(today, { zone: s.timezone }).startOf('day').minus({ days }).toISODate()!;
    const scenario = createScenario({ ...s.sim, days, startDate, siteTimezone: s.timezone });
    if (!(await services.mapVersions.activeFloor(site.id))) {
      const image = { originalname: 'map.pgm', buffer: Buffer.from(encodePgm(gridToImage(scenario.map))) };
      const metadataFile = { originalname: 'map.yaml', buffer: Buffer.from(formatMapMetadata(scenario.metadata)) };
      const version = await services.mapVersions.upload(actor, site.id, { kind: 'floor', label: 'Commissioning map', image, metadataFile });
      await services.mapVersions.activate(actor, site.id, version.id);
    }
    let scans = 0;
    for (let day = 0; day < days; day++) {
      const fileName = `simulated-${scenario.truth.dayDates[day]}.jsonl`;
      if (await db.getRepository(ScanBatch).existsBy({ siteId: site.id, fileName })) continue;
      const lines = (function* () {
        for (const scan of scenario.scansForDay(day)) yield JSON.stringify(scan);
      })();
      // Received at the end of the simulated day's shift, as a robot's upload would have been.
      const [, shiftEnd] = scenario.workingWindow(day);
      const { figures } = await services.ingest.countLines(site, lines, fileName, today, new Date(Math.min(shiftEnd, today.getTime())));
      scans += figures.scans;
    }
    // The robots' pose reports of the last simulated day, every 2 s, for the map's paths layer.
    const lastDay = days - 1;
    const posesFile = `simulated-poses-${scenario.truth.dayDates[lastDay]}.jsonl`;
    if (days > 0 && !(await db.getRepository(ScanBatch).existsBy({ siteId: site.id, fileName: posesFile }))) {
      const poses = (function* () {
        for (const report of scenario.posesForDay(lastDay, POSE_REPORT_STEP_MS)) yield JSON.stringify(report);
      })();
      const [, shiftEnd] = scenario.workingWindow(lastDay);
      await services.ingest.countLines(site, poses, posesFile, today, new Date(Math.min(shiftEnd, today.getTime())));
    }
    progress.sitesDone++;
    log.info({ site: s.name, days, scans, ms: Date.now() - started }, 'seeded demo evidence');
  }
  await services.audit.record(actor, { action: SEEDED_ACTION, targetType: 'demo', summary: `The demo scenario's maps and ${days} days of simulated scans were loaded.` });
  progress.currentSite = null;
  progress.state = 'ready';
}

/** Seeds the whole demo scenario into an empty database; returns false (and does nothing) when data exists. */
export async function seedDemo(db: DataSource, services: Services | null, log: Logger, opts: { days?: number; today?: Date } = {}): Promise<boolean> {
  if (!(await seedDemoAccounts(db, log))) return false;
  if (services) await seedDemoEvidence(db, services, log, opts.today, opts.days);
  return true;
}

/** The demo's remap: Corvane's site manager asked for one at this site, and the mapping team has a window for it. */
const DEMO_REMAP_SITE = 'Lowen Harbour Hub';

/**
 * After the first detection run: a remap request at Lowen Harbour Hub from its two most severe
 * persistent zones, requested by Corvane's site manager and scheduled by the demo mapper in the
 * quietest window of the coming days, so the overview, the calendar and the Remaps tab open with
 * one. Skipped when the site already has a request or no such zones.
 */
export async function seedDemoRemap(db: DataSource, services: Services, log: Logger, now = new Date()): Promise<void> {
  const actorOf = (u: User): Actor => ({ id: u.id, email: u.email, name: u.name, role: u.role, organizationId: u.organizationId });
  const manager = actorOf(await db.getRepository(User).findOneByOrFail({ email: 'priya.manager@corvane.example' }));
  const mapper = actorOf(await db.getRepository(User).findOneByOrFail({ email: 'tomas.mapper@kestrelway.example' }));
  const site = await db.getRepository(Site).findOneByOrFail({ name: DEMO_REMAP_SITE });
  if ((await services.remaps.list(manager, site.id, { page: 1, pageSize: 1 })).total > 0) return;
  const { zones } = await services.detection.list(manager, site.id, { status: 'open', persistence: 'persistent', page: 1, pageSize: 2 });
  if (zones.length === 0) return;
  const remap = await services.remaps.create(manager, site.id, { zoneIds: zones.map((z) => z.id), note: 'Dock 4 lane was re-striped; please re-map before the peak.' });
  const { windows } = await services.remaps.quietWindows(mapper, site.id, remap.id, { days: 14, count: 1 }, now);
  if (windows.length === 0) return;
  await services.remaps.schedule(mapper, site.id, remap.id, { start: new Date(windows[0].start), end: new Date(windows[0].end), assigneeId: mapper.id }, now);
  log.info({ site: site.name, remap: remap.label }, 'seeded the demo remap request');
}
