import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { Sessions } from '../auth/sessions.js';
import type { Config } from '../config.js';
import { AuditService } from './audit.service.js';
import { DemoSeedProgress } from './demo-seed.service.js';
import { IngestService } from './ingest.service.js';
import { InvitationsService } from './invitations.service.js';
import { MapVersionsService } from './map-versions.service.js';
import { OrganizationsService } from './organizations.service.js';
import { RobotsService } from './robots.service.js';
import { SitesService } from './sites.service.js';
import { UsersService } from './users.service.js';

/** Builds every service once per app; routes, jobs and the CLI call these. */
export function createServices(db: DataSource, config: Config, sessions: Sessions, log: Logger) {
  const audit = new AuditService(db);
  const sites = new SitesService(db, audit);
  const mapVersions = new MapVersionsService(db, sites, audit);
  return {
    demoSeed: new DemoSeedProgress(),
    mapVersions,
    ingest: new IngestService(db, sites, mapVersions, log),
    audit,
    sites,
    users: new UsersService(db, sessions, audit),
    invitations: new InvitationsService(db, audit, config.baseUrl, log),
    organizations: new OrganizationsService(db, audit),
    robots: new RobotsService(db, sites, audit),
  };
}

export type Services = ReturnType<typeof createServices>;
