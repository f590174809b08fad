import type { DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { hashPassword, passwordProblem, verifyAgainstDummy, verifyPassword } from '../auth/password.js';
import type { Sessions } from '../auth/sessions.js';
import { Organization, User } from '../entities/index.js';
import type { Role, UserStatus } from '../entities/user.entity.js';
import { CUSTOMER_ROLES, OPERATOR_ROLES } from '../entities/user.entity.js';
import { badRequest, HttpError, notFound } from '../http-error.js';
import type { AuditService } from './audit.service.js';

/** The signed-in user as the client sees it. */
export function meView(user: User, org: Organization) {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    organization: { id: org.id, name: org.name, kind: org.kind },
  };
}

function userRow(u: User) {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    role: u.role,
    organization: { id: u.organization.id, name: u.organization.name },
    status: u.status,
    lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
    createdAt: u.createdAt.toISOString(),
  };
}

/** True when the role belongs to that kind of organization (DESIGN.md §2). */
export function roleFitsOrganization(role: Role, kind: Organization['kind']): boolean {
  return kind === 'operator' ? OPERATOR_ROLES.includes(role) : CUSTOMER_ROLES.includes(role);
}

const INVALID_CREDENTIALS = new HttpError(401, 'invalid_credentials', 'The e-mail or password is not correct.');

/** Sign-in, passwords and the admin's user list. */
export class UsersService {
  constructor(
    private readonly db: DataSource,
    private readonly sessions: Sessions,
    private readonly audit: AuditService,
  ) {}

  /** Checks the credentials and opens a session; unknown e-mail and wrong password answer alike. */
  async signIn(email: string, password: string) {
    const user = await this.db.getRepository(User).findOne({ where: { email: email.toLowerCase() }, relations: { organization: true } });
    const ok = user ? await verifyPassword(user.passwordHash, password) : await verifyAgainstDummy(password);
    if (!user || !ok || user.status !== 'active') throw INVALID_CREDENTIALS;
    await this.db.getRepository(User).update(user.id, { lastSignInAt: new Date() });
    return { session: await this.openSession(user.id), user: meView(user, user.organization) };
  }

  /** A new session for the user; a fresh id every time, so a planted cookie is never promoted. */
  async openSession(userId: string) {
    const session = await this.sessions.createSession(userId, {});
    return this.sessions.createSessionCookie(session.id);
  }

  /** Closes one session. */
  async signOut(sessionId: string) {
    await this.sessions.invalidateSession(sessionId);
    return this.sessions.createBlankSessionCookie();
  }

  /** The current user with their organization. */
  async me(actor: Actor) {
    const user = await this.db.getRepository(User).findOne({ where: { id: actor.id }, relations: { organization: true } });
    if (!user) throw new HttpError(401, 'unauthenticated', 'Please sign in first.');
    return meView(user, user.organization);
  }

  /** Changes the password after checking the current one; other sessions of the user are closed. */
  async changePassword(actor: Actor, sessionId: string, currentPassword: string, newPassword: string) {
    const repo = this.db.getRepository(User);
    const user = await repo.findOneByOrFail({ id: actor.id });
    if (!(await verifyPassword(user.passwordHash, currentPassword))) {
      throw new HttpError(401, 'invalid_credentials', 'The current password is not correct.');
    }
    if (currentPassword === newPassword) throw badRequest('The new password must differ from the current one.');
    const problem = passwordProblem(newPassword, user.email);
    if (problem) throw badRequest(`The new password ${problem}.`);
    await repo.update(user.id, { passwordHash: await hashPassword(newPassword) });
    const sessions = await this.sessions.getUserSessions(user.id);
    await Promise.all(sessions.filter((s) => s.id !== sessionId).map((s) => this.sessions.invalidateSession(s.id)));
    await this.audit.record(actor, { action: 'user.password_change', targetType: 'user', targetId: user.id, organizationId: user.organizationId, summary: `${user.name} changed their password.` });
  }

  /** Every user with organization, for admins. */
  async list() {
    const users = await this.db.getRepository(User).find({ relations: { organization: true }, order: { createdAt: 'ASC' } });
    return users.map(userRow);
  }

  /** Changes a user's role or status; an admin cannot demote or disable themselves. */
  async update(actor: Actor, userId: string, patch: { role?: Role; status?: UserStatus }) {
    const repo = this.db.getRepository(User);
    const user = await repo.findOne({ where: { id: userId }, relations: { organization: true } });
    if (!user) throw notFound('The user');
    if (user.id === actor.id && ((patch.role && patch.role !== user.role) || patch.status === 'disabled')) {
      throw badRequest('You cannot change your own role or disable yourself; ask another admin.');
    }
    if (patch.role && !roleFitsOrganization(patch.role, user.organization.kind)) {
      throw badRequest(`The role ${patch.role} does not fit a ${user.organization.kind} organization.`);
    }
    await this.db.transaction(async (m) => {
      await m.update(User, user.id, { ...patch });
      await this.audit.record(actor, {
        action: 'user.update',
        targetType: 'user',
        targetId: user.id,
        organizationId: user.organizationId,
        summary: `${actor.name} changed ${user.name}: ${Object.entries(patch).map(([k, v]) => `${k} → ${v}`).join(', ')}.`,
        details: patch,
      }, m);
    });
    if (patch.status === 'disabled') await this.sessions.invalidateUserSessions(user.id);
    return userRow({ ...user, ...patch } as User);
  }
}
