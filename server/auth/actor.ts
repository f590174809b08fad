import type { Role } from '../entities/user.entity.js';

/** The signed-in person a service acts for; every scoped query starts from it. */
export interface Actor {
  id: string;
  email: string;
  name: string;
  role: Role;
  organizationId: string;
}

/** True for the operator roles, which see every organization's sites. */
export const isOperator = (actor: Pick<Actor, 'role'>): boolean => actor.role === 'admin' || actor.role === 'mapper';
