import type { Logger } from 'pino';
import { IsNull, MoreThan, type DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { hashPassword, passwordProblem } from '../auth/password.js';
import { Invitation, Organization, User } from '../entities/index.js';
import type { Role } from '../entities/user.entity.js';
import { badRequest, conflict, HttpError, notFound } from '../http-error.js';
import { renderMail } from '../mail/render.js';
import type { AuditService } from './audit.service.js';
import type { MailService } from './mail.service.js';
import { newId, newSecret, sha256 } from './ids.js';
import { meView, roleFitsOrganization } from './users.service.js';

/** Invitation links stay valid for seven days (product choice). */
const INVITATION_DAYS = 7;

function invitationView(inv: Invitation) {
  return {
    id: inv.id,
    email: inv.email,
    name: inv.name,
    role: inv.role,
    organization: { id: inv.organization.id, name: inv.organization.name },
    createdAt: inv.createdAt.toISOString(),
    expiresAt: inv.expiresAt.toISOString(),
    acceptedAt: inv.acceptedAt?.toISOString() ?? null,
    invitedBy: inv.invitedBy ? { id: inv.invitedBy.id, name: inv.invitedBy.name } : null,
  };
}

/** Admin-issued invitations: a link that lets a new user set a password. */
export class InvitationsService {
  constructor(
    private readonly db: DataSource,
    private readonly audit: AuditService,
    private readonly baseUrl: string,
    private readonly log: Logger,
    private readonly mail: MailService,
  ) {}

  /** Creates an invitation and returns it with its one-time link (shown to the admin) and queues the invitation mail with it. */
  async create(actor: Actor, input: { email: string; name: string; role: Role; organizationId: string }) {
    const email = input.email.toLowerCase();
    const org = await this.db.getRepository(Organization).findOneBy({ id: input.organizationId });
    if (!org) throw notFound('The organization');
    if (!roleFitsOrganization(input.role, org.kind)) {
      throw badRequest(`The role ${input.role} does not fit the ${org.kind} organization ${org.name}.`);
    }
    if (await this.db.getRepository(User).existsBy({ email })) throw conflict(`A user with the e-mail ${email} already exists.`);
    const token = newSecret();
    const invitation = await this.db.transaction(async (m) => {
      const open = await m.findOne(Invitation, { where: { email, acceptedAt: IsNull(), revokedAt: IsNull(), expiresAt: MoreThan(new Date()) } });
      if (open) throw conflict(`${email} already has an open invitation; revoke it first to send a new one.`);
      const inv = m.create(Invitation, {
        id: newId(),
        email,
        name: input.name,
        role: input.role,
        organizationId: org.id,
        tokenHash: sha256(token),
        invitedById: actor.id,
        expiresAt: new Date(Date.now() + INVITATION_DAYS * 86_400_000),
      });
      await m.save(inv);
      await this.audit.record(actor, { action: 'user.invite', targetType: 'invitation', targetId: inv.id, organizationId: org.id, summary: `${actor.name} invited ${email} to ${org.name} as ${input.role}.` }, m);
      return inv;
    });
    const link = `${this.baseUrl}/invite/${token}`;
    this.log.info({ email, organization: org.name, role: input.role }, 'invitation link created');
    const { html, text } = await renderMail('invitation', {
      name: input.name,
      invitedBy: actor.name,
      organization: org.name,
      roleLabel: input.role.replace('_', ' '),
      link,
      expires: invitation.expiresAt.toISOString().slice(0, 16).replace('T', ' ') + ' UTC',
    });
    await this.mail.enqueue({ dedupeKey: `invitation:${invitation.id}`, kind: 'invitation', organizationId: org.id, to: { email, name: input.name }, subject: `You are invited to ${org.name} on Driftline`, html, text });
    const saved = await this.db.getRepository(Invitation).findOneOrFail({ where: { id: invitation.id }, relations: { organization: true, invitedBy: true } });
    return { invitation: invitationView(saved), link };
  }

  /** Open and recently accepted invitations, newest first. */
  async list() {
    const rows = await this.db.getRepository(Invitation).find({ where: { revokedAt: IsNull() }, relations: { organization: true, invitedBy: true }, order: { createdAt: 'DESC' }, take: 200 });
    return rows.map(invitationView);
  }

  /** Revokes an open invitation; its link stops working. */
  async revoke(actor: Actor, id: string) {
    const inv = await this.db.getRepository(Invitation).findOneBy({ id, revokedAt: IsNull() });
    if (!inv) throw notFound('The invitation');
    if (inv.acceptedAt) throw conflict('This invitation was already accepted; disable the user instead.');
    await this.db.transaction(async (m) => {
      await m.update(Invitation, inv.id, { revokedAt: new Date() });
      await this.audit.record(actor, { action: 'invitation.revoke', targetType: 'invitation', targetId: inv.id, organizationId: inv.organizationId, summary: `${actor.name} revoked the invitation of ${inv.email}.` }, m);
    });
  }

  private async findOpen(token: string) {
    const inv = await this.db.getRepository(Invitation).findOne({
      where: { tokenHash: sha256(token), acceptedAt: IsNull(), revokedAt: IsNull(), expiresAt: MoreThan(new Date()) },
      relations: { organization: true },
    });
    if (!inv) throw new HttpError(404, 'not_found', 'This invitation link is unknown, expired or already used.');
    return inv;
  }

  /** What the invitation page shows before a password is set. */
  async describe(token: string) {
    const inv = await this.findOpen(token);
    return { email: inv.email, name: inv.name, role: inv.role, organization: { name: inv.organization.name }, expiresAt: inv.expiresAt.toISOString() };
  }

  /** Creates the user with the chosen password and marks the invitation used; returns the new user. */
  async accept(token: string, password: string) {
    const inv = await this.findOpen(token);
    const problem = passwordProblem(password, inv.email);
    if (problem) throw badRequest(`The password ${problem}.`);
    const passwordHash = await hashPassword(password);
    const user = await this.db.transaction(async (m) => {
      // Re-check inside the transaction: two clicks on the same link create one user.
      const still = await m.findOneBy(Invitation, { id: inv.id, acceptedAt: IsNull() });
      if (!still) throw new HttpError(404, 'not_found', 'This invitation link is unknown, expired or already used.');
      if (await m.existsBy(User, { email: inv.email })) throw conflict(`A user with the e-mail ${inv.email} already exists.`);
      const u = m.create(User, { id: newId(), email: inv.email, name: inv.name, role: inv.role, organizationId: inv.organizationId, passwordHash, status: 'active', lastSignInAt: new Date() });
      await m.save(u);
      await m.update(Invitation, inv.id, { acceptedAt: new Date() });
      await this.audit.record({ id: u.id, email: u.email, name: u.name, role: u.role, organizationId: u.organizationId }, { action: 'user.join', targetType: 'user', targetId: u.id, organizationId: u.organizationId, summary: `${u.name} accepted the invitation and joined ${inv.organization.name}.` }, m);
      return u;
    });
    return { userId: user.id, me: meView(user, inv.organization) };
  }
}
