import type { Logger } from 'pino';
import { IsNull, MoreThan, MoreThanOrEqual, type DataSource, type EntityManager } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { hashPassword, passwordProblem } from '../auth/password.js';
import type { Sessions } from '../auth/sessions.js';
import { Organization, PasswordResetToken, User } from '../entities/index.js';
import { HttpError } from '../http-error.js';
import { renderMail } from '../mail/render.js';
import type { AuditService } from './audit.service.js';
import { newId, newSecret, sha256 } from './ids.js';
import type { MailService } from './mail.service.js';

/** A reset link works for one hour (product choice, within the common practice of short-lived reset links). */
export const RESET_LINK_MS = 60 * 60_000;
/** At most this many reset mails per account per hour; further requests send nothing (product choice). */
export const RESET_REQUESTS_PER_HOUR = 3;

/** The one answer for a link that is unknown, expired, replaced or used: the page cannot tell them apart. */
const linkGone = () => new HttpError(400, 'reset_link_invalid', 'This reset link is not valid or has expired. Ask for a new one from the sign-in page.');

/** Ends every open link of the user at `now`; the rows stay, as the hourly limit counts them. */
const endOpenLinks = (m: EntityManager, userId: string, now: Date) =>
  m.createQueryBuilder().update(PasswordResetToken).set({ expiresAt: now }).where('user_id = :user AND used_at IS NULL AND expires_at > :now', { user: userId, now }).execute();

const utc = (d: Date) => `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;

/**
 * Password reset by e-mail: a single-use link valid for one hour. Requests answer alike whether
 * or not the address has an account; a completed reset closes every session of the account.
 */
export class PasswordResetService {
  private readonly inFlight = new Set<Promise<void>>();

  constructor(
    private readonly db: DataSource,
    private readonly sessions: Sessions,
    private readonly audit: AuditService,
    private readonly mail: MailService,
    private readonly baseUrl: string,
    private readonly log: Logger,
  ) {}

  /**
   * Starts handling a reset request without waiting for it, so the caller answers at once and
   * equally fast whether or not the address has an account (no timing hint). `settled()` waits.
   */
  requestInBackground(email: string, ip: string | null): void {
    const work = this.request(email, ip).then(
      () => undefined,
      (err: unknown) => this.log.error({ err }, 'password reset request failed'),
    );
    this.inFlight.add(work);
    void work.finally(() => this.inFlight.delete(work));
  }

  /** Resolves when the requests started by `requestInBackground` have finished. */
  async settled(): Promise<void> {
    while (this.inFlight.size > 0) await Promise.all([...this.inFlight]);
  }

  /**
   * For an active account with that address: replaces its open links with a new one and queues
   * the mail with it. Returns whether a mail was queued; callers must not tell the requester.
   */
  async request(email: string, ip: string | null, now = new Date()): Promise<boolean> {
    const user = await this.db.getRepository(User).findOne({ where: { email: email.toLowerCase() }, relations: { organization: true } });
    if (!user || user.status !== 'active') return false;
    const token = newSecret();
    const created = await this.db.transaction(async (m) => {
      const recent = await m.countBy(PasswordResetToken, { userId: user.id, createdAt: MoreThanOrEqual(new Date(now.getTime() - RESET_LINK_MS)) });
      if (recent >= RESET_REQUESTS_PER_HOUR) return null;
      // Only the newest link works: earlier open ones end now.
      await endOpenLinks(m, user.id, now);
      const row = m.create(PasswordResetToken, { id: newId(), userId: user.id, tokenHash: sha256(token), expiresAt: new Date(now.getTime() + RESET_LINK_MS), usedAt: null, createdAt: now, requestedFrom: ip });
      await m.save(row);
      return row;
    });
    if (!created) {
      this.log.info({ userId: user.id }, 'password reset request over the hourly limit; no mail sent');
      return false;
    }
    const { html, text } = await renderMail('password_reset', {
      name: user.name,
      email: user.email,
      link: `${this.baseUrl}/reset/${token}`,
      expires: utc(created.expiresAt),
      contact: await this.contactFor(user),
    });
    await this.mail.enqueue({ dedupeKey: `password-reset:${created.id}`, kind: 'password_reset', organizationId: user.organizationId, to: { email: user.email, name: user.name }, subject: 'Reset your Driftline password', html, text });
    return true;
  }

  /** Throws the 400 "not valid or has expired" unless the link can still set a password. */
  async check(token: string, now = new Date()): Promise<void> {
    await this.findOpen(token, now);
  }

  /**
   * Sets the new password through the link: once only (a guarded UPDATE decides between two
   * concurrent uses), closes every session of the account, audits it and mails a notice.
   */
  async reset(token: string, password: string, now = new Date()): Promise<void> {
    const open = await this.findOpen(token, now);
    const owner = await this.db.getRepository(User).findOneBy({ id: open.userId });
    const problem = owner ? passwordProblem(password, owner.email) : null;
    if (problem) throw new HttpError(400, 'invalid_request', `The new password ${problem}.`);
    const passwordHash = await hashPassword(password);
    const user = await this.db.transaction(async (m) => {
      const claimed = await m
        .createQueryBuilder()
        .update(PasswordResetToken)
        .set({ usedAt: now })
        .where('id = :id AND used_at IS NULL AND expires_at > :now', { id: open.id, now })
        .execute();
      if (claimed.affected !== 1) throw linkGone();
      const u = await m.findOne(User, { where: { id: open.userId }, relations: { organization: true } });
      if (!u || u.status !== 'active') throw linkGone();
      await m.update(User, u.id, { passwordHash });
      // Any other link of the account ends with this reset.
      await endOpenLinks(m, u.id, now);
      // The session store shares this connection, so closing the sessions is part of the transaction.
      await this.sessions.invalidateUserSessions(u.id);
      const actor: Actor = { id: u.id, email: u.email, name: u.name, role: u.role, organizationId: u.organizationId };
      await this.audit.record(actor, { action: 'user.password_reset', targetType: 'user', targetId: u.id, organizationId: u.organizationId, summary: `${u.name} set a new password through an e-mailed reset link; every session of the account was closed.` }, m);
      return u;
    });
    const { html, text } = await renderMail('password_changed', {
      name: user.name,
      email: user.email,
      changed: utc(now),
      signInLink: `${this.baseUrl}/sign-in`,
      contact: await this.contactFor(user),
    });
    await this.mail.enqueue({ dedupeKey: `password-changed:${open.id}`, kind: 'password_reset', organizationId: user.organizationId, to: { email: user.email, name: user.name }, subject: 'Your Driftline password was changed', html, text });
  }

  private async findOpen(token: string, now: Date) {
    const row = await this.db.getRepository(PasswordResetToken).findOneBy({ tokenHash: sha256(token), usedAt: IsNull(), expiresAt: MoreThan(now) });
    if (!row) throw linkGone();
    return row;
  }

  /** Whom the mail tells the reader to contact about a reset they did not ask for. */
  private async contactFor(user: User): Promise<string> {
    const operator = await this.db.getRepository(Organization).findOneBy({ kind: 'operator' });
    const operatorName = operator?.name ?? 'the fleet operator';
    return user.organization.kind === 'operator' ? `a Driftline administrator at ${operatorName}` : `your organization's contact at ${operatorName}`;
  }
}
