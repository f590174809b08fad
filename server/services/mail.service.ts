import type { Logger } from 'pino';
import { In, type DataSource } from 'typeorm';
import { OutgoingMail } from '../entities/index.js';
import type { MailKind, StoredAttachment } from '../entities/outgoing-mail.entity.js';
import type { Actor } from '../auth/actor.js';
import type { MailTransport } from '../mail/transport.js';
import { newId } from './ids.js';

/** Delivery attempts per mail before it is marked failed (product choice). */
export const MAIL_ATTEMPTS = 5;
/** Wait after failed attempt n (1-based) before the next one: 1, 5, 25, 125 minutes. */
export const retryDelayMs = (attempt: number): number => 60_000 * 5 ** (attempt - 1);
/** A row claimed for sending longer ago than this was left by a crash and is queued again. */
export const STALE_SENDING_MS = 10 * 60_000;
/** Rows one delivery run takes on. */
const BATCH = 50;

export interface MailInput {
  dedupeKey: string;
  kind: MailKind;
  organizationId?: string | null;
  to: { email: string; name?: string | null };
  subject: string;
  html: string;
  text: string;
  attachments?: Array<{ filename: string; contentType: string; content: Buffer; cid?: string }>;
  reportId?: string | null;
  /** Extra header lines, name → value; kept with the row so every attempt sends the same ones. */
  headers?: Record<string, string>;
}

function mailView(m: OutgoingMail) {
  return {
    id: m.id,
    kind: m.kind,
    organizationId: m.organizationId,
    to: { email: m.toEmail, name: m.toName },
    subject: m.subject,
    status: m.status,
    attempts: m.attempts,
    nextAttemptAt: m.status === 'queued' ? m.nextAttemptAt.toISOString() : null,
    lastError: m.lastError,
    sentAt: m.sentAt?.toISOString() ?? null,
    messageId: m.messageId,
    createdAt: m.createdAt.toISOString(),
    attachments: m.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType })),
  };
}

/**
 * The mail queue: one row per recipient, unique per dedupe key (the database guarantees a mail is
 * queued once), delivered by claiming each row with a guarded UPDATE so two runs never send one row.
 */
export class MailService {
  private transport: MailTransport;
  private readonly prompt = new Set<Promise<unknown>>();
  /** Whether enqueue starts a delivery attempt right away (the job still picks up anything left). */
  promptDelivery = true;

  constructor(
    private readonly db: DataSource,
    private readonly from: string,
    transport: MailTransport,
    private readonly log: Logger,
  ) {
    this.transport = transport;
  }

  /** Replaces the transport (tests use a failing one). */
  useTransport(transport: MailTransport) {
    this.transport = transport;
  }

  /** Queues one mail; a second call with the same dedupe key returns the first row with created=false. */
  async enqueue(m: MailInput): Promise<{ mail: OutgoingMail; created: boolean }> {
    const id = newId();
    const domain = /@([^>\s]+)>?\s*$/.exec(this.from)?.[1] ?? 'localhost';
    const attachments: StoredAttachment[] = (m.attachments ?? []).map((a) => ({
      filename: a.filename,
      contentType: a.contentType,
      ...(a.cid ? { cid: a.cid } : {}),
      contentBase64: a.content.toString('base64'),
    }));
    const result = await this.db.transaction(async (tx) => {
      // INSERT … ON CONFLICT DO NOTHING: the unique dedupe key decides, not a read before the write.
      await tx
        .createQueryBuilder()
        .insert()
        .into(OutgoingMail)
        .values({
          id,
          dedupeKey: m.dedupeKey,
          kind: m.kind,
          organizationId: m.organizationId ?? null,
          toEmail: m.to.email.toLowerCase(),
          toName: m.to.name ?? null,
          subject: m.subject,
          html: m.html,
          text: m.text,
          attachments,
          status: 'queued',
          attempts: 0,
          nextAttemptAt: new Date(),
          claimedAt: null,
          lastError: null,
          sentAt: null,
          messageId: `<${id}@${domain}>`,
          reportId: m.reportId ?? null,
          headers: m.headers && Object.keys(m.headers).length > 0 ? m.headers : null,
        })
        .orIgnore()
        .execute();
      const mail = await tx.findOneByOrFail(OutgoingMail, { dedupeKey: m.dedupeKey });
      return { mail, created: mail.id === id };
    });
    if (result.created && this.promptDelivery) {
      const attempt = this.deliverIds([result.mail.id], new Date()).catch((err) => this.log.warn({ err }, 'prompt mail delivery failed; the mail job retries'));
      this.prompt.add(attempt);
      void attempt.finally(() => this.prompt.delete(attempt));
    }
    return result;
  }

