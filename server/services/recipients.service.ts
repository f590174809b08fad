import { createHmac, timingSafeEqual } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { Organization, Recipient } from '../entities/index.js';
import { badRequest, conflict, forbidden, notFound } from '../http-error.js';
import type { AuditService } from './audit.service.js';
import { newId } from './ids.js';

/** The unsubscribe token of a recipient: its id, a dot, and an HMAC-SHA256 of the id under the app secret. */
export function unsubscribeToken(secret: string, recipientId: string): string {
  return `${recipientId}.${signature(secret, recipientId)}`;
}

function signature(secret: string, recipientId: string): string {
  return createHmac('sha256', secret).update(`unsubscribe:${recipientId}`).digest('base64url');
}

/** The recipient id a token names when its signature holds; null otherwise. */
export function readUnsubscribeToken(secret: string, token: string): string | null {
  const dot = token.lastIndexOf('.');
  if (dot <= 0) return null;
  const id = token.slice(0, dot);
  const given = Buffer.from(token.slice(dot + 1));
  const expected = Buffer.from(signature(secret, id));
  return given.length === expected.length && timingSafeEqual(given, expected) ? id : null;
}

export type RecipientView = ReturnType<typeof recipientView>;

/** Who receives an organization's monthly report; site managers of the organization and admins keep the list. */
export class RecipientsService {
  constructor(
    private readonly db: DataSource,
    private readonly audit: AuditService,
    private readonly secret: string,
    private readonly baseUrl: string,
  ) {}

  /** The organization if the actor may keep its recipients and read its reports: admins any, site managers their own (404 for others). */
  async organizationFor(actor: Actor, organizationId: string): Promise<Organization> {
    if (actor.role !== 'admin' && actor.role !== 'site_manager' && actor.role !== 'viewer') throw forbidden();
    const org = await this.db.getRepository(Organization).findOneBy({ id: organizationId });
    if (!org || (actor.role !== 'admin' && actor.organizationId !== org.id)) throw notFound('The organization');
    if (org.kind !== 'customer') throw badRequest('Monthly reports are for customer organizations.');
    return org;
  }

  private async keeperOf(actor: Actor, organizationId: string) {
    if (actor.role === 'viewer') throw forbidden('Site managers and admins keep the report recipients.');
    return this.organizationFor(actor, organizationId);
  }

  /** Every recipient of the organization, active first, with the last report mail's delivery state. */
  async list(actor: Actor, organizationId: string) {
    const org = await this.keeperOf(actor, organizationId);
    const rows = await this.db.getRepository(Recipient).find({ where: { organizationId: org.id }, relations: { createdBy: true }, order: { email: 'ASC' } });
    const deliveries = await this.lastDeliveries(org.id);
    return rows
      .sort((a, b) => Number(a.unsubscribedAt !== null) - Number(b.unsubscribedAt !== null))
      .map((r) => ({ ...recipientView(r), lastDelivery: deliveries.get(r.email) ?? null }));
  }

  /** The latest report mail per address of the organization: month, status and error. */
  private async lastDeliveries(organizationId: string) {
    const rows = (await this.db.query(
      `SELECT m.to_email AS email, m.status AS status, m.last_error AS error, m.sent_at AS sentAt, r.month AS month FROM outgoing_mail m JOIN monthly_reports r ON r.id = m.report_id
       WHERE m.organization_id = ? AND m.kind = 'report' ORDER BY r.month ASC, m.created_at ASC`,
      [organizationId],
    )) as Array<{ email: string; status: string; error: string | null; sentAt: string | null; month: string }>;
    return new Map(rows.map((r) => [r.email.toLowerCase(), { month: r.month, status: r.status, error: r.error }]));
  }

