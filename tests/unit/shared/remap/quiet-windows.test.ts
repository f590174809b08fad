import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { expectedReturns, hourOfWeekProfile, quietWindows, type HourCount } from '../../../../shared/remap/quiet-windows.js';

const HOUR = 3_600_000;

/** Hourly returns over [from, to) (UTC hour starts) from a rule on the local wall-clock time. */
function history(zone: string, from: string, to: string, returnsAt: (local: DateTime) => number): HourCount[] {
  const out: HourCount[] = [];
  const end = DateTime.fromISO(to, { zone }).toMillis();
  for (let t = DateTime.fromISO(from, { zone }).toMillis(); t < end; t += HOUR) {
    const r = returnsAt(DateTime.fromMillis(t, { zone }));
    if (r > 0) out.push({ hourStartMs: t, returns: r });
  }
  return out;
}

describe('quiet windows on a synthetic week', () => {
  // Days 06:00–22:00 send 1000 returns an hour, nights 50, and Wednesday 01:00–04:00 none.
  const rule = (l: DateTime) => (l.weekday === 3 && l.hour >= 1 && l.hour < 4 ? 0 : l.hour >= 6 && l.hour < 22 ? 1000 : 50);
  const hours = history('UTC', '2026-10-26T00:00', '2026-11-09T00:00', rule);
  const from = DateTime.fromISO('2026-10-26T00:00', { zone: 'UTC' }).toMillis();
  const now = DateTime.fromISO('2026-11-09T00:00', { zone: 'UTC' }).toMillis();
  const profile = hourOfWeekProfile(hours, 'UTC', from, now);

  it('when two weeks are pooled, then each hour of the week has its mean and hours without scans count as zero', () => {
    expect(profile).toHaveLength(168);
    expect(profile[0]).toEqual({ dow: 1, hour: 0, meanReturns: 50 });
    expect(profile[10].meanReturns).toBe(1000);
    expect(profile[2 * 24 + 2]).toEqual({ dow: 3, hour: 2, meanReturns: 0 });
    expect(profile[6 * 24 + 23]).toEqual({ dow: 7, hour: 23, meanReturns: 50 });
  });

  it('when three 2-hour windows are asked for the coming week, then they are the hand-picked ones', () => {
    // By hand: Wednesday 01:00–03:00 expects 0 (its neighbours 00:00 and 03:00–04:00 give shoulders
    // 50 + 0, tying with 01:30 and 02:00: the earliest wins). All other night windows expect 2 · 50 = 100;
    // with night hours on both sides (shoulder 100) the earliest is Monday 00:00; the next at least
    // 12 h later is Monday 23:00–01:00.
    const w = quietWindows(profile, { timezone: 'UTC', nowMs: now, days: 7, durationMinutes: 120, count: 3 });
    expect(w.map((x) => [x.localStart, x.localEnd, x.expectedReturns, x.rank])).toEqual([
      ['2026-11-11 01:00', '2026-11-11 03:00', 0, 1],
      ['2026-11-09 00:00', '2026-11-09 02:00', 100, 2],
      ['2026-11-09 23:00', '2026-11-10 01:00', 100, 3],
    ]);
    expect(w[0].endMs - w[0].startMs).toBe(2 * HOUR);
  });

  it('when no gap is asked between windows, then they only must not overlap, and all three fall in one night', () => {
    // By hand: after Wednesday 01:00–03:00 (0), Wednesday 03:00–05:00 expects 0 + 50 = 50; of the windows
    // expecting 100, Tuesday 23:00–01:00 has the quietest neighbours (50 before, 0 after).
    const w = quietWindows(profile, { timezone: 'UTC', nowMs: now, days: 7, durationMinutes: 120, count: 3, minGapHours: 0 });
    expect(w.map((x) => [x.localStart, x.expectedReturns])).toEqual([
      ['2026-11-11 01:00', 0],
      ['2026-11-11 03:00', 50],
      ['2026-11-10 23:00', 100],
    ]);
    for (let a = 0; a < w.length; a++) for (let b = a + 1; b < w.length; b++) expect(w[a].endMs <= w[b].startMs || w[b].endMs <= w[a].startMs).toBe(true);
  });

  it('when a window covers part of an hour, then it expects that share of the hour: 05:30–06:30 on Monday is 25 + 500', () => {
    const s = DateTime.fromISO('2026-11-09T05:30', { zone: 'UTC' }).toMillis();
    expect(expectedReturns(profile, 'UTC', s, s + HOUR)).toBeCloseTo(525, 9);
  });

  it('when there is no history, then no window is proposed; bad options are refused', () => {
    const empty = hourOfWeekProfile([], 'UTC', now, now);
    expect(empty.every((h) => h.meanReturns === null)).toBe(true);
    expect(quietWindows(empty, { timezone: 'UTC', nowMs: now, days: 14, durationMinutes: 60, count: 3 })).toEqual([]);
    expect(() => quietWindows(profile, { timezone: 'Mars/Olympus', nowMs: now, days: 14, durationMinutes: 60, count: 3 })).toThrow(/not a known time zone/);
    expect(() => quietWindows(profile, { timezone: 'UTC', nowMs: now, days: 14, durationMinutes: 0, count: 3 })).toThrow(/window must last/);
  });
});

