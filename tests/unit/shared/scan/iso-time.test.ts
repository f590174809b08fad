import { describe, expect, it } from 'vitest';
import { readIsoTime } from '../../../../shared/scan/iso-time.js';

const NOW = new Date('2026-11-03T08:20:00.000Z');
const FIVE_MINUTES = 5 * 60 * 1000;
const subject = 'The record\'s "t"';

function reasonOf(value: unknown, maxFutureMs = FIVE_MINUTES): string {
  const r = readIsoTime(value, subject, NOW, maxFutureMs);
  if (r.ok) throw new Error(`expected a refusal of ${String(value)}`);
  return r.reason;
}

describe('readIsoTime', () => {
  it('when the time has a Z or an offset zone, then the text is kept and the instant is read in UTC', () => {
    // Offsets as in ISO 8601 / RFC 3339 §5.6 (G. Klyne, C. Newman, "Date and Time on the Internet: Timestamps", 2002):
    // 09:15:02+01:00 is 08:15:02 UTC.
    expect(readIsoTime('2026-11-03T08:15:02.120Z', subject, NOW, FIVE_MINUTES)).toEqual({ ok: true, t: '2026-11-03T08:15:02.120Z', ms: Date.UTC(2026, 10, 3, 8, 15, 2, 120) });
    expect(readIsoTime('2026-11-03T09:15:02+01:00', subject, NOW, FIVE_MINUTES)).toEqual({ ok: true, t: '2026-11-03T09:15:02+01:00', ms: Date.UTC(2026, 10, 3, 8, 15, 2) });
    expect(readIsoTime('2026-11-03T08:15Z', subject, NOW, FIVE_MINUTES)).toEqual({ ok: true, t: '2026-11-03T08:15Z', ms: Date.UTC(2026, 10, 3, 8, 15) });
  });

  it('when the value is not a string, has no zone or is no timestamp, then the reason names the subject and the expected form', () => {
    const form = `${subject} must be an ISO 8601 timestamp with a time zone, like 2026-11-03T08:15:02.120Z.`;
    expect(reasonOf('2026-11-03T08:15:02')).toBe(form);
    expect(reasonOf('yesterday')).toBe(form);
    expect(reasonOf(1762157702120)).toBe(form);
    expect(reasonOf(null)).toBe(form);
  });

  it('when the fields are no real calendar day or clock time, then it is refused although Date.parse may accept it', () => {
    // Gregorian calendar: February 2026 has 28 days, 2024 is a leap year; hours run 00–23, zone offsets to 23:59.
    expect(reasonOf('2026-02-29T08:00:00Z')).toBe(`${subject} (2026-02-29T08:00:00Z) is not a real date and time.`);
    expect(reasonOf('2026-02-30T08:00:00Z')).toMatch(/is not a real date and time\.$/);
    expect(reasonOf('2026-13-03T08:15:02Z')).toMatch(/is not a real date and time\.$/);
    expect(reasonOf('2026-11-03T24:00:00Z')).toMatch(/is not a real date and time\.$/);
    expect(reasonOf('2026-11-03T08:15:60Z')).toMatch(/is not a real date and time\.$/);
    expect(reasonOf('2026-11-03T08:15:02+24:00')).toMatch(/is not a real date and time\.$/);
    expect(readIsoTime('2024-02-29T08:15:02.5Z', subject, NOW, FIVE_MINUTES).ok).toBe(true);
  });

  it('when the time lies further ahead of now than allowed, then the reason gives both in seconds; at the limit it is accepted', () => {
    expect(reasonOf('2026-11-03T08:25:01Z')).toBe(`${subject} (2026-11-03T08:25:01Z) lies 301 s in the future; at most 300 s are allowed.`);
    expect(readIsoTime('2026-11-03T08:25:00Z', subject, NOW, FIVE_MINUTES).ok).toBe(true);
    expect(readIsoTime('2026-11-03T09:00:00Z', subject, NOW, 3_600_000).ok).toBe(true);
    expect(reasonOf('2026-11-03T08:20:01Z', 0)).toBe(`${subject} (2026-11-03T08:20:01Z) lies 1 s in the future; at most 0 s are allowed.`);
  });
});
