import type { Services } from '../server/services/index.js';

/** Nightly change detection (with the scanner check) of one site, recorded as a job run. */
export async function detectionJob(deps: { services: Services }, now: Date, siteId: string) {
  return deps.services.jobRuns.detect('schedule', siteId, now);
}
