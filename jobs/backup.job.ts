import type { Services } from '../server/services/index.js';

/** The nightly online backup of the database into `<dataDir>/backups`, with rotation, recorded as a job run. */
export async function backupJob(deps: { services: Services }, now: Date) {
  return deps.services.jobRuns.backup('schedule', deps.services.backups, now);
}
