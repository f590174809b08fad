import type { Router } from 'express';
import type { DataSource } from 'typeorm';
import type { Config } from '../config.js';
import type { Services } from '../services/index.js';
import { auditRoutes } from './audit.routes.js';
import { authRoutes } from './auth.routes.js';
import { dockingRoutes } from './docking.routes.js';
import { healthRoutes } from './health.routes.js';
import { ingestRoutes } from './ingest.routes.js';
import { invitationsRoutes } from './invitations.routes.js';
import { jobRunsRoutes } from './job-runs.routes.js';
import { mapVersionsRoutes } from './map-versions.routes.js';
import { organizationsRoutes } from './organizations.routes.js';
import { mailRoutes, outboxRoutes } from './outbox.routes.js';
import { passwordResetRoutes } from './password-reset.routes.js';
import { pathsRoutes } from './paths.routes.js';
import { remapCalendarRoutes, remapsRoutes } from './remaps.routes.js';
import { recipientsRoutes, reportsRoutes, unsubscribeRoutes } from './reports.routes.js';
import { robotsRoutes } from './robots.routes.js';
import { scanBatchesRoutes } from './scan-batches.routes.js';
import { siteSettingsRoutes } from './site-settings.routes.js';
import { sitesRoutes } from './sites.routes.js';
import { usersRoutes } from './users.routes.js';
import { zonesRoutes } from './zones.routes.js';

/** One row per resource router, mounted under /api. */
export interface RouteEntry {
  path: string;
  router: Router;
}

/** The route table: every API router and where it is mounted. */
export function routeTable(services: Services, config: Config, db: DataSource, version: string): RouteEntry[] {
  return [
    { path: '/health', router: healthRoutes(services.systemStatus, version, services.demoSeed) },
    { path: '/auth', router: authRoutes(services, config) },
    { path: '/auth/password-reset', router: passwordResetRoutes(services) },
    { path: '/invitations', router: invitationsRoutes(services) },
    { path: '/users', router: usersRoutes(services) },
    { path: '/organizations', router: organizationsRoutes(services) },
    { path: '/organizations/:orgId/recipients', router: recipientsRoutes(services) },
    { path: '/organizations/:orgId/reports', router: reportsRoutes(services) },
    { path: '/unsubscribe', router: unsubscribeRoutes(services) },
    { path: '/sites', router: sitesRoutes(services) },
    { path: '/sites/:siteId/settings', router: siteSettingsRoutes(services) },
    { path: '/sites/:siteId/paths', router: pathsRoutes(services) },
    { path: '/sites/:siteId/robots', router: robotsRoutes(services) },
    { path: '/sites/:siteId/map-versions', router: mapVersionsRoutes(services) },
    { path: '/sites/:siteId/scan-batches', router: scanBatchesRoutes(services, config) },
    { path: '/sites/:siteId/zones', router: zonesRoutes(services) },
    { path: '/sites/:siteId/stations', router: dockingRoutes(services) },
    { path: '/sites/:siteId/remaps', router: remapsRoutes(services) },
    { path: '/remaps', router: remapCalendarRoutes(services) },
    { path: '/ingest', router: ingestRoutes(services) },
    { path: '/job-runs', router: jobRunsRoutes(services) },
    { path: '/audit-events', router: auditRoutes(services) },
    { path: '/outbox', router: outboxRoutes(services) },
    { path: '/mail', router: mailRoutes(services) },
  ];
}

/** Every METHOD /api/path the table serves, for the role-matrix test. */
export function listRoutes(table: RouteEntry[]): string[] {
  const out: string[] = [];
  for (const { path, router } of table) {
    for (const layer of router.stack as Array<{ route?: { path: string; methods: Record<string, boolean> } }>) {
      if (!layer.route) continue;
      for (const method of Object.keys(layer.route.methods)) {
        if (method === '_all') continue;
        const sub = layer.route.path === '/' ? '' : layer.route.path;
        out.push(`${method.toUpperCase()} /api${path}${sub}`);
      }
    }
  }
  return out;
}
