import { listAuditEvents } from '@/api/audit.api';
import { useAsync } from './useAsync';

/** The newest audit events as `{ data, isLoading, error, run }`; `run(limit)` loads at most `limit` events. */
export function useAuditEvents() {
  return useAsync((limit: number = 100) => listAuditEvents(limit));
}
