/** Shapes of the API's JSON, as the foundation contract describes them. Timestamps are ISO 8601 strings. */

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

/** Health figures arrive with a later issue; until then the server sends null. */
export type SiteHealth = null;

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
