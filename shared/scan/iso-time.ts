/**
 * Strict reading of the timestamps robots send with their records (scans, dockings): ISO 8601
 * date-times with an explicit zone, on a real calendar day, not too far ahead of the server clock.
 */

/** The instant read: the text as sent, and milliseconds since the Unix epoch; or a readable reason. */
export type IsoTimeResult = { ok: true; t: string; ms: number } | { ok: false; reason: string };

// ISO 8601 date-time with an explicit zone: a zoneless time would be read in the server's zone.
const ISO_WITH_ZONE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?(?:Z|[+-](\d{2}):(\d{2}))$/;

/** True when the captured fields form a real calendar date and clock time (Date.parse accepts 30 February). */
function isRealDateTime(m: RegExpExecArray): boolean {
  const [y, mo, d, h, mi] = [1, 2, 3, 4, 5].map((k) => Number(m[k]));
  const sec = m[6] === undefined ? 0 : Number(m[6]);
  const daysInMonth = new Date(Date.UTC(y, mo, 0)).getUTCDate();
  const zoneOk = m[7] === undefined || (Number(m[7]) <= 23 && Number(m[8]) <= 59);
  return mo >= 1 && mo <= 12 && d >= 1 && d <= daysInMonth && h <= 23 && mi <= 59 && sec <= 59 && zoneOk;
}

/**
 * Reads `value` as an ISO 8601 date-time with a zone that lies at most `maxFutureMs` milliseconds
 * after `now`; returns the text and its epoch milliseconds, or a one-sentence reason that begins
 * with `subject` (e.g. `The scan's "t"`).
 */
export function readIsoTime(value: unknown, subject: string, now: Date, maxFutureMs: number): IsoTimeResult {
  const m = typeof value === 'string' ? ISO_WITH_ZONE.exec(value) : null;
  if (typeof value !== 'string' || m === null) {
    return { ok: false, reason: `${subject} must be an ISO 8601 timestamp with a time zone, like 2026-11-03T08:15:02.120Z.` };
  }
  const ms = Date.parse(value);
  if (!isRealDateTime(m) || !Number.isFinite(ms)) return { ok: false, reason: `${subject} (${value}) is not a real date and time.` };
  const ahead = ms - now.getTime();
  if (ahead > maxFutureMs) {
    return { ok: false, reason: `${subject} (${value}) lies ${Math.round(ahead / 1000)} s in the future; at most ${Math.round(maxFutureMs / 1000)} s are allowed.` };
  }
  return { ok: true, t: value, ms };
}
