import { DateTime } from 'luxon';

/** The site-local calendar days [today − count, today − 1] (complete days), oldest first, as YYYY-MM-DD. */
export function completeDays(timezone: string, now: Date, count: number): string[] {
  const today = DateTime.fromJSDate(now, { zone: timezone }).startOf('day');
  return Array.from({ length: count }, (_, k) => today.minus({ days: count - k }).toISODate()!);
}

/** Whole days from `from` to `to` (YYYY-MM-DD), negative when `to` is earlier. */
export function daysBetween(from: string, to: string): number {
  return Math.round(DateTime.fromISO(to, { zone: 'UTC' }).diff(DateTime.fromISO(from, { zone: 'UTC' }), 'days').days);
}

/** The day `n` days after `day` (YYYY-MM-DD). */
export function addDays(day: string, n: number): string {
  return DateTime.fromISO(day, { zone: 'UTC' }).plus({ days: n }).toISODate()!;
}

/** The site-local calendar day (YYYY-MM-DD) of an instant. */
export function localDay(timezone: string, at: Date): string {
  return DateTime.fromJSDate(at, { zone: timezone }).toISODate()!;
}
