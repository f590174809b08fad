// The quiet-window chart's figures without Chart.js: the 168 hours of a site-local week and which
// of them the proposed windows cover.
import type { HourOfWeekTraffic, QuietWindow } from '@/api/remaps.api';
import { addDays, isoWeekday } from './remaps-calendar';

/** Hours in a week. */
export const WEEK_HOURS = 168;

const WEEKDAYS = ['Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat', 'Sun'] as const;

/** Returns the index 0–167 of an hour of the week (dow 1 = Monday … 7 = Sunday, hour 0–23). */
export function hourOfWeekIndex(dow: number, hour: number): number {
  return (dow - 1) * 24 + hour;
}

/** Returns the short name of a weekday, 1 = Monday ("Mon"). */
export function weekdayShort(dow: number): string {
  return WEEKDAYS[dow - 1] ?? '';
}

/** Returns the mean returns of each of the 168 hours of the week, null where there is no history (the chart leaves a gap). */
export function weekSeries(hours: readonly HourOfWeekTraffic[]): (number | null)[] {
  const series = new Array<number | null>(WEEK_HOURS).fill(null);
  for (const h of hours) {
    if (h.dow >= 1 && h.dow <= 7 && h.hour >= 0 && h.hour <= 23) series[hourOfWeekIndex(h.dow, h.hour)] = h.meanReturns;
  }
  return series;
}

/**
 * Returns, for each of the 168 hours of the week, the rank of the proposed window that covers it
 * (its site-local hours, [localStart, localEnd) counted by the hours they touch), or 0 for none.
 * When windows share an hour the better rank wins.
 */
export function windowHours(windows: readonly QuietWindow[]): number[] {
  const ranks = new Array<number>(WEEK_HOURS).fill(0);
  for (const w of windows) {
    let day = w.localStart.slice(0, 10);
    let hour = Number(w.localStart.slice(11, 13));
    const endDay = w.localEnd.slice(0, 10);
    const endHour = Number(w.localEnd.slice(11, 13));
    const endMinute = Number(w.localEnd.slice(14, 16));
    // The hour the window ends in counts when the window reaches into it.
    const lastHourExclusive = endMinute > 0 ? endHour + 1 : endHour;
    for (let guard = 0; guard < WEEK_HOURS && (day < endDay || (day === endDay && hour < lastHourExclusive)); guard++) {
      const k = hourOfWeekIndex(isoWeekday(day), hour);
      if (ranks[k] === 0 || w.rank < ranks[k]) ranks[k] = w.rank;
      hour++;
      if (hour === 24) {
        hour = 0;
        day = addDays(day, 1);
      }
    }
  }
  return ranks;
}

/** Returns the chart's label of an hour of the week: the weekday at midnight ("Mon"), the hour otherwise ("06"). */
export function hourLabel(index: number): string {
  const dow = Math.floor(index / 24) + 1;
  const hour = index % 24;
  return hour === 0 ? weekdayShort(dow) : String(hour).padStart(2, '0');
}

/** Returns the tooltip title of an hour of the week ("Tue 02:00–03:00"). */
export function hourTitle(index: number): string {
  const dow = Math.floor(index / 24) + 1;
  const hour = index % 24;
  const pad = (h: number) => `${String(h).padStart(2, '0')}:00`;
  return `${weekdayShort(dow)} ${pad(hour)}–${pad((hour + 1) % 24)}`;
}
