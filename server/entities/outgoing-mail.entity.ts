import { Column, CreateDateColumn, Entity, Index, PrimaryColumn } from 'typeorm';

export type MailKind = 'report' | 'invitation' | 'password_reset' | 'remap_notice';
export type MailStatus = 'queued' | 'sending' | 'sent' | 'failed';

/** One stored attachment of a queued mail; the bytes are base64 so the row stays plain JSON. */
export interface StoredAttachment {
  filename: string;
  contentType: string;
  cid?: string;
  contentBase64: string;
}

/** One e-mail to one recipient, queued once per dedupe key and delivered by the mail job. */
@Entity({ name: 'outgoing_mail' })
@Index('IDX_outgoing_mail_due', ['status', 'nextAttemptAt'])
export class OutgoingMail {
  @PrimaryColumn({ type: 'text' })
  id: string;

  /** What makes this mail unique (e.g. `invitation:<id>`); a second enqueue with it returns this row. */
  @Index('IDX_outgoing_mail_dedupe', { unique: true })
  @Column({ type: 'text', name: 'dedupe_key' })
  dedupeKey: string;

  @Column({ type: 'text' })
  kind: MailKind;

  @Column({ type: 'text', name: 'organization_id', nullable: true })
  organizationId: string | null;

  @Column({ type: 'text', name: 'to_email' })
  toEmail: string;

  @Column({ type: 'text', name: 'to_name', nullable: true })
  toName: string | null;

  @Column({ type: 'text' })
  subject: string;

  @Column({ type: 'text' })
  html: string;

  @Column({ type: 'text' })
  text: string;

  @Column({ type: 'simple-json' })
  attachments: StoredAttachment[];

  @Column({ type: 'text' })
  status: MailStatus;

  @Column({ type: 'integer', default: 0 })
  attempts: number;

  @Column({ type: 'datetime', name: 'next_attempt_at' })
  nextAttemptAt: Date;

  /** When the current attempt claimed the row (status 'sending'). */
  @Column({ type: 'datetime', name: 'claimed_at', nullable: true })
  claimedAt: Date | null;

  @Column({ type: 'text', name: 'last_error', nullable: true })
  lastError: string | null;

  @Column({ type: 'datetime', name: 'sent_at', nullable: true })
  sentAt: Date | null;

  /** The SMTP Message-ID we set, fixed at enqueue so a retried send carries the same one. */
  @Column({ type: 'text', name: 'message_id' })
  messageId: string;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  @Column({ type: 'text', name: 'report_id', nullable: true })
  reportId: string | null;

  /** Extra header lines, name → value (e.g. List-Unsubscribe); null when the mail has none. */
  @Column({ type: 'simple-json', nullable: true })
  headers: Record<string, string> | null;
}
