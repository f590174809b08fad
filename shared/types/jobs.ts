/** What a site's detection run reports: active map version number, days pooled, robots left out, zones found and tracked, scanners flagged. */
export interface DetectionFigures {
  mapVersion: number | null;
  days: number;
  excludedRobots: number;
  candidates: number;
  zonesNew: number;
  zonesUpdated: number;
  zonesCleared: number;
  flagged: string[];
  skipped?: string;
  /** Remap requests whose new map was checked after the zones were tracked; absent in runs recorded before remaps existed. */
  remaps?: { checked: number; verified: number; notFixed: number };
}

/** What a retention run reports: stored items dropped because they were older than the sites' retention. */
export interface RetentionFigures {
  chunksDeleted: number;
  blocksDeleted: number;
  samplesDeleted: number;
  /** Absent in runs recorded before robot trails were kept. */
  trailsDeleted?: number;
  /** Absent in runs recorded before hourly traffic was kept. */
  hoursDeleted?: number;
}

/** What a backup run reports: the file made (in `<dataDir>/backups`), its size in bytes and SQLite pages, how long it took in ms, and the rotation. */
export interface BackupFigures {
  file: string;
  bytes: number;
  pages: number;
  durationMs: number;
  integrity: 'ok';
  /** How many backups the rotation keeps. */
  keep: number;
  /** Backups in the folder after the rotation, the one just made first. */
  kept: string[];
  /** Older backups the rotation deleted. */
  removed: string[];
}

/** What a monthly-report run reports: one entry per organization whose report was due, with the mails queued. */
export interface ReportRunFigures {
  reports: Array<{ organization: string; month: string; queued: number }>;
}

/** The kinds of job that record runs. */
export type JobKind = 'detection' | 'retention' | 'report' | 'backup';

/** The latest run of one job kind; for detection, the latest run of the site whose last run failed, if any did. */
export interface JobKindStatus {
  status: 'never' | 'running' | 'succeeded' | 'failed';
  startedAt: string | null;
  finishedAt: string | null;
  /** Detection only: how many sites' latest run failed. */
  failedSites?: number;
  /** Admins only: the failed run's error. */
  error?: string | null;
}

/** Space on the disk that holds the data directory. */
export interface DiskStatus {
  status: 'ok' | 'low' | 'unknown';
  /** Admins only: bytes free to the server process, and the disk's size. */
  freeBytes?: number;
  totalBytes?: number;
}

/** The process's own health: database, last run of each job kind, disk of the data directory. */
export interface SystemStatus {
  /** 'degraded' when the database cannot be reached; 'warn' when the disk is low or a job kind's last run failed. */
  status: 'ok' | 'warn' | 'degraded';
  database: 'ok' | 'unreachable';
  /** Short sentences saying why the status is not 'ok'; they name no error text. */
  warnings: string[];
  jobs: Record<JobKind, JobKindStatus> | null;
  disk: DiskStatus;
}