  /** Resolves when the prompt delivery attempts started by enqueue have finished. */
  async settled(): Promise<void> {
    while (this.prompt.size > 0) await Promise.all([...this.prompt]);
  }

  /** Sends every due queued mail; returns how many were sent and how many failed this run. */
  async deliverDue(now: Date = new Date()): Promise<{ sent: number; retried: number; failed: number }> {
    // A crash between claiming and finishing leaves a row 'sending': after a while it is due again.
    await this.db
      .createQueryBuilder()
      .update(OutgoingMail)
      .set({ status: 'queued', claimedAt: null })
      .where('status = :sending AND claimed_at < :stale', { sending: 'sending', stale: new Date(now.getTime() - STALE_SENDING_MS) })
      .execute();
    const due = await this.db
      .getRepository(OutgoingMail)
      .createQueryBuilder('m')
      .select('m.id', 'id')
      .where('m.status = :queued AND m.next_attempt_at <= :now', { queued: 'queued', now })
      .orderBy('m.next_attempt_at', 'ASC')
      .limit(BATCH)
      .getRawMany<{ id: string }>();
    return this.deliverIds(due.map((d) => d.id), now);
  }

  private async deliverIds(ids: string[], now: Date) {
    const counts = { sent: 0, retried: 0, failed: 0 };
    for (const id of ids) {
      const outcome = await this.deliverOne(id, now);
      if (outcome) counts[outcome]++;
    }
    return counts;
  }

  /** Claims one row and sends it; null when another run claimed it first or it is not due. */
  private async deliverOne(id: string, now: Date): Promise<'sent' | 'retried' | 'failed' | null> {
    const claim = await this.db
      .createQueryBuilder()
      .update(OutgoingMail)
      .set({ status: 'sending', claimedAt: new Date(), attempts: () => 'attempts + 1' })
      .where('id = :id AND status = :queued AND next_attempt_at <= :now', { id, queued: 'queued', now })
      .execute();
    if (claim.affected !== 1) return null;
    const mail = await this.db.getRepository(OutgoingMail).findOneByOrFail({ id });
    try {
      await this.transport.send({
        from: this.from,
        to: { email: mail.toEmail, name: mail.toName },
        subject: mail.subject,
        html: mail.html,
        text: mail.text,
        messageId: mail.messageId,
        headers: mail.headers ?? {},
        attachments: mail.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, cid: a.cid, content: Buffer.from(a.contentBase64, 'base64') })),
      });
    } catch (err) {
      const message = (err instanceof Error ? err.message : String(err)).slice(0, 1000);
      const last = mail.attempts >= MAIL_ATTEMPTS;
      await this.db.getRepository(OutgoingMail).update(
        { id, status: 'sending' },
        last
          ? { status: 'failed', claimedAt: null, lastError: message }
          : { status: 'queued', claimedAt: null, lastError: message, nextAttemptAt: new Date(now.getTime() + retryDelayMs(mail.attempts)) },
      );
      this.log.warn({ mailId: id, attempt: mail.attempts, err: message }, last ? 'mail failed after the last attempt' : 'mail delivery failed; retry scheduled');
      return last ? 'failed' : 'retried';
    }
    await this.db.getRepository(OutgoingMail).update({ id, status: 'sending' }, { status: 'sent', claimedAt: null, sentAt: new Date(), lastError: null });
    return 'sent';
  }

  /** Queue rows for the deliveries list: admins see all, site managers their organization's. */
  async list(actor: Actor, filter: { status?: OutgoingMail['status']; limit: number; offset: number }) {
    const qb = this.db.getRepository(OutgoingMail).createQueryBuilder('m').orderBy('m.created_at', 'DESC').addOrderBy('m.id', 'DESC');
    if (actor.role !== 'admin') qb.andWhere('m.organization_id = :org', { org: actor.organizationId });
    if (filter.status) qb.andWhere('m.status = :status', { status: filter.status });
    const [rows, total] = await qb.take(filter.limit).skip(filter.offset).getManyAndCount();
    return { mail: rows.map(mailView), total };
  }

  /** Rows by id (reports read their recipients' delivery states). */
  async byIds(ids: string[]) {
    if (ids.length === 0) return [];
    return (await this.db.getRepository(OutgoingMail).findBy({ id: In(ids) })).map(mailView);
  }
}

