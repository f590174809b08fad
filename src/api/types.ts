/** Shapes of the API's JSON, as the foundation contract describes them. Timestamps are ISO 8601 strings. */

import type { HealthBand, HealthForecast as TrendForecast } from '../../shared/health/score';

export type Role = 'admin' | 'mapper' | 'site_manager' | 'viewer';
export type OrganizationKind = 'operator' | 'customer';

export interface OrganizationRef {
  id: string;
  name: string;
}

export interface Me {
  id: string;
  email: string;
  name: string;
  role: Role;
  organization: OrganizationRef & { kind: OrganizationKind };
}

export interface Organization {
  id: string;
  name: string;
  kind: OrganizationKind;
  timezone: string;
  siteCount: number;
  userCount: number;
  createdAt: string;
}

export type UserStatus = 'active' | 'disabled';

export interface UserRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  organization: OrganizationRef;
  status: UserStatus;
  lastSignInAt: string | null;
  createdAt: string;
}

export interface Invitation {
  id: string;
  email: string;
  name: string;
  role: Role;
  organization: OrganizationRef;
  createdAt: string;
  expiresAt: string;
  acceptedAt: string | null;
  invitedBy: { id: string; name: string };
}

/** What the public invitation look-up reveals about an invitation before it is accepted. */
export interface InvitationPreview {
  email: string;
  name: string;
  role: Role;
  organization: { name: string };
  expiresAt: string;
}

/** A site's health band: the score against the site's limits (product defaults ≥ 97 good, 90–97 watch). */
export type { HealthBand };

/** One complete site-local day of the health series: score in percent (null without returns) and returns counted. */
export interface HealthDay {
  day: string;
  score: number | null;
  returns: number;
}

/**
 * The fitted trend of the daily score (slope in points per day, days from the last complete day
 * to the "remap advised" limit: 0 = already there, null = not falling; JSON turns an unbounded
 * range into null) with the limit in percent and the site-local dates those days give.
 */
export interface HealthForecast extends TrendForecast {
  threshold: number;
  crossesOn: string | null;
  earliestOn: string | null;
  latestOn: string | null;
}

/** Zones of a site still to deal with (open, acknowledged or planned), counted by kind. */
export interface ZoneCounts {
  new: number;
  missing: number;
  unmapped: number;
}

/** A site's map health: score in percent over the last 7 complete days, its band, trend and what is open. */
export interface SiteHealth {
  score: number | null;
  band: HealthBand | null;
  bands: { goodMin: number; watchMin: number };
  sentence: string;
  /** Points against the 7 days before; null when either week had no returns. */
  change7d: number | null;
  returns7d: number;
  series: HealthDay[];
  forecast: HealthForecast | null;
  openZones: ZoneCounts;
  changedAreaM2: number;
  flaggedRobots: number;
  /** The earliest scheduled or running remap whose window has not ended (instants ISO). */
  nextRemap: { id: string; number: number; title: string; status: 'scheduled' | 'in_progress'; start: string; end: string } | null;
  /** Remap requests proposed and not yet scheduled. */
  remapsWaiting: number;
}

export interface Site {
  id: string;
  name: string;
  city: string;
  timezone: string;
  organization: OrganizationRef;
  robotCount: number;
  health: SiteHealth;
}

/** A scanner's pose in the robot frame: x, y in metres, yaw in radians. */
export interface Mount {
  name: string;
  x: number;
  y: number;
  yaw: number;
}

export interface Robot {
  id: string;
  siteId: string;
  name: string;
  model: string;
  mounts: Mount[];
  activeTokenCount: number;
  createdAt: string;
}

export interface RobotToken {
  id: string;
  label: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  createdBy: { id: string; name: string } | null;
}

export interface AuditEvent {
  id: string;
  at: string;
  actor: { id: string; name: string } | null;
  action: string;
  targetType: string;
  targetId: string;
  summary: string;
}
