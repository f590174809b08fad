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

/** One site's figures of a month, as its report mail shows them. */
export interface ReportSiteFigures {
  id: string;
  name: string;
  /** Health score of the month, percent; null without scans. */
  score: number | null;
  previousScore: number | null;
  /** Score points against the month before; null when either month had no scans. */
  change: number | null;
  returns: number;
  weeks: Array<{ label: string; score: number | null }>;
  openZones: { new: number; missing: number; unmapped: number };
  changedAreaM2: number;
  remapsDone: Array<{ number: number; title: string; verifiedAt: string }>;
  remapsPlanned: Array<{ number: number; title: string; windowStart: string }>;
  scannerFlags: Array<{ robot: string; scanner: string; raisedAt: string }>;
  docking: { total: number; outOfTolerance: string[]; drifting: string[] };
  /** The map picture with the open zones outlined, as a data address; null when the site has no map. */
  mapImage: string | null;
}

/** A month's report figures for the read-only page. */
export interface ReportMonthFigures {
  month: string;
  monthLabel: string;
  organization: { id: string; name: string; timezone: string };
  report: Omit<ReportRow, 'deliveries'> | null;
  subject: string;
  sites: ReportSiteFigures[];
}

export function getReportFigures(orgId: string, month: string): Promise<ReportMonthFigures> {
  return apiRequest<ReportMonthFigures>(`${base(orgId)}/reports/${encodeURIComponent(month)}`);
}

/** Whom an unsubscribe link names. */
export interface UnsubscribeState {
  email: string;
  organization: string;
  unsubscribedAt: string | null;
}

const unsubscribePath = (token: string) => `/unsubscribe/${encodeURIComponent(token)}`;

/** Reads whom the link names; changes nothing. */
export function describeUnsubscribe(token: string): Promise<UnsubscribeState> {
  return apiRequest<UnsubscribeState>(unsubscribePath(token));
}

/** Unsubscribes the link's recipient; `already` when it had been done before. */
export function unsubscribe(token: string): Promise<UnsubscribeState & { unsubscribedAt: string; already: boolean }> {
  return apiRequest(unsubscribePath(token), { method: 'POST', body: {} });
}