  async add(actor: Actor, organizationId: string, input: { email: string; name?: string }) {
    const org = await this.keeperOf(actor, organizationId);
    const email = input.email.trim().toLowerCase();
    const repo = this.db.getRepository(Recipient);
    const existing = await repo.findOneBy({ organizationId: org.id, email });
    if (existing?.unsubscribedAt) throw conflict(`${email} unsubscribed from the monthly report on ${existing.unsubscribedAt.toISOString().slice(0, 10)} and is kept off the list.`);
    if (existing) throw conflict(`${email} already receives the monthly report of ${org.name}.`);
    const id = newId();
    await this.db.transaction(async (m) => {
      await m.insert(Recipient, { id, organizationId: org.id, email, name: input.name?.trim() ?? '', createdById: actor.id, unsubscribedAt: null });
      await this.audit.record(actor, { action: 'recipient.add', targetType: 'report_recipient', targetId: id, organizationId: org.id, summary: `${actor.name} added ${email} to the monthly report of ${org.name}.` }, m);
    });
    return recipientView(await repo.findOneOrFail({ where: { id }, relations: { createdBy: true } }));
  }

  async remove(actor: Actor, organizationId: string, recipientId: string) {
    const org = await this.keeperOf(actor, organizationId);
    const r = await this.db.getRepository(Recipient).findOneBy({ id: recipientId, organizationId: org.id });
    if (!r) throw notFound('The recipient');
    await this.db.transaction(async (m) => {
      await m.delete(Recipient, r.id);
      await this.audit.record(actor, { action: 'recipient.remove', targetType: 'report_recipient', targetId: r.id, organizationId: org.id, summary: `${actor.name} removed ${r.email} from the monthly report of ${org.name}.` }, m);
    });
  }

  /** Recipients who still want the report. */
  async active(organizationId: string): Promise<Recipient[]> {
    return (await this.db.getRepository(Recipient).find({ where: { organizationId }, order: { email: 'ASC' } })).filter((r) => r.unsubscribedAt === null);
  }

  /** The page a report mail links to for its recipient: it shows whom the link names and asks before it unsubscribes. */
  unsubscribeLink(recipientId: string): string {
    return `${this.baseUrl}/unsubscribe/${unsubscribeToken(this.secret, recipientId)}`;
  }

  /** The address a mail client POSTs to for a one-click unsubscribe (the List-Unsubscribe header, RFC 8058). */
  oneClickLink(recipientId: string): string {
    return `${this.baseUrl}/api/unsubscribe/${unsubscribeToken(this.secret, recipientId)}`;
  }

  /** The recipient a signed link names (400 when the signature does not hold, 404 when the recipient was removed). */
  private async byToken(token: string) {
    const id = readUnsubscribeToken(this.secret, token);
    if (!id) throw badRequest('This unsubscribe link is not valid. Copy the whole link from the e-mail.');
    const r = await this.db.getRepository(Recipient).findOne({ where: { id }, relations: { organization: true } });
    if (!r) throw notFound('The recipient of this link');
    return r;
  }

  /** Whom a signed link names and whether they already unsubscribed; reading it changes nothing (link scanners open links). */
  async describe(token: string) {
    const r = await this.byToken(token);
    return { email: r.email, organization: r.organization.name, unsubscribedAt: r.unsubscribedAt?.toISOString() ?? null };
  }

  /** Records an unsubscribe from a signed link (no sign-in); a second one keeps the first date and says so. */
  async unsubscribe(token: string, now = new Date()) {
    const r = await this.byToken(token);
    const already = r.unsubscribedAt !== null;
    if (!already) {
      await this.db.transaction(async (m) => {
        // Guarded on the column so that two requests at once record and audit one unsubscribe.
        const done = await m.createQueryBuilder().update(Recipient).set({ unsubscribedAt: now }).where('id = :id AND unsubscribed_at IS NULL', { id: r.id }).execute();
        if (done.affected !== 1) return;
        await this.audit.record(null, { action: 'recipient.unsubscribe', targetType: 'report_recipient', targetId: r.id, organizationId: r.organizationId, summary: `${r.email} unsubscribed from the monthly report of ${r.organization.name}.` }, m);
      });
    }
    const after = await this.db.getRepository(Recipient).findOneByOrFail({ id: r.id });
    return { email: r.email, organization: r.organization.name, unsubscribedAt: after.unsubscribedAt!.toISOString(), already };
  }
}

export function recipientView(r: Recipient) {
  return {
    id: r.id,
    email: r.email,
    name: r.name,
    createdAt: r.createdAt.toISOString(),
    createdBy: r.createdBy ? { id: r.createdBy.id, name: r.createdBy.name } : null,
    unsubscribedAt: r.unsubscribedAt?.toISOString() ?? null,
  };
}
