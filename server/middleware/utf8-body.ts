import type { IncomingMessage, ServerResponse } from 'node:http';
import { HttpError } from '../http-error.js';

const utf8 = new TextDecoder('utf-8', { fatal: true });

/**
 * `verify` hook for express.json: JSON between systems must be UTF-8 (RFC 8259, section 8.1), so a
 * body declared in another character set is refused with 415, and a UTF-8 body holding invalid byte
 * sequences with 400 (the parser would otherwise store U+FFFD replacement characters in their place).
 */
export function requireUtf8(_req: IncomingMessage, _res: ServerResponse, body: Buffer, encoding: string): void {
  if (encoding.toLowerCase().replace('-', '') !== 'utf8') {
    throw new HttpError(415, 'unsupported_encoding', 'Send the request body as UTF-8 JSON; other character sets are not accepted.');
  }
  try {
    utf8.decode(body);
  } catch {
    throw new HttpError(400, 'invalid_encoding', 'The request body is not valid UTF-8 text.');
  }
}
