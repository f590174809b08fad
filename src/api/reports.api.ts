import { apiRequest } from './client';

export type ReportStatus = 'generating' | 'ready' | 'sent' | 'failed';

export interface ReportRow {
  id: string;
  organizationId: string;
  month: string;
  status: ReportStatus;
  generatedAt: string | null;
  sentAt: string | null;
  deliveries: Record<string, number>;
}

export interface ReportPreview {
  month: string;
  status: ReportStatus | null;
  subject: string;
  html: string;
  text: string;
}

export interface ReportRecipient {
  id: string;
  email: string;
  name: string;
  createdAt: string;
  unsubscribedAt: string | null;
  lastDelivery: { month: string; status: string; error: string | null } | null;
}

const base = (orgId: string) => `/organizations/${encodeURIComponent(orgId)}`;

export async function listReports(orgId: string): Promise<ReportRow[]> {
  return (await apiRequest<{ reports: ReportRow[] }>(`${base(orgId)}/reports`)).reports;
}

export function previewReport(orgId: string, month: string): Promise<ReportPreview> {
  return apiRequest<ReportPreview>(`${base(orgId)}/reports/${month}/preview`);
}

export function sendReport(orgId: string, month: string): Promise<{ recipients: number; queued: number }> {
  return apiRequest(`${base(orgId)}/reports/${month}/send`, { method: 'POST', body: {} });
}

export async function listRecipients(orgId: string): Promise<ReportRecipient[]> {
  return (await apiRequest<{ recipients: ReportRecipient[] }>(`${base(orgId)}/recipients`)).recipients;
}

export async function addRecipient(orgId: string, input: { email: string; name?: string }): Promise<ReportRecipient> {
  return (await apiRequest<{ recipient: ReportRecipient }>(`${base(orgId)}/recipients`, { method: 'POST', body: input })).recipient;
}

export async function removeRecipient(orgId: string, recipientId: string): Promise<void> {
  await apiRequest(`${base(orgId)}/recipients/${encodeURIComponent(recipientId)}`, { method: 'DELETE' });
}
