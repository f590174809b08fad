import { appConfig } from '@/config';
import { apiRequest } from './client';
import type { ZoneKind, ZonePersistence, ZoneStatus } from './zones.api';
import type { CoverageEstimate } from '../../shared/remap/coverage';

export type RemapStatus = 'proposed' | 'scheduled' | 'in_progress' | 'map_uploaded' | 'verified' | 'not_fixed' | 'cancelled';
export type RemapPriorityLabel = 'high' | 'medium' | 'low';
export type VerificationState = 'waiting' | 'verified' | 'not_fixed';

/** A person named on a request (requester, approver, assignee, history actor). */
export interface PersonRef {
  id: string;
  name: string;
}

/** One zone of a request, as it stood when the request was read (area in m²). */
export interface RemapZone {
  id: string;
  label: string;
  kind: ZoneKind;
  persistence: ZonePersistence;
  status: ZoneStatus;
  areaM2: number;
}

/** The area to re-drive: outlines in map metres [x, y] (the union of the zones' neighbourhoods), its area in m² and the margin in metres. */
export interface RemapArea {
  outlines: [number, number][][];
  areaM2: number;
  marginM: number;
}

/**
 * The coverage estimate of a remap as the API sends it (figures of shared/remap/coverage.ts, rounded
 * for display: area in m², lengths in metres, minutes), with the window length it offers.
 */
export interface RemapEstimate extends CoverageEstimate {
  /** totalMinutes rounded up: the default window length and the quiet windows' duration. */
  windowMinutes: number;
}

/** A scheduled window: UTC instants (ISO), the site's IANA time zone and the same instants as site-local 'YYYY-MM-DD HH:mm'. */
export interface RemapWindow {
  start: string;
  end: string;
  timezone: string;
  localStart: string;
  localEnd: string;
}

/**
 * Agreement (site-wide explained returns ÷ returns, 0–1, null without returns) and changed area (m²:
 * before, the request's zones; after, zones of the new version inside the request's area).
 */
export interface VerificationFigures {
  agreement: number | null;
  changedAreaM2: number;
}

/** Whether the new map fixed the request's zones: evidence days on the new version, zones still flagging, figures before and after. */
export interface RemapVerification {
  state: VerificationState;
  evidenceDays: number;
  zonesStillFlagging: number;
  before: VerificationFigures;
  after: VerificationFigures | null;
  checkedAt: string | null;
}

/** A map version a request names: the one its zones were found on, or the remap run's. */
export interface RemapMapRef {
  id: string;
  version: number;
  status: 'draft' | 'active' | 'archived';
  activatedAt: string | null;
}

/** One recorded step of a request: creation, approval, scheduling, verification… */
export interface RemapHistoryEntry {
  at: string;
  action: string;
  actor: PersonRef | null;
  summary: string;
}

/** A remap request of a site: its zones, area to re-drive, estimate, window, people and verification. */
export interface RemapRequest {
  id: string;
  siteId: string;
  siteName: string | null;
  number: number;
  /** 'R-<number>'. */
  label: string;
  title: string;
  status: RemapStatus;
  priority: { score: number; label: RemapPriorityLabel };
  zones: RemapZone[];
  area: RemapArea;
  estimate: RemapEstimate;
  window: RemapWindow | null;
  assignee: PersonRef | null;
  /** Null only when the person was deleted. */
  requestedBy: PersonRef | null;
  approvedBy: PersonRef | null;
  approvedAt: string | null;
  mapVersionBefore: RemapMapRef;
  mapVersionAfter: RemapMapRef | null;
  /** Null until the first nightly detection after the attached version became active. */
  verification: RemapVerification | null;
  note: string;
  cancelReason: string | null;
  /** Who the move's e-mail notice went to; only in the answers of schedule and cancel. */
  noticeSentTo?: PersonRef[];
  createdAt: string;
  updatedAt: string;
  /** Present on the detail only. */
  history?: RemapHistoryEntry[];
}

/** One page of a site's remap requests. */
export interface RemapPage {
  remaps: RemapRequest[];
  total: number;
  page: number;
  pageSize: number;
}

/** Mean returns in one site-local hour of the week (dow 1 = Monday … 7 = Sunday, ISO; hour 0–23); null without history for that hour. */
export interface HourOfWeekTraffic {
  dow: number;
  hour: number;
  meanReturns: number | null;
}

/** A proposed quiet window: UTC instants, site-local 'YYYY-MM-DD HH:mm', the returns expected in it and its rank (1 = quietest). */
export interface QuietWindow {
  start: string;
  end: string;
  localStart: string;
  localEnd: string;
  expectedReturns: number;
  rank: number;
}

