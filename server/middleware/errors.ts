import type { NextFunction, Request, Response } from 'express';
import { HttpError } from '../http-error.js';

/** Unknown /api paths answer 404 in the API's error shape. */
export function notFoundHandler(req: Request, _res: Response, next: NextFunction) {
  next(new HttpError(404, 'not_found', `There is no ${req.method} ${req.originalUrl.split('?')[0]} in this API.`));
}

// busboy's messages for a multipart body it cannot read (node_modules/busboy/lib).
const MULTIPART_DAMAGE = /^(Multipart: Boundary not found|Unexpected end of (form|file)|Malformed part header|Malformed content type|Missing Content-Type|Unsupported content type)/;

// Errors raised by body parsers and upload middleware carry a status or a type; map them to
// readable sentences instead of leaking their internals.
function fromLibraryError(err: unknown): HttpError | null {
  const e = err as { type?: string; status?: number; code?: string; limit?: number; message?: string };
  if (e?.type === 'entity.too.large') return new HttpError(413, 'payload_too_large', `The request body is larger than the ${e.limit ?? ''} bytes allowed.`.replace('  ', ' '));
  if (e?.type === 'entity.parse.failed') return new HttpError(400, 'invalid_json', 'The request body is not valid JSON.');
  if (e?.type === 'encoding.unsupported' || e?.type === 'charset.unsupported') return new HttpError(415, 'unsupported_encoding', 'The request body encoding is not supported.');
  if (e?.code === 'LIMIT_FILE_SIZE') return new HttpError(413, 'file_too_large', 'The uploaded file is larger than allowed.');
  if (typeof e?.code === 'string' && e.code.startsWith('LIMIT_')) return new HttpError(400, 'invalid_upload', `The upload was refused: ${e.message}.`);
  // The multipart parser under multer (busboy) throws plain errors for a damaged form body.
  if (err instanceof Error && MULTIPART_DAMAGE.test(err.message)) return new HttpError(400, 'invalid_upload', 'The upload form could not be read: the multipart body is damaged or cut short.');
  if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) return new HttpError(e.status, 'invalid_request', 'The request could not be read.');
  return null;
}

/**
 * The one error middleware: `{ error: { code, message, details } }`, never a stack trace. Server
 * errors (5xx) also carry `requestId`, the X-Request-Id under which pino-http logged them, so that a
 * person reporting one hands support the key to the log line; every answer has it in its header.
 */
export function errorHandler(err: unknown, req: Request, res: Response, _next: NextFunction) {
  const known = err instanceof HttpError ? err : fromLibraryError(err);
  const requestId = req.id === undefined ? undefined : String(req.id);
  if (!known) {
    // pino-http logs res.err with the stack and the request id; the client gets a sentence only.
    res.err = err as Error;
    res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on the server. It has been logged.', requestId } });
    return;
  }
  if (known.status === 429 || known.status >= 500) res.err = known;
  res.status(known.status).json({ error: { code: known.code, message: known.message, ...(known.details ? { details: known.details } : {}), ...(known.status >= 500 ? { requestId } : {}) } });
}
