import type { OrganizationKind, Role } from '@/api/types';

/** Every role, in the order people think of them (operator side first). */
export const allRoles: readonly Role[] = ['admin', 'mapper', 'site_manager', 'viewer'];

const labels: Record<Role, string> = {
  admin: 'Admin',
  mapper: 'Mapper',
  site_manager: 'Site manager',
  viewer: 'Viewer',
};

/** Returns the readable name of a role ("Site manager"). */
export function roleLabel(role: Role): string {
  return labels[role];
}

/** Returns true for roles of the operator organization, who see every customer's sites. */
export function isOperatorRole(role: Role): boolean {
  return role === 'admin' || role === 'mapper';
}

/** Returns true when the role may add robots and create or revoke their ingest tokens. */
export function canManageRobots(role: Role): boolean {
  return role === 'admin' || role === 'mapper' || role === 'site_manager';
}

/** Returns the roles a member of an organization of this kind may have. */
export function rolesForOrganizationKind(kind: OrganizationKind): Role[] {
  return kind === 'operator' ? ['admin', 'mapper'] : ['site_manager', 'viewer'];
}

/** Returns true when the role may acknowledge a changed zone (the server checks again). */
export function canAcknowledgeZones(role: Role): boolean {
  return role === 'admin' || role === 'site_manager';
}

/** Returns true when the role may dismiss a changed zone with a reason, e.g. a volatile area (the server checks again). */
export function canDismissZones(role: Role): boolean {
  return role === 'admin' || role === 'mapper';
}
