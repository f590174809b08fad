import { describe, expect, it } from 'vitest';
import { inputValueOf, localOf, offsetAt, plusMinutes, readLocalStart } from '../../../../../src/components/remaps/remaps-time.js';

// Daylight-saving dates of the EU (last Sunday of March and October, 01:00 UTC) and the US (second
// Sunday of March, first Sunday of November, 02:00 local) as the IANA tz database gives them, via luxon@3.7.2.
describe('readLocalStart', () => {
  it('when a winter time is typed for London, then it is the same instant in UTC', () => {
    expect(readLocalStart('2026-12-08T02:00', 'Europe/London')).toEqual({ ok: true, iso: '2026-12-08T02:00:00.000Z', offset: 'UTC+00:00', occursTwice: false });
  });

  it('when a summer time is typed for London, then it is an hour earlier in UTC', () => {
    expect(readLocalStart('2027-04-06T02:00', 'Europe/London')).toEqual({ ok: true, iso: '2027-04-06T01:00:00.000Z', offset: 'UTC+01:00', occursTwice: false });
  });

  it('when the typed time is skipped by the clocks going forward (London, 28 Mar 2027, 01:30), then it is refused in words', () => {
    const read = readLocalStart('2027-03-28T01:30', 'Europe/London');
    expect(read.ok).toBe(false);
    if (!read.ok) expect(read.problem).toContain('the clocks go forward');
  });

  it('when the typed time happens twice as the clocks go back (Chicago, 7 Nov 2027, 01:30), then the first one is taken and its offset shown', () => {
    expect(readLocalStart('2027-11-07T01:30', 'America/Chicago')).toEqual({ ok: true, iso: '2027-11-07T06:30:00.000Z', offset: 'UTC−05:00', occursTwice: true });
  });

  it('when the input is incomplete, then it says what is missing', () => {
    expect(readLocalStart('2027-11-07', 'UTC')).toEqual({ ok: false, problem: 'Enter a date and a start time.' });
  });
});

describe('instants and site time', () => {
  it('when a window crosses the end of summer time in Denver, then its end is read in the new offset', () => {
    // 7 Nov 2027 01:00 MDT (UTC−6), the first of the two 01:00s, is 07:00 UTC; 100 minutes later is 08:40 UTC, 01:40 MST (UTC−7).
    const start = readLocalStart('2027-11-07T01:00', 'America/Denver');
    expect(start.ok && start.iso).toBe('2027-11-07T07:00:00.000Z');
    const end = plusMinutes('2027-11-07T07:00:00.000Z', 100);
    expect(localOf(end, 'America/Denver')).toBe('2027-11-07 01:40');
    expect(offsetAt(end, 'America/Denver')).toBe('UTC−07:00');
  });

  it('when an instant is prefilled into the form, then it shows as site-local wall-clock time', () => {
    expect(inputValueOf('2027-04-06T01:00:00.000Z', 'Europe/London')).toBe('2027-04-06T02:00');
  });
});
