/** Returns the IANA time zones this browser knows, sorted, for time-zone pickers. */
export function knownTimezones(): string[] {
  // Older browsers lack supportedValuesOf; the zones the demo and most sites use keep the picker usable there.
  const zones = typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : ['UTC', 'Europe/London', 'Europe/Berlin', 'America/New_York', 'America/Chicago', 'America/Denver', 'America/Los_Angeles'];
  return [...zones].sort();
}

/** Returns the browser's own time zone, a sensible default for new organizations. */
export function browserTimezone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
}
