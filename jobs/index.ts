import cron, { type ScheduledTask } from 'node-cron';
import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import { Site } from '../server/entities/index.js';
import type { Services } from '../server/services/index.js';
import { siteSettings } from '../server/services/site-settings.js';
import { backupJob } from './backup.job.js';
import { detectionJob } from './detection.job.js';
import { reportJob } from './report.job.js';
import { retentionJob } from './retention.job.js';

/** Server-local time of the daily retention run (product choice: quiet hours). */
const RETENTION_CRON = '30 3 * * *';
/** Server-local time of the nightly database backup (product choice: quiet hours, before retention drops old evidence). */
const BACKUP_CRON = '45 2 * * *';
/** How often the per-site schedules are compared with the sites' settings. */
const REFRESH_CRON = '*/10 * * * *';
/** Hourly check for due monthly reports: the 1st at 07:00 in each organization's zone (ReportsService.due). */
const REPORT_CRON = '5 * * * *';
/** Mail delivery: due queued mail and retries, every minute. */
const MAIL_CRON = '* * * * *';

/**
 * Schedules the jobs in-process with node-cron: one nightly detection per site at its local
 * detection hour (the site's time zone, no overlapping runs), retention and a database backup once a day, and a
 * refresh that follows new sites and changed settings. Returns a handle to stop them all.
 */
export function scheduleJobs(deps: { services: Services; dataSource: DataSource; log: Logger }) {
  const perSite = new Map<string, { key: string; task: ScheduledTask }>();

  const refresh = async () => {
    const sites = await deps.dataSource.getRepository(Site).find();
    const live = new Set<string>();
    for (const site of sites) {
      live.add(site.id);
      const hour = siteSettings(site).detectionHour;
      const key = `${site.timezone}|${hour}`;
      const current = perSite.get(site.id);
      if (current?.key === key) continue;
      await current?.task.destroy();
      const task = cron.schedule(`0 ${hour} * * *`, () => detectionJob(deps, new Date(), site.id).then(() => undefined), { name: `detection:${site.id}`, timezone: site.timezone, noOverlap: true });
      perSite.set(site.id, { key, task });
    }
    for (const [id, entry] of perSite) {
      if (live.has(id)) continue;
      await entry.task.destroy();
      perSite.delete(id);
    }
  };

  const guarded = (name: string, fn: () => Promise<unknown>) => () =>
    fn().then(
      () => undefined,
      // A job that fails is recorded by its run; this only keeps a scheduler error off the process.
      (err) => deps.log.error({ err, job: name }, 'scheduled job failed'),
    );

  const retention = cron.schedule(RETENTION_CRON, guarded('retention', () => retentionJob(deps, new Date())), { name: 'retention', noOverlap: true });
  const refresher = cron.schedule(REFRESH_CRON, guarded('refresh', refresh), { name: 'schedule-refresh', noOverlap: true });
  const reports = cron.schedule(REPORT_CRON, guarded('report', () => reportJob(deps, new Date())), { name: 'monthly-reports', noOverlap: true });
  const backup = cron.schedule(BACKUP_CRON, guarded('backup', () => backupJob(deps, new Date())), { name: 'backup', noOverlap: true });
  const mail = cron.schedule(MAIL_CRON, guarded('mail', () => deps.services.mail.deliverDue(new Date())), { name: 'mail-delivery', noOverlap: true });
  const ready = refresh().catch((err) => deps.log.error({ err }, 'could not schedule the per-site jobs'));

  return {
    ready,
    /** The sites with a scheduled nightly detection. */
    scheduledSites: () => [...perSite.keys()],
    async stop() {
      await ready;
      for (const { task } of perSite.values()) await task.destroy();
      await retention.destroy();
      await refresher.destroy();
      await reports.destroy();
      await mail.destroy();
      await backup.destroy();
    },
  };
}
