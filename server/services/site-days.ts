import { DateTime } from 'luxon';

// Calendar arithmetic on YYYY-MM-DD days runs on UTC dates (a calendar day is the same in every
// zone); only "which day is it at the site" needs the time zone. Plain Date arithmetic here: the
// fleet overview asks for these days several times per site, and luxon's took most of its time.
const DAY_MS = 86_400_000;
const dayNumber = (day: string) => Date.UTC(Number(day.slice(0, 4)), Number(day.slice(5, 7)) - 1, Number(day.slice(8, 10))) / DAY_MS;
const dayText = (n: number) => new Date(n * DAY_MS).toISOString().slice(0, 10);

/** The site-local calendar days [today − count, today − 1] (complete days), oldest first, as YYYY-MM-DD. */
export function completeDays(timezone: string, now: Date, count: number): string[] {
  const today = dayNumber(localDay(timezone, now));
  return Array.from({ length: count }, (_, k) => dayText(today - count + k));
}

/** Whole days from `from` to `to` (YYYY-MM-DD), negative when `to` is earlier. */
export function daysBetween(from: string, to: string): number {
  return dayNumber(to) - dayNumber(from);
}

/** The day `n` days after `day` (YYYY-MM-DD). */
export function addDays(day: string, n: number): string {
  return dayText(dayNumber(day) + n);
}

/** The site-local calendar day (YYYY-MM-DD) of an instant. */
export function localDay(timezone: string, at: Date): string {
  return DateTime.fromJSDate(at, { zone: timezone }).toISODate()!;
}

/**
 * Returns a function giving the site-local calendar day (YYYY-MM-DD) of an instant in ms. It keeps
 * the last day's bounds, so instants that come in time order rarely need a time-zone conversion.
 */
export function localDayFinder(timezone: string): (ms: number) => string {
  let last = { start: Infinity, end: -Infinity, day: '' };
  return (ms) => {
    if (ms >= last.start && ms < last.end) return last.day;
    const local = DateTime.fromMillis(ms, { zone: timezone });
    const start = local.startOf('day');
    last = { start: start.toMillis(), end: start.plus({ days: 1 }).toMillis(), day: local.toISODate()! };
    return last.day;
  };
}
