// Site-local wall-clock times and UTC instants for the schedule dialog, with daylight-saving
// changes handled by luxon's IANA zone rules.
import { DateTime } from 'luxon';

/** What a typed site-local start means: the UTC instant (ISO), its offset in words, or why it cannot be used. */
export type LocalStart = { ok: true; iso: string; offset: string; occursTwice: boolean } | { ok: false; problem: string };

const INPUT_FORMAT = "yyyy-MM-dd'T'HH:mm";

/**
 * Reads a datetime-local value ('YYYY-MM-DDTHH:mm') as wall-clock time in `timezone`. A time the
 * clocks skip (spring forward) is refused in words; a time that occurs twice (fall back) takes the
 * first occurrence, and the offset returned says which one it is.
 */
export function readLocalStart(value: string, timezone: string): LocalStart {
  if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/.test(value)) return { ok: false, problem: 'Enter a date and a start time.' };
  const local = DateTime.fromFormat(value, INPUT_FORMAT, { zone: timezone });
  if (!local.isValid) return { ok: false, problem: `That is not a date and time in ${timezone}.` };
  // Luxon moves a skipped wall-clock time forward; reading it back shows the gap.
  if (local.toFormat(INPUT_FORMAT) !== value) {
    return { ok: false, problem: `${value.slice(11)} does not exist on ${value.slice(0, 10)} in ${timezone}: the clocks go forward then. Pick another time.` };
  }
  // Luxon takes the later of two occurrences when the clocks go back; the first one is the one people mean by "01:30".
  for (const minutes of [60, 30]) {
    const earlier = local.minus({ minutes });
    if (earlier.offset !== local.offset && earlier.toFormat(INPUT_FORMAT) === value) {
      return { ok: true, iso: earlier.toUTC().toISO()!, offset: offsetWords(earlier), occursTwice: true };
    }
  }
  return { ok: true, iso: local.toUTC().toISO()!, offset: offsetWords(local), occursTwice: false };
}

/** Returns an instant's offset from UTC in words ("UTC+01:00"). */
function offsetWords(dt: DateTime): string {
  return `UTC${dt.toFormat('ZZ').replace('-', '−')}`;
}

/** Returns an instant (ISO) as site-local 'YYYY-MM-DD HH:mm' in `timezone`. */
export function localOf(iso: string, timezone: string): string {
  return DateTime.fromISO(iso, { zone: 'utc' }).setZone(timezone).toFormat('yyyy-MM-dd HH:mm');
}

/** Returns the instant `minutes` after an ISO instant, as ISO. */
export function plusMinutes(iso: string, minutes: number): string {
  return DateTime.fromISO(iso, { zone: 'utc' }).plus({ minutes: Math.round(minutes) }).toISO()!;
}

/** Returns the datetime-local value for an instant in `timezone` ('YYYY-MM-DDTHH:mm'), e.g. to prefill the custom start. */
export function inputValueOf(iso: string, timezone: string): string {
  return DateTime.fromISO(iso, { zone: 'utc' }).setZone(timezone).toFormat(INPUT_FORMAT);
}

/** Returns the offset of `timezone` from UTC at an instant, in words ("UTC−06:00"). */
export function offsetAt(iso: string, timezone: string): string {
  return offsetWords(DateTime.fromISO(iso, { zone: 'utc' }).setZone(timezone));
}
