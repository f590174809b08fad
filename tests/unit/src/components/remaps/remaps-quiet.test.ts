import { describe, expect, it } from 'vitest';
import { hourLabel, hourOfWeekIndex, hourTitle, weekSeries, windowHours } from '../../../../../src/components/remaps/remaps-quiet.js';

const window = (localStart: string, localEnd: string, rank: number) => ({ start: '', end: '', localStart, localEnd, expectedReturns: 0, rank });

describe('weekSeries', () => {
  it('when the server lists some hours, then they land at (dow − 1) · 24 + hour and the rest have no value', () => {
    const series = weekSeries([
      { dow: 1, hour: 0, meanReturns: 5 },
      { dow: 7, hour: 23, meanReturns: 9 },
      { dow: 3, hour: 14, meanReturns: 2.5 },
      { dow: 4, hour: 1, meanReturns: null },
    ]);
    expect(series).toHaveLength(168);
    expect(series[0]).toBe(5);
    expect(series[167]).toBe(9);
    expect(series[hourOfWeekIndex(3, 14)]).toBe(2.5);
    expect(series.filter((v) => v !== null)).toHaveLength(3);
    expect(series[hourOfWeekIndex(4, 1)]).toBeNull();
  });
});

describe('windowHours', () => {
  it('when a window runs 02:00–03:40 on Tuesday 8 Dec 2026, then Tuesday’s hours 2 and 3 carry its rank', () => {
    const ranks = windowHours([window('2026-12-08 02:00', '2026-12-08 03:40', 1)]);
    expect(ranks[hourOfWeekIndex(2, 2)]).toBe(1);
    expect(ranks[hourOfWeekIndex(2, 3)]).toBe(1);
    expect(ranks.filter((r) => r > 0)).toHaveLength(2);
  });

  it('when a window ends on the hour, then that hour is not covered; past midnight on Sunday it wraps to Monday', () => {
    const ranks = windowHours([window('2026-12-13 23:00', '2026-12-14 01:00', 2)]);
    expect(ranks[hourOfWeekIndex(7, 23)]).toBe(2);
    expect(ranks[hourOfWeekIndex(1, 0)]).toBe(2);
    expect(ranks[hourOfWeekIndex(1, 1)]).toBe(0);
  });

  it('when two windows share an hour, then the better (lower) rank wins', () => {
    const ranks = windowHours([window('2026-12-08 02:00', '2026-12-08 04:00', 3), window('2026-12-08 03:00', '2026-12-08 05:00', 1)]);
    expect([2, 3, 4].map((h) => ranks[hourOfWeekIndex(2, h)])).toEqual([3, 1, 1]);
  });
});

describe('labels', () => {
  it('when an hour starts a day, then the label names the weekday, otherwise the hour', () => {
    expect(hourLabel(0)).toBe('Mon');
    expect(hourLabel(24 + 6)).toBe('06');
    expect(hourTitle(24 * 6 + 23)).toBe('Sun 23:00–00:00');
  });
});
