import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { Sessions } from '../auth/sessions.js';
import type { Config } from '../config.js';
import { AuditService } from './audit.service.js';
import { BackupService } from './backup.service.js';
import { DemoSeedProgress } from './demo-seed.service.js';
import { DetectionService } from './detection.service.js';
import { DockingService } from './docking.service.js';
import { HealthService } from './health.service.js';
import { IngestService } from './ingest.service.js';
import { InvitationsService } from './invitations.service.js';
import { JobRunsService } from './job-runs.service.js';
import { MailService } from './mail.service.js';
import { smtpTransport } from '../mail/transport.js';
import { MapVersionsService } from './map-versions.service.js';
import { OrganizationsService } from './organizations.service.js';
import { OutboxService } from './outbox.service.js';
import { PasswordResetService } from './password-reset.service.js';
import { PathsService } from './paths.service.js';
import { RemapNoticesService } from './remap-notices.service.js';
import { RemapsService } from './remaps.service.js';
import { RecipientsService } from './recipients.service.js';
import { ReportFiguresService } from './report-figures.service.js';
import { ReportsService } from './reports.service.js';
import { RobotsService } from './robots.service.js';
import { ScannerCheckService } from './scanner-check.service.js';
import { SiteSettingsService } from './site-settings.service.js';
import { SitesService } from './sites.service.js';
import { SystemStatusService } from './system-status.service.js';
import { TrafficService } from './traffic.service.js';
import { UsersService } from './users.service.js';

/** Builds every service once per app; routes, jobs and the CLI call these. */
export function createServices(db: DataSource, config: Config, sessions: Sessions, log: Logger) {
  const audit = new AuditService(db);
  const sites = new SitesService(db, audit);
  const mapVersions = new MapVersionsService(db, sites, audit);
  const health = new HealthService(db, sites, mapVersions);
  const robots = new RobotsService(db, sites, audit);
  const scannerCheck = new ScannerCheckService(db, sites, robots, mapVersions, audit);
  const detection = new DetectionService(db, sites, mapVersions, health, scannerCheck, audit, log);
  const traffic = new TrafficService(db);
  const mail = new MailService(db, config.smtp.from, smtpTransport(config.smtp), log);
  // Tests deliver explicitly; the app sends right after queueing.
  mail.promptDelivery = config.env !== 'test';
  const remaps = new RemapsService(db, sites, mapVersions, health, traffic, audit, log, config.baseUrl, new RemapNoticesService(mail, config.smtp.from));
  const docking = new DockingService(db, sites, audit);
  const reportFigures = new ReportFiguresService(db, health, mapVersions, docking, config.baseUrl);
  const recipients = new RecipientsService(db, audit, config.sessionSecret, config.baseUrl);
  return {
    mail,
    outbox: new OutboxService(db),
    health,
    scannerCheck,
    detection,
    jobRuns: new JobRunsService(db, detection, log, remaps),
    backups: new BackupService(db, config, log),
    systemStatus: new SystemStatusService(db, config.dataDir),
    demoSeed: new DemoSeedProgress(),
    mapVersions,
    paths: new PathsService(db, sites, mapVersions),
    traffic,
    remaps,
    ingest: new IngestService(db, sites, mapVersions, log),
    audit,
    sites,
    siteSettings: new SiteSettingsService(db, sites, audit),
    users: new UsersService(db, sessions, audit),
    invitations: new InvitationsService(db, audit, config.baseUrl, log, mail),
    passwordReset: new PasswordResetService(db, sessions, audit, mail, config.baseUrl, log),
    organizations: new OrganizationsService(db, audit),
    robots,
    docking,
    reportFigures,
    recipients,
    reports: new ReportsService(db, reportFigures, mapVersions, recipients, mail, config.baseUrl),
  };
}

export type Services = ReturnType<typeof createServices>;
