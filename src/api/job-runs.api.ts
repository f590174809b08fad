import type {
  BackupFigures as BackupRunFigures,
  DetectionFigures as DetectionRunFigures,
  JobKind,
  ReportRunFigures,
  RetentionFigures as RetentionRunFigures,
} from '../../shared/types/jobs';
import { apiRequest } from './client';

export type JobName = JobKind;
export type JobTrigger = 'schedule' | 'manual' | 'startup';
export type JobRunStatus = 'running' | 'succeeded' | 'failed';

/** What each kind of run reports: the server's own types. */
export type { BackupRunFigures, DetectionRunFigures, ReportRunFigures, RetentionRunFigures };

/** One run of a scheduled job; durations in milliseconds, figures as the job reported them. */
export interface JobRun {
  id: string;
  job: JobName;
  siteId: string | null;
  siteName: string | null;
  trigger: JobTrigger;
  status: JobRunStatus;
  startedAt: string;
  finishedAt: string | null;
  durationMs: number | null;
  error: string | null;
  /** Detection, retention, report or backup figures by `job`; null while running or after a failure. */
  figures: Partial<DetectionRunFigures & RetentionRunFigures & ReportRunFigures & BackupRunFigures> | null;
}

/** The server's answer to "run now": the job started, or null with the reason when there was nothing to do. */
export interface StartedJobRun {
  started: { job: JobName; siteId: string | null } | null;
  message?: string;
}

/** Returns the newest job runs, at most `limit`, optionally of one job (admin only). */
export async function listJobRuns(limit = 100, job?: JobName): Promise<JobRun[]> {
  return (await apiRequest<{ runs: JobRun[] }>('/job-runs', { query: { limit, job } })).runs;
}

/** Starts a job in the background, detection for one site or all (admin only); poll the list for its run. */
export async function startJobRun(job: JobName, siteId?: string): Promise<StartedJobRun> {
  return apiRequest<StartedJobRun>('/job-runs', { method: 'POST', body: siteId ? { job, siteId } : { job } });
}
