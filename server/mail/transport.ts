import nodemailer from 'nodemailer';
import type { Config } from '../config.js';

/** One message as the delivery job hands it to a transport. */
export interface OutgoingMessage {
  from: string;
  to: { email: string; name: string | null };
  subject: string;
  html: string;
  text: string;
  messageId: string;
  /** Extra header lines, name → value (List-Unsubscribe, List-Unsubscribe-Post). */
  headers: Record<string, string>;
  attachments: Array<{ filename: string; contentType: string; cid?: string; content: Buffer }>;
}

/** Where mail goes: SMTP in the app; tests swap in a failing one to exercise retries. */
export interface MailTransport {
  send(message: OutgoingMessage): Promise<void>;
}

/**
 * SMTP through nodemailer: the configured host (TLS and login from the environment), or the
 * built-in capture server on 127.0.0.1 when no host is configured.
 */
export function smtpTransport(smtp: Config['smtp']): MailTransport {
  const local = smtp.host === null;
  const transporter = nodemailer.createTransport({
    host: smtp.host ?? '127.0.0.1',
    port: smtp.port,
    secure: smtp.secure,
    // The local capture server offers no TLS; a real host is asked for STARTTLS when not on implicit TLS.
    ignoreTLS: local,
    requireTLS: !local && !smtp.secure,
    auth: smtp.user ? { user: smtp.user, pass: smtp.password ?? '' } : undefined,
    connectionTimeout: 15_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  });
  return {
    async send(m) {
      await transporter.sendMail({
        from: smtp.from,
        to: m.to.name ? { name: m.to.name, address: m.to.email } : m.to.email,
        subject: m.subject,
        html: m.html,
        text: m.text,
        messageId: m.messageId,
        headers: m.headers,
        attachments: m.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, cid: a.cid, content: a.content })),
      });
    },
  };
}
