import { statfsSync } from 'node:fs';
import type { DataSource } from 'typeorm';
import type { DiskStatus, JobKindStatus, SystemStatus } from '../../shared/types/jobs.js';
import type { JobName } from '../entities/job-run.entity.js';

/** Every job kind the health answer reports on, in the order the admin page shows them. */
export const JOB_KINDS: readonly JobName[] = ['detection', 'retention', 'report', 'backup'];

/** Age of the newest successful backup after which health warns: two days, so one missed night passes and a second does not (product choice). */
export const STALE_BACKUP_MS = 2 * 86_400_000;

/** Free space below which the data directory's disk counts as low: 1 GiB (product choice). */
export const LOW_DISK_BYTES = 1024 ** 3;

interface LatestRow {
  job: JobName;
  status: 'running' | 'succeeded' | 'failed';
  started_at: string;
  finished_at: string | null;
  error: string | null;
}

const JOB_WORDS: Record<JobName, string> = { detection: 'change detection', retention: 'evidence retention', report: 'monthly report', backup: 'backup' };

// SQLite datetime text as TypeORM stores it ("2026-12-02 02:45:00.123", UTC) to ISO 8601.
const iso = (text: string | null) => (text === null ? null : new Date(`${text.replace(' ', 'T')}Z`).toISOString());

/**
 * Checks what an operator's monitor asks about: is the database reachable, did each job kind's last
 * run succeed, is there space left on the data directory's disk. Error texts and byte counts are
 * for signed-in admins; everyone else gets the states only.
 */
export class SystemStatusService {
  constructor(
    private readonly db: DataSource,
    private readonly dataDir: string,
    private readonly lowDiskBytes = LOW_DISK_BYTES,
  ) {}

  /** The status at `now`; `detailed` adds error texts and byte counts (admins). */
  async check(detailed: boolean, now = new Date()): Promise<SystemStatus> {
    const disk = this.disk(detailed);
    let rows: LatestRow[];
    try {
      rows = await this.latestRuns();
    } catch {
      return { status: 'degraded', database: 'unreachable', warnings: ['The database cannot be reached.'], jobs: null, disk };
    }
    const warnings: string[] = [];
    if (disk.status === 'low') warnings.push(`Less than ${+(this.lowDiskBytes / 1024 ** 3).toFixed(2)} GiB is free on the data directory’s disk.`);
    const jobs = {} as Record<JobName, JobKindStatus>;
    for (const job of JOB_KINDS) {
      const mine = rows.filter((r) => r.job === job).sort((a, b) => (a.started_at < b.started_at ? 1 : -1));
      const failed = mine.filter((r) => r.status === 'failed');
      const shown = failed[0] ?? mine[0];
      const entry: JobKindStatus = shown
        ? { status: shown.status, startedAt: iso(shown.started_at), finishedAt: iso(shown.finished_at) }
        : { status: 'never', startedAt: null, finishedAt: null };
      if (job === 'detection') entry.failedSites = failed.length;
      if (detailed && shown?.status === 'failed') entry.error = shown.error;
      if (failed.length > 0) warnings.push(job === 'detection' && failed.length > 1 ? `The last change detection failed on ${failed.length} sites.` : `The last ${JOB_WORDS[job]} run failed.`);
      jobs[job] = entry;
    }
    // Backups that quietly stopped (the server was down at night, the schedule lost) are a warning too;
    // a database that never had one (a fresh install) is not.
    const lastGood = rows.length === 0 ? null : await this.lastSucceededBackup();
    if (lastGood !== null && now.getTime() - lastGood.getTime() > STALE_BACKUP_MS && jobs.backup.status !== 'failed') {
      warnings.push('The newest successful backup is more than 2 days old.');
    }
    return { status: warnings.length > 0 ? 'warn' : 'ok', database: 'ok', warnings, jobs, disk };
  }

  // The newest run of each job kind and site (a per-site job's sites each have their own last run;
  // a removed site's runs no longer count). With MAX() in a grouped query SQLite takes the other
  // columns from the row that holds the maximum ("bare columns", SQLite's SELECT documentation).
  private async latestRuns(): Promise<LatestRow[]> {
    if (!this.db.isInitialized) throw new Error('The database is closed.');
    return this.db.query(
      `SELECT job, status, MAX(started_at) AS started_at, finished_at, error FROM job_runs
       WHERE site_id IS NULL OR site_id IN (SELECT id FROM sites)
       GROUP BY job, site_id`,
    ) as Promise<LatestRow[]>;
  }

  private async lastSucceededBackup(): Promise<Date | null> {
    const [row] = (await this.db.query(`SELECT MAX(finished_at) AS at FROM job_runs WHERE job = 'backup' AND status = 'succeeded'`)) as Array<{ at: string | null }>;
    return row?.at ? new Date(iso(row.at)!) : null;
  }

  private disk(detailed: boolean): DiskStatus {
    try {
      const fs = statfsSync(this.dataDir);
      const freeBytes = fs.bavail * fs.bsize;
      const status = freeBytes < this.lowDiskBytes ? 'low' : 'ok';
      return detailed ? { status, freeBytes, totalBytes: fs.blocks * fs.bsize } : { status };
    } catch {
      return { status: 'unknown' };
    }
  }
}