/**
 * The site's traffic by hour of week over the last `weeks` weeks (≤ 4, one decimal; history from
 * `historyFrom`) and the quietest windows of `durationMinutes` in the coming days; no windows
 * without traffic history.
 */
export interface QuietWindows {
  durationMinutes: number;
  timezone: string;
  weeks: number;
  historyFrom: string | null;
  hourOfWeek: HourOfWeekTraffic[];
  windows: QuietWindow[];
}

/** Someone a remap may be assigned to (mappers and admins of the operator). */
export interface RemapAssignee {
  id: string;
  name: string;
  role: 'mapper' | 'admin';
}

const remapsPath = (siteId: string) => `/sites/${encodeURIComponent(siteId)}/remaps`;
const remapPath = (siteId: string, remapId: string) => `${remapsPath(siteId)}/${encodeURIComponent(remapId)}`;

/** Returns one page (1-based) of a site's remap requests, newest first, optionally of one status. */
export async function listRemaps(siteId: string, status: RemapStatus | undefined, page: number, pageSize: number): Promise<RemapPage> {
  return apiRequest<RemapPage>(remapsPath(siteId), { query: { status, page, pageSize } });
}

/** Creates a remap request from open or acknowledged zones of the site's active map (1–50; title ≤ 200, note ≤ 2000 characters); the zones become "remap planned". */
export async function createRemap(siteId: string, input: { zoneIds: string[]; title?: string; note?: string }): Promise<RemapRequest> {
  return (await apiRequest<{ remap: RemapRequest }>(remapsPath(siteId), { method: 'POST', body: input })).remap;
}

/** Returns one request with its history. */
export async function getRemap(siteId: string, remapId: string): Promise<RemapRequest> {
  return (await apiRequest<{ remap: RemapRequest }>(remapPath(siteId, remapId))).remap;
}

/** Returns the site's traffic by hour of week and the `count` quietest windows of the request's duration in the next `days` days. */
export async function getQuietWindows(siteId: string, remapId: string, days = 14, count = 3): Promise<QuietWindows> {
  return (await apiRequest<{ quietWindows: QuietWindows }>(`${remapPath(siteId, remapId)}/quiet-windows`, { query: { days, count } })).quietWindows;
}

/** Returns the people a request of this site may be assigned to. */
export async function listRemapAssignees(siteId: string): Promise<RemapAssignee[]> {
  return (await apiRequest<{ assignees: RemapAssignee[] }>(`${remapsPath(siteId)}/assignees`)).assignees;
}

async function act(siteId: string, remapId: string, action: string, body: Record<string, unknown> = {}): Promise<RemapRequest> {
  return (await apiRequest<{ remap: RemapRequest }>(`${remapPath(siteId, remapId)}/${action}`, { method: 'POST', body })).remap;
}

/** Approves a request a mapper proposed (site managers of the site's organization, admins). */
export function approveRemap(siteId: string, remapId: string): Promise<RemapRequest> {
  return act(siteId, remapId, 'approve');
}

/** Schedules (or reschedules) a request: start as an ISO instant, end defaulting to start + estimate, and who does it. */
export function scheduleRemap(siteId: string, remapId: string, input: { start: string; end?: string; assigneeId: string }): Promise<RemapRequest> {
  return act(siteId, remapId, 'schedule', input);
}

/** Marks a scheduled request as under way. */
export function startRemap(siteId: string, remapId: string): Promise<RemapRequest> {
  return act(siteId, remapId, 'start');
}

/** Attaches the floor version uploaded after the remap run; activating that version starts verification. */
export function attachRemapMap(siteId: string, remapId: string, mapVersionId: string): Promise<RemapRequest> {
  return act(siteId, remapId, 'attach-map', { mapVersionId });
}

/** Cancels a request (anything but verified or cancelled) with a reason (1–500 characters); zones still planned return to their earlier status. */
export function cancelRemap(siteId: string, remapId: string, reason: string): Promise<RemapRequest> {
  return act(siteId, remapId, 'cancel', { reason });
}

/** Returns the URL of a request's iCalendar file (RFC 5545) for a download link; the server answers 409 before it has a window. */
export function remapCalendarUrl(siteId: string, remapId: string): string {
  return `${appConfig.apiBaseUrl}${remapPath(siteId, remapId)}/calendar.ics`;
}

/** Returns the scheduled, in-progress and later requests with a window overlapping [from, to) (at most 93 days) across every site the user may see. */
export async function listRemapsInRange(from: string, to: string): Promise<RemapRequest[]> {
  return (await apiRequest<{ remaps: RemapRequest[] }>('/remaps', { query: { from, to } })).remaps;
}
