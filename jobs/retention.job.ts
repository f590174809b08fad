import type { Services } from '../server/services/index.js';

/** Daily evidence retention over every site, recorded as a job run. */
export async function retentionJob(deps: { services: Services }, now: Date) {
  return deps.services.jobRuns.retention('schedule', now);
}