describe('quiet windows across daylight-saving changes (Europe/London)', () => {
  // Rules of the IANA time zone database (tzdata, via luxon@3.7.2): on 2026-10-25 clocks go back
  // from 02:00 BST to 01:00 GMT; on 2027-03-28 forward from 01:00 GMT to 02:00 BST.
  const zone = 'Europe/London';
  // Local 01:00–03:00 is quiet every night, other hours send 500 returns.
  const rule = (l: DateTime) => (l.hour >= 1 && l.hour < 3 ? 0 : 500);

  it('when the history is in summer time and the windows fall around the change, then they keep to local 01:00, not to a UTC hour', () => {
    const hours = history(zone, '2026-10-10T00:00', '2026-10-24T00:00', rule);
    const profile = hourOfWeekProfile(hours, zone, DateTime.fromISO('2026-10-10T00:00', { zone }).toMillis(), DateTime.fromISO('2026-10-24T00:00', { zone }).toMillis());
    const now = DateTime.fromISO('2026-10-24T12:00', { zone }).toMillis();
    const w = quietWindows(profile, { timezone: zone, nowMs: now, days: 3, durationMinutes: 120, count: 3 });
    // By hand: on the 25th local 01:00 occurs twice, so the quiet spell lasts three real hours
    // (00:00Z–03:00Z); the first 2-hour window starts at 01:00 BST = 00:00Z and ends at 01:00Z + 1 h =
    // 02:00 GMT on the clock. From the 26th, 01:00 local is 01:00Z. The 25th ranks first: its
    // neighbouring hours are quieter (500 before, 0 after, against 500 on both sides).
    expect(w.map((x) => [new Date(x.startMs).toISOString(), x.localStart, x.localEnd, x.expectedReturns])).toEqual([
      ['2026-10-25T00:00:00.000Z', '2026-10-25 01:00', '2026-10-25 02:00', 0],
      ['2026-10-26T01:00:00.000Z', '2026-10-26 01:00', '2026-10-26 03:00', 0],
      ['2026-10-27T01:00:00.000Z', '2026-10-27 01:00', '2026-10-27 03:00', 0],
    ]);
  });

  it('when the history spans the change, then every local hour keeps its mean: the doubled and the missing hour do not skew it', () => {
    const steady = (l: DateTime) => (l.hour === 1 ? 10 : 20);
    const spring = history(zone, '2027-03-22T00:00', '2027-04-05T00:00', steady);
    const p1 = hourOfWeekProfile(spring, zone, DateTime.fromISO('2027-03-22T00:00', { zone }).toMillis(), DateTime.fromISO('2027-04-05T00:00', { zone }).toMillis());
    // Sunday 01:00 did not exist on 2027-03-28: its mean comes from 2027-04-04 alone.
    expect(p1[6 * 24 + 1]).toEqual({ dow: 7, hour: 1, meanReturns: 10 });
    expect(p1.every((h) => h.meanReturns === (h.hour === 1 ? 10 : 20))).toBe(true);
    const autumn = history(zone, '2026-10-19T00:00', '2026-11-02T00:00', steady);
    const p2 = hourOfWeekProfile(autumn, zone, DateTime.fromISO('2026-10-19T00:00', { zone }).toMillis(), DateTime.fromISO('2026-11-02T00:00', { zone }).toMillis());
    // Sunday 01:00 happened twice on 2026-10-25 and once on 2026-11-01: (10 + 10 + 10) / 3.
    expect(p2[6 * 24 + 1].meanReturns).toBe(10);
  });

  it('when a window spans the spring-forward hour, then its local end is an hour later on the clock than its length', () => {
    const hours = history(zone, '2027-03-14T00:00', '2027-03-27T00:00', (l) => (l.hour < 4 ? 0 : 500));
    const profile = hourOfWeekProfile(hours, zone, DateTime.fromISO('2027-03-14T00:00', { zone }).toMillis(), DateTime.fromISO('2027-03-27T00:00', { zone }).toMillis());
    const now = DateTime.fromISO('2027-03-27T23:30', { zone }).toMillis();
    const [first] = quietWindows(profile, { timezone: zone, nowMs: now, days: 1, durationMinutes: 120, count: 1 });
    // 00:00 GMT + 2 h = 02:00Z = 03:00 BST (the 01:00–02:00 hour is skipped on the clock).
    expect(first.localStart).toBe('2027-03-28 00:00');
    expect(first.localEnd).toBe('2027-03-28 03:00');
    expect(new Date(first.startMs).toISOString()).toBe('2027-03-28T00:00:00.000Z');
  });
});
