import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { addDays, completeDays, daysBetween, localDay, localDayFinder } from '../../../server/services/site-days.js';

// Checked against luxon@3.7.2's calendar arithmetic in the site's zone (the way these were computed before).
const luxonCompleteDays = (zone: string, now: Date, count: number) => {
  const today = DateTime.fromJSDate(now, { zone }).startOf('day');
  return Array.from({ length: count }, (_, k) => today.minus({ days: count - k }).toISODate()!);
};

describe('site days', () => {
  it('when the clocks change or a month or year turns, then the complete days are those luxon@3.7.2 counts in the site’s zone', () => {
    const instants = ['2026-03-29T00:30:00Z', '2026-03-29T01:30:00Z', '2026-10-25T00:30:00Z', '2026-11-01T06:59:00Z', '2026-11-01T07:01:00Z', '2027-01-01T03:00:00Z', '2028-03-01T12:00:00Z'];
    for (const zone of ['Europe/London', 'America/Chicago', 'America/Denver', 'America/New_York', 'Pacific/Auckland', 'UTC']) {
      for (const at of instants) {
        const now = new Date(at);
        expect(completeDays(zone, now, 30)).toEqual(luxonCompleteDays(zone, now, 30));
        expect(completeDays(zone, now, 1)).toEqual([DateTime.fromJSDate(now, { zone }).minus({ days: 1 }).toISODate()]);
      }
    }
  });

  it('when counting and adding days across a leap day and a year end, then they agree with luxon@3.7.2', () => {
    const pairs: Array<[string, string]> = [['2028-02-27', '2028-03-02'], ['2026-12-30', '2027-01-02'], ['2026-11-09', '2026-10-12'], ['2026-03-28', '2026-03-30']];
    for (const [from, to] of pairs) {
      const expected = Math.round(DateTime.fromISO(to, { zone: 'UTC' }).diff(DateTime.fromISO(from, { zone: 'UTC' }), 'days').days);
      expect(daysBetween(from, to)).toBe(expected);
      expect(addDays(from, expected)).toBe(to);
    }
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29');
    expect(addDays('2027-02-28', 1)).toBe('2027-03-01');
    expect(addDays('2026-11-09', -40)).toBe('2026-09-30');
  });

  it('when instants come in time order across a clock change, or out of order, then the remembered day bounds give the same days as localDay', () => {
    const start = Date.parse('2026-10-24T12:00:00Z');
    const inOrder = Array.from({ length: 200 }, (_, k) => start + k * 17 * 60_000);
    const shuffled = [...inOrder].reverse().concat(inOrder.filter((_, k) => k % 3 === 0));
    for (const zone of ['Europe/London', 'America/Chicago']) {
      const dayOf = localDayFinder(zone);
      for (const ms of [...inOrder, ...shuffled]) expect(dayOf(ms)).toBe(localDay(zone, new Date(ms)));
    }
  });

  it('when it is still the evening before in the site’s zone, then the local day is that evening’s date', () => {
    expect(localDay('America/Chicago', new Date('2026-11-01T04:00:00Z'))).toBe('2026-10-31');
    expect(localDay('Europe/London', new Date('2026-11-01T04:00:00Z'))).toBe('2026-11-01');
  });
});
