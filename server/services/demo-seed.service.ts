import type { DataSource } from 'typeorm';
import type { Logger } from 'pino';
import { hashPassword } from '../auth/password.js';
import { Organization, Robot, Site, User } from '../entities/index.js';
import type { ScannerMount } from '../entities/robot.entity.js';
import type { Role } from '../entities/user.entity.js';
import { newId } from './ids.js';

// The demo scenario is invented: Kestrelway Fleet Services runs the fleets; Ambergate Provisions
// and Corvane Parts & Supply are its customers. Towns, people and robots are made up.

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

const SITES = [
  { org: 'Ambergate Provisions', name: 'Fennick Cross DC', city: 'Fennick Cross', timezone: 'Europe/London', robots: 4 },
  { org: 'Ambergate Provisions', name: 'Tarrow Heath Cold Store', city: 'Tarrow Heath', timezone: 'Europe/London', robots: 3 },
  { org: 'Corvane Parts & Supply', name: 'Lowen Harbour Hub', city: 'Lowen Harbour', timezone: 'America/Chicago', robots: 3 },
  { org: 'Corvane Parts & Supply', name: 'Brindle Ford Crossdock', city: 'Brindle Ford', timezone: 'America/Denver', robots: 2 },
  { org: 'Corvane Parts & Supply', name: 'Quarrington Vale Returns', city: 'Quarrington Vale', timezone: 'America/New_York', robots: 2 },
];

// A front scanner ahead of the base centre and a rear one turned half a turn: a common layout for
// mobile robots with two safety laser scanners (common practice; figures invented for the demo).
const TWO_SCANNERS: ScannerMount[] = [
  { name: 'front', x: 0.42, y: 0, yaw: 0 },
  { name: 'rear', x: -0.42, y: 0, yaw: Math.PI },
];
const ONE_SCANNER: ScannerMount[] = [{ name: 'front', x: 0.35, y: 0, yaw: 0 }];

/** True when the database holds no organization yet, i.e. it is a fresh data directory. */
export async function isEmptyDatabase(db: DataSource): Promise<boolean> {
  return (await db.getRepository(Organization).count()) === 0;
}

/** Seeds the invented demo scenario into an empty database; does nothing when any data exists. */
export async function seedDemo(db: DataSource, log: Logger): Promise<boolean> {
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
      for (let k = 1; k <= s.robots; k++) {
        const twin = k % 2 === 1;
        await m.insert(Robot, {
          id: newId(),
          siteId,
          name: `AMR-${String(k).padStart(2, '0')}`,
          model: twin ? 'Tugline T2 tugger' : 'Palletmole PM-1 lifter',
          mounts: twin ? TWO_SCANNERS : ONE_SCANNER,
        });
      }
    }
  });
  log.info({ organizations: ORGS.length, sites: SITES.length, users: DEMO_ACCOUNTS.length }, 'seeded the demo scenario');
  return true;
}
