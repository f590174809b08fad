import { describe, expect, it } from 'vitest';
import { addDays, addMonths, assignLanes, daySegments, isoWeekday, monthGridDays, queryRange, weekDays, weekStart, weekWords } from '../../../../../src/components/remaps/remaps-calendar.js';

// Weekdays checked against the Gregorian calendar (ISO 8601 weeks start on Monday): 1 Dec 2026 is a Tuesday.
describe('calendar days', () => {
  it('when a date is a Tuesday or a Sunday, then its ISO weekday is 2 or 7 and its week starts on the Monday before', () => {
    expect(isoWeekday('2026-12-01')).toBe(2);
    expect(isoWeekday('2026-12-06')).toBe(7);
    expect(weekStart('2026-12-06')).toBe('2026-11-30');
    expect(weekStart('2026-11-30')).toBe('2026-11-30');
  });

  it('when days cross a month, a year or the end of March (a DST change in Europe), then they still step by one calendar day', () => {
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01');
    expect(addDays('2027-03-28', 1)).toBe('2027-03-29');
    expect(addDays('2027-03-01', -1)).toBe('2027-02-28');
    expect(addMonths('2026-12-15', 1)).toBe('2027-01-01');
    expect(addMonths('2027-01-31', -1)).toBe('2026-12-01');
  });

  it('when December 2026 is shown, then the grid runs in whole weeks from Mon 30 Nov to Sun 3 Jan', () => {
    const days = monthGridDays('2026-12-17');
    expect(days[0]).toBe('2026-11-30');
    expect(days[days.length - 1]).toBe('2027-01-03');
    expect(days.length).toBe(35);
  });

  it('when February 2027 is shown (the 1st a Monday, 28 days), then the grid is exactly four weeks', () => {
    expect(monthGridDays('2027-02-10')).toHaveLength(28);
    expect(monthGridDays('2027-02-10')[0]).toBe('2027-02-01');
  });

  it('when a week is shown, then it has seven days from Monday and its span reads in words', () => {
    expect(weekDays('2026-12-10')).toEqual(['2026-12-07', '2026-12-08', '2026-12-09', '2026-12-10', '2026-12-11', '2026-12-12', '2026-12-13']);
    expect(weekWords('2026-12-10')).toBe('7 – 13 Dec 2026');
    expect(weekWords('2026-12-31')).toBe('28 Dec 2026 – 3 Jan 2027');
    expect(weekWords('2026-12-02')).toBe('30 Nov – 6 Dec 2026');
  });
});

describe('daySegments', () => {
  it('when a window lies within one day, then it is one piece from its start to its end minute', () => {
    expect(daySegments('2026-12-08 02:00', '2026-12-08 03:40')).toEqual([{ day: '2026-12-08', fromMinute: 120, toMinute: 220, isStart: true, isEnd: true }]);
  });

  it('when a window runs past midnight, then it has a piece on each day', () => {
    expect(daySegments('2026-12-08 23:30', '2026-12-09 01:10')).toEqual([
      { day: '2026-12-08', fromMinute: 1410, toMinute: 1440, isStart: true, isEnd: false },
      { day: '2026-12-09', fromMinute: 0, toMinute: 70, isStart: false, isEnd: true },
    ]);
  });

  it('when a window ends exactly at midnight, then it has no piece on the next day', () => {
    expect(daySegments('2026-12-08 22:00', '2026-12-09 00:00')).toEqual([{ day: '2026-12-08', fromMinute: 1320, toMinute: 1440, isStart: true, isEnd: true }]);
  });
});

describe('queryRange', () => {
  it('when a month grid is asked for, then the instants reach a day beyond either end, for sites in any time zone', () => {
    expect(queryRange('2026-11-30', '2027-01-03')).toEqual({ from: '2026-11-29T00:00:00.000Z', to: '2027-01-05T00:00:00.000Z' });
  });
});

describe('assignLanes', () => {
  it('when pieces do not overlap, then each takes the full width', () => {
    expect(assignLanes([{ fromMinute: 60, toMinute: 120 }, { fromMinute: 120, toMinute: 180 }])).toEqual([{ lane: 0, lanes: 1 }, { lane: 0, lanes: 1 }]);
  });

  it('when three pieces overlap in a chain, then they share two lanes and the third reuses the first lane', () => {
    // 01:00–03:00 overlaps 02:00–04:00, which overlaps 03:00–05:00; the first lane is free again at 03:00.
    expect(assignLanes([{ fromMinute: 60, toMinute: 180 }, { fromMinute: 120, toMinute: 240 }, { fromMinute: 180, toMinute: 300 }])).toEqual([
      { lane: 0, lanes: 2 },
      { lane: 1, lanes: 2 },
      { lane: 0, lanes: 2 },
    ]);
  });

  it('when pieces come in any order, then lanes follow their start times', () => {
    expect(assignLanes([{ fromMinute: 600, toMinute: 700 }, { fromMinute: 0, toMinute: 30 }, { fromMinute: 610, toMinute: 620 }])).toEqual([
      { lane: 0, lanes: 2 },
      { lane: 0, lanes: 1 },
      { lane: 1, lanes: 2 },
    ]);
  });
});
