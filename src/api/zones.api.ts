import { apiRequest } from './client';

export type ZoneKind = 'new' | 'missing' | 'unmapped';
export type ZoneStatus = 'open' | 'acknowledged' | 'planned' | 'resolved' | 'dismissed' | 'cleared';
export type ZonePersistence = 'persistent' | 'intermittent';
/** The list filter's statuses: 'active' stands for open, acknowledged and planned together. */
export type ZoneStatusFilter = 'active' | ZoneStatus;

/**
 * One changed area of a site's active map: geometry in map metres, area in m², hit rates as shares
 * (0–1) with their Wilson 95 % interval, observations in beams, traffic in returns per m² per day,
 * severity 0–1, days as site-local 'YYYY-MM-DD'.
 */
export interface Zone {
  id: string;
  siteId: string;
  mapVersionId: string;
  number: number;
  label: string;
  kind: ZoneKind;
  status: ZoneStatus;
  persistence: ZonePersistence;
  outline: [number, number][];
  bbox: [number, number, number, number];
  centroid: [number, number];
  cellCount: number;
  areaM2: number;
  meanHitRate: number;
  hitRateInterval: [number, number];
  observations: number;
  daysObserved: number;
  daysFlagged: number;
  trafficPerM2PerDay: number;
  severity: number;
  firstSeenDay: string;
  lastSeenDay: string;
  statusNote: string | null;
  statusChangedAt: string | null;
}

/** One site-local day of a zone: beams observed, share of hits (null when unobserved), and whether it flagged. */
export interface ZoneDay {
  day: string;
  observations: number;
  hitRate: number | null;
  flagged: boolean;
}

/** One recorded change of a zone: detection, acknowledgement, dismissal, clearing… */
export interface ZoneHistoryEntry {
  at: string;
  action: string;
  actor: { id: string; name: string } | null;
  summary: string;
}

/** A zone with its daily timeline and status history (the zone panel). */
export interface ZoneDetail extends Zone {
  timeline: ZoneDay[];
  history: ZoneHistoryEntry[];
}

/** The zones table's filter; days are 'YYYY-MM-DD' in the site's time zone. */
export interface ZoneFilter {
  kind?: ZoneKind;
  status?: ZoneStatusFilter;
  persistence?: ZonePersistence;
  seenFrom?: string;
  seenTo?: string;
}

/** One page of zones, most severe first. */
export interface ZonePage {
  zones: Zone[];
  total: number;
  page: number;
  pageSize: number;
}

const zonesPath = (siteId: string) => `/sites/${encodeURIComponent(siteId)}/zones`;
const zonePath = (siteId: string, zoneId: string) => `${zonesPath(siteId)}/${encodeURIComponent(zoneId)}`;

/** Returns one page (1-based) of a site's zones that match the filter. */
export async function listZones(siteId: string, filter: ZoneFilter, page: number, pageSize: number): Promise<ZonePage> {
  return apiRequest<ZonePage>(zonesPath(siteId), { query: { ...filter, page, pageSize } });
}

/** Returns one zone with its daily timeline and history. */
export async function getZone(siteId: string, zoneId: string): Promise<ZoneDetail> {
  return (await apiRequest<{ zone: ZoneDetail }>(zonePath(siteId, zoneId))).zone;
}

/** Acknowledges an open zone with an optional note (site managers, admins); 409 when it is not open. */
export async function acknowledgeZone(siteId: string, zoneId: string, note: string): Promise<Zone> {
  return (await apiRequest<{ zone: Zone }>(`${zonePath(siteId, zoneId)}/acknowledge`, { method: 'POST', body: { note } })).zone;
}

/** Dismisses a zone with a reason (mappers, admins), so that the same area does not return every night. */
export async function dismissZone(siteId: string, zoneId: string, reason: string): Promise<Zone> {
  return (await apiRequest<{ zone: Zone }>(`${zonePath(siteId, zoneId)}/dismiss`, { method: 'POST', body: { reason } })).zone;
}
