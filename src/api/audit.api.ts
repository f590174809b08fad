import { apiRequest } from './client';
import type { AuditEvent } from './types';

/** Returns the newest audit events, at most `limit` of them (admin only). */
export async function listAuditEvents(limit = 100): Promise<AuditEvent[]> {
  return (await apiRequest<{ events: AuditEvent[] }>('/audit-events', { query: { limit } })).events;
}
