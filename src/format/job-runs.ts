/** Readable summaries of what a job run did. */
import type { JobRun } from '@/api/job-runs.api';

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** Returns a duration in milliseconds as "850 ms", "3.5 s" or "2 min 05 s". */
export function duration(ms: number): string {
  if (ms < 1000) return `${Math.round(ms)} ms`;
  if (ms < 60_000) return `${(ms / 1000).toFixed(1)} s`;
  const seconds = Math.round(ms / 1000);
  return `${Math.floor(seconds / 60)} min ${String(seconds % 60).padStart(2, '0')} s`;
}

/** Returns a byte count as "850 B", "12.3 MB" or "4.1 GB" (powers of 1024, as disks and backups are measured). */
export function bytes(n: number): string {
  const units = ['B', 'KB', 'MB', 'GB', 'TB'];
  let value = n;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit++;
  }
  return unit === 0 ? `${n} B` : `${value.toFixed(1)} ${units[unit]}`;
}

/** What each kind of job is called on the admin page. */
export const JOB_TITLES = { detection: 'Change detection', retention: 'Evidence retention', report: 'Monthly reports', backup: 'Database backup' } as const;

/** Returns the figures of a run in a sentence ("14 days on map v1: 12 zones found (12 new, 0 updated, 0 no longer seen); scanner check advised for AMR-02/front"). */
export function runFigures(run: JobRun): string {
  const f = run.figures;
  if (run.status === 'running') return 'running…';
  if (!f) return run.status === 'failed' ? 'no figures (the run failed)' : 'no figures recorded';
  if (run.job === 'backup') {
    const removed = f.removed ?? [];
    const rotation = removed.length > 0 ? `, removed ${plural(removed.length, 'older backup')}` : '';
    return `saved ${f.file ?? 'a copy'} (${bytes(f.bytes ?? 0)}, integrity check ok); ${plural((f.kept ?? []).length, 'backup')} kept of ${f.keep ?? '?'}${rotation}`;
  }
  if (run.job === 'report') {
    const sent = f.reports ?? [];
    if (sent.length === 0) return 'no report was due';
    return sent.map((r) => `${r.organization} ${r.month}: ${plural(r.queued, 'mail')} queued`).join('; ');
  }
  if (run.job === 'retention') {
    return `dropped ${plural(f.chunksDeleted ?? 0, 'evidence chunk')}, ${plural(f.blocksDeleted ?? 0, 'agreement block')}, ${plural(f.samplesDeleted ?? 0, 'scan sample')}, ${plural(f.trailsDeleted ?? 0, 'robot trail')}, ${plural(f.hoursDeleted ?? 0, 'hour of traffic', 'hours of traffic')} past retention`;
  }
  const parts: string[] = [];
  if (f.skipped) parts.push(f.skipped);
  else {
    const map = f.mapVersion === null || f.mapVersion === undefined ? 'no active map' : `map v${f.mapVersion}`;
    const found = f.candidates ? `${plural(f.candidates, 'zone')} found (${f.zonesNew ?? 0} new, ${f.zonesUpdated ?? 0} updated)` : 'no changed zone found';
    const gone = f.zonesCleared ? `, ${plural(f.zonesCleared, 'zone')} no longer seen` : '';
    parts.push(`${plural(f.days ?? 0, 'day')} on ${map}: ${found}${gone}`);
    if (f.excludedRobots) parts.push(`${plural(f.excludedRobots, 'flagged robot')} left out`);
  }
  if (f.flagged && f.flagged.length > 0) parts.push(`scanner check advised for ${f.flagged.join(', ')}`);
  return parts.join('; ');
}
