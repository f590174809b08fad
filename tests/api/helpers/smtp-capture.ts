import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';

/** One message as a capture server received it: the envelope's recipients and the raw bytes. */
export interface ReceivedMessage {
  to: string[];
  raw: Buffer;
}

/**
 * A plain SMTP server (smtp-server@3.21.6, no TLS, no login) on a free 127.0.0.1 port that keeps
 * every message it receives in `received`, in arrival order; `close` stops it.
 */
export async function startSmtpCapture(): Promise<{ port: number; received: ReceivedMessage[]; close(): Promise<void> }> {
  const received: ReceivedMessage[] = [];
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    logger: false,
    onData(stream, session, done) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        received.push({ to: session.envelope.rcptTo.map((r) => r.address), raw: Buffer.concat(chunks) });
        done();
      });
    },
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return {
    port: (server.server.address() as AddressInfo).port,
    received,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
