import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** A message received by the built-in capture SMTP server (embedded defaults and tests), shown in the outbox. */
@Entity({ name: 'captured_mail' })
export class CapturedMail {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Index('IDX_captured_mail_received')
  @Column({ type: 'datetime', name: 'received_at' })
  receivedAt: Date;

  @Column({ type: 'text', name: 'envelope_from' })
  envelopeFrom: string;

  @Column({ type: 'simple-json', name: 'envelope_to' })
  envelopeTo: string[];

  @Column({ type: 'text' })
  subject: string;

  /** The Message-ID header, so a message delivered twice shows up once. */
  @Index('IDX_captured_mail_message_id', { unique: true })
  @Column({ type: 'text', name: 'message_id' })
  messageId: string;

  @Column({ type: 'blob' })
  raw: Buffer;

  @Column({ type: 'integer' })
  size: number;
}
