import type { SystemStatus } from '../../shared/types/jobs';
import { apiRequest } from './client';

/** GET /api/health: the server's own health; admins also get error texts and disk bytes. */
export interface HealthAnswer extends SystemStatus {
  version: string;
  /** How far loading the demo scenario has got. */
  demo: { state: 'none' | 'seeding' | 'ready' | 'failed'; sitesDone: number; sitesTotal: number; currentSite: string | null };
}

/** Returns the server's health (the database, the last run of each job kind, the data directory's disk). */
export async function getHealth(): Promise<HealthAnswer> {
  return apiRequest<HealthAnswer>('/health');
}
