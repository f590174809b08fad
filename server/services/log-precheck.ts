import { createReadStream } from 'node:fs';
import { Transform } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { MAX_SCAN_LINE_CHARS } from '../../shared/scan/scan-record.js';
import { HttpError } from '../http-error.js';

/** Unpacked bytes at the start of an uploaded scan log that are read before it is accepted (product choice). */
export const LOG_HEAD_BYTES = 1024 * 1024;
/** Longest line of a scan log, bytes: the line parser's limit in characters (a character is at least one byte). */
export const LOG_MAX_LINE_BYTES = MAX_SCAN_LINE_CHARS;

const MB = (bytes: number) => `${bytes / 1024 / 1024} MB`;

/** The refusal for a line longer than LOG_MAX_LINE_BYTES. */
export const lineTooLong = (lineNo: number) =>
  new HttpError(422, 'line_too_long', `Line ${lineNo.toLocaleString('en-US')} of the log is longer than ${MB(LOG_MAX_LINE_BYTES)}, far more than any scan; nothing was stored.`);

/** The first lines of a log file (gzip unpacked), up to `limit` unpacked bytes. */
export interface LogHead {
  /** Complete lines, without their line ends. */
  lines: string[];
  /** True when the whole file fitted in the head. */
  complete: boolean;
}

/**
 * Reads the first `limit` unpacked bytes of a scan log (plain or gzip) and splits them into
 * complete lines; a file that is not readable gzip, or whose first line is longer than
 * LOG_MAX_LINE_BYTES, is refused with a 4xx HttpError.
 */
export async function readLogHead(path: string, gzipped: boolean, limit = LOG_HEAD_BYTES): Promise<LogHead> {
  const source = createReadStream(path);
  const gunzip = gzipped ? createGunzip() : null;
  const stream = gunzip ? source.pipe(gunzip) : source;
  const chunks: Buffer[] = [];
  let size = 0;
  let complete = true;
  try {
    for await (const chunk of stream as AsyncIterable<Buffer>) {
      chunks.push(chunk);
      size += chunk.length;
      if (size >= limit) {
        complete = false;
        break;
      }
    }
  } catch {
    throw new HttpError(400, 'invalid_gzip', 'The file looks gzip-compressed but could not be unpacked (it is damaged or cut short); nothing was stored.');
  } finally {
    source.destroy();
    gunzip?.destroy();
  }
  const text = Buffer.concat(chunks).subarray(0, limit).toString('utf8');
  const lines = text.split('\n');
  // Past the head the last piece is the start of a line that goes on.
  if (!complete) lines.pop();
  if (!complete && lines.length === 0) throw lineTooLong(1);
  return { lines: lines.map((l) => l.replace(/\r$/, '')), complete };
}

/**
 * A pass-through stream that fails with `lineTooLong` as soon as a line exceeds `max` bytes, so that
 * a line reader never has to hold a gigabyte-long line (a gzip bomb without line ends).
 */
export function lineLengthGuard(max = LOG_MAX_LINE_BYTES): Transform {
  let run = 0;
  let lineNo = 1;
  return new Transform({
    transform(chunk: Buffer, _enc, cb) {
      let pos = 0;
      for (let nl = chunk.indexOf(0x0a); nl >= 0; nl = chunk.indexOf(0x0a, pos)) {
        if (run + nl - pos > max) return cb(lineTooLong(lineNo));
        run = 0;
        lineNo++;
        pos = nl + 1;
      }
      run += chunk.length - pos;
      if (run > max) return cb(lineTooLong(lineNo));
      cb(null, chunk);
    },
  });
}
