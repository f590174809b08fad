import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import type { Logger } from 'pino';
import { SMTPServer } from 'smtp-server';
import type { DataSource } from 'typeorm';
import { CapturedMail } from '../entities/index.js';
import { newId } from '../services/ids.js';

/** Largest message the capture server accepts (reports with map images stay well below). */
const MAX_BYTES = 25 * 1024 * 1024;

/** A running capture SMTP server; `port` is the bound one (useful with port 0). */
export interface MailCapture {
  port: number;
  close(): Promise<void>;
}

/**
 * Starts the built-in SMTP server on 127.0.0.1 that stores every message it receives as a
 * CapturedMail row, for the admin outbox. Used when no SMTP host is configured, and by tests.
 * A message whose Message-ID was already captured is accepted and not stored again, so a
 * delivery retried after a lost reply shows once.
 */
export async function startMailCapture(db: DataSource, port: number, log: Logger): Promise<MailCapture> {
  const server = new SMTPServer({
    name: 'driftline-capture',
    banner: 'Driftline mail capture',
    // Local only: no TLS, no login.
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    size: MAX_BYTES,
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', callback);
      stream.on('end', () => {
        if (stream.sizeExceeded) return callback(Object.assign(new Error('Message too large'), { responseCode: 552 }));
        const raw = Buffer.concat(chunks);
        store(db, raw, session.envelope)
          .then(() => callback())
          .catch((err) => {
            log.error({ err }, 'the capture server could not store a message');
            callback(Object.assign(new Error('Could not store the message'), { responseCode: 451 }));
          });
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => {
      server.off('error', reject);
      resolve();
    });
  });
  server.on('error', (err) => log.error({ err }, 'mail capture server error'));
  const bound = (server.server.address() as AddressInfo).port;
  log.info({ port: bound }, 'mail capture server listening on 127.0.0.1');
  return { port: bound, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}

async function store(db: DataSource, raw: Buffer, envelope: { mailFrom: false | { address: string }; rcptTo: Array<{ address: string }> }) {
  const parsed = await simpleParser(raw, { skipHtmlToText: true, skipTextToHtml: true, skipImageLinks: true });
  const id = newId();
  await db
    .createQueryBuilder()
    .insert()
    .into(CapturedMail)
    .values({
      id,
      receivedAt: new Date(),
      envelopeFrom: envelope.mailFrom ? envelope.mailFrom.address : '',
      envelopeTo: envelope.rcptTo.map((r) => r.address),
      subject: parsed.subject ?? '',
      messageId: parsed.messageId ?? `<${id}@capture>`,
      raw,
      size: raw.length,
    })
    .orIgnore()
    .execute();
}
