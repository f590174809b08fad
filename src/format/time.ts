/** Formatting of times and dates for display. Inputs are ISO 8601 strings or Dates. */

/** Returns the wall-clock time ("14:05") at `now` in an IANA time zone, or "—" for an unknown zone. */
export function localTime(timezone: string, now: Date): string {
  try {
    return new Intl.DateTimeFormat('en-GB', { timeZone: timezone, hour: '2-digit', minute: '2-digit' }).format(now);
  } catch {
    return '—';
  }
}

/** Returns the zone's offset from UTC at `now` ("UTC+01:00", "UTC−06:00"). */
export function utcOffset(timezone: string, now: Date): string {
  try {
    const part = new Intl.DateTimeFormat('en-GB', { timeZone: timezone, timeZoneName: 'longOffset' })
      .formatToParts(now)
      .find((p) => p.type === 'timeZoneName');
    const text = part?.value ?? '';
    return text === 'GMT' ? 'UTC+00:00' : text.replace('GMT', 'UTC').replace('-', '−');
  } catch {
    return '';
  }
}

/** Returns a date and time in the viewer's locale ("3 Nov 2026, 08:15"), or the fallback for null. */
export function dateTime(iso: string | null, fallback = '—'): string {
  if (!iso) return fallback;
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return fallback;
  return new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' }).format(date);
}

/** Returns how long ago an instant was, in words ("5 minutes ago", "3 days ago"), relative to `now`. */
export function timeAgo(iso: string | null, now: Date = new Date(), fallback = 'never'): string {
  if (!iso) return fallback;
  const then = new Date(iso).getTime();
  if (Number.isNaN(then)) return fallback;
  const seconds = Math.round((then - now.getTime()) / 1000);
  const format = new Intl.RelativeTimeFormat('en', { numeric: 'auto' });
  const abs = Math.abs(seconds);
  if (abs < 60) return format.format(seconds, 'second');
  if (abs < 3600) return format.format(Math.round(seconds / 60), 'minute');
  if (abs < 86_400) return format.format(Math.round(seconds / 3600), 'hour');
  if (abs < 30 * 86_400) return format.format(Math.round(seconds / 86_400), 'day');
  return dateTime(iso);
}

/** Returns an instant as the wall-clock date and time of an IANA time zone ("Tue 8 Dec, 02:00"), or "—". */
export function siteDateTime(iso: string, timezone: string): string {
  try {
    return new Intl.DateTimeFormat('en-GB', { timeZone: timezone, weekday: 'short', day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' }).format(new Date(iso));
  } catch {
    return '—';
  }
}
