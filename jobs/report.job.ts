import type { Services } from '../server/services/index.js';

/** The hourly check for due monthly reports (the 1st at 07:00 in each organization's zone), recorded as a job run when one is due. */
export async function reportJob(deps: { services: Services }, now: Date) {
  return deps.services.jobRuns.report('schedule', deps.services.reports, now);
}
