import { CapturedMail } from '../../../server/entities/index.js';
import type { TestApp } from './test-app.js';

/** A 1×1 PNG (red pixel) for inline-image checks. */
export const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8DwHwAFBQIAX8jx0gAAAABJRU5ErkJggg==', 'base64');

/** Stores one captured message with an inline image (cid:pixel) and a text attachment; returns its id. */
export async function insertCapturedMail(t: TestApp, subject = 'Fixture message'): Promise<string> {
  const id = crypto.randomUUID();
  const boundary = 'b1';
  const raw = Buffer.from(
    [
      `Message-ID: <${id}@fixture>`,
      'From: Driftline <driftline@localhost>',
      'To: nell.reader@ambergate.example',
      `Subject: ${subject}`,
      'MIME-Version: 1.0',
      `Content-Type: multipart/related; boundary="${boundary}"`,
      '',
      `--${boundary}`,
      'Content-Type: text/html; charset=utf-8',
      '',
      '<p>Map:</p><img src="cid:pixel">',
      `--${boundary}`,
      'Content-Type: image/png',
      'Content-Transfer-Encoding: base64',
      'Content-ID: <pixel>',
      'Content-Disposition: inline; filename="pixel.png"',
      '',
      TINY_PNG.toString('base64'),
      `--${boundary}`,
      'Content-Type: text/plain; name="note.txt"',
      'Content-Disposition: attachment; filename="note.txt"',
      '',
      'a note',
      `--${boundary}--`,
      '',
    ].join('\r\n'),
  );
  await t.dataSource.getRepository(CapturedMail).insert({ id, receivedAt: new Date(), envelopeFrom: 'driftline@localhost', envelopeTo: ['nell.reader@ambergate.example'], subject, messageId: `<${id}@fixture>`, raw, size: raw.length });
  return id;
}
