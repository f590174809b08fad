import { apiRequest } from './client';

/** One message the built-in capture server received. */
export interface CapturedMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  size: number;
}

/** A captured message, parsed: HTML with cid: images pointing at the API, text, parts. */
export interface CapturedMessageDetail {
  id: string;
  receivedAt: string;
  subject: string;
  from: string;
  to: string;
  date: string | null;
  html: string | null;
  text: string | null;
  attachments: Array<{ id: string; filename: string | null; contentType: string; size: number; inline: boolean }>;
}

export type DeliveryStatus = 'queued' | 'sending' | 'sent' | 'failed';

/** One queued mail and how its delivery went. */
export interface Delivery {
  id: string;
  kind: string;
  to: { email: string; name: string | null };
  subject: string;
  status: DeliveryStatus;
  attempts: number;
  nextAttemptAt: string | null;
  lastError: string | null;
  sentAt: string | null;
  createdAt: string;
}

export async function listOutbox(limit = 50, offset = 0): Promise<{ total: number; messages: CapturedMessage[] }> {
  return apiRequest('/outbox', { query: { limit, offset } });
}

export async function getOutboxMessage(id: string): Promise<CapturedMessageDetail> {
  return (await apiRequest<{ message: CapturedMessageDetail }>(`/outbox/${id}`)).message;
}

/** Where the bytes of one part of a captured message are served. */
export const outboxPartUrl = (id: string, partId: string): string => `/api/outbox/${id}/parts/${encodeURIComponent(partId)}`;

export async function listDeliveries(status?: DeliveryStatus, limit = 100): Promise<{ total: number; mail: Delivery[] }> {
  return apiRequest('/mail', { query: { status, limit } });
}
