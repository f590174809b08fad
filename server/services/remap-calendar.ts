import { createEvent } from 'ics';

/** What a remap's calendar entry says. */
export interface RemapCalendarEntry {
  remapId: string;
  label: string;
  title: string;
  siteName: string;
  start: Date;
  end: Date;
  cancelled: boolean;
  areaM2: number;
  totalMinutes: number;
  zoneLabels: string[];
  assignee: { name: string; email: string } | null;
  link: string;
  /** Bumped whenever the window changes, so calendar clients replace the earlier entry (RFC 5545 §3.8.7.4). */
  sequence: number;
  /**
   * The iTIP method (RFC 5546 §1.4) when the file travels in a notice: REQUEST adds or updates the
   * entry, CANCEL removes it (the whole event when `cancelled`, else only the attendees named).
   * Without it the file is the plain download.
   */
  method?: 'REQUEST' | 'CANCEL';
  /** Who sends the scheduling message; RFC 5546 §3.2.2 and §3.2.5 require one ORGANIZER. */
  organizer?: { name: string; email: string };
  /** People told for information only (ROLE=NON-PARTICIPANT, RFC 5545 §3.2.16), such as the requester. */
  observers?: Array<{ name: string; email: string }>;
}

/**
 * Returns the iCalendar file (RFC 5545) of one remap window, made with the ics package: one VEVENT in
 * UTC with a stable UID per request, so a rescheduled or cancelled window updates the same entry.
 */
export function remapCalendarFile(e: RemapCalendarEntry): string {
  // RFC 5546 §3.2.5: a CANCEL that only uninvites attendees carries no STATUS.
  const status = e.cancelled ? 'CANCELLED' : e.method === 'CANCEL' ? undefined : 'CONFIRMED';
  const attendees = [
    ...(e.assignee ? [{ name: e.assignee.name, email: e.assignee.email, role: 'REQ-PARTICIPANT' as const, partstat: 'NEEDS-ACTION' as const, rsvp: false }] : []),
    ...(e.observers ?? []).map((o) => ({ name: o.name, email: o.email, role: 'NON-PARTICIPANT' as const, rsvp: false })),
  ];
  const { error, value } = createEvent({
    productId: 'driftline/remap-planning',
    ...(e.method ? { method: e.method } : {}),
    ...(e.organizer ? { organizer: { name: e.organizer.name, email: e.organizer.email } } : {}),
    uid: `remap-${e.remapId}@driftline`,
    sequence: e.sequence,
    start: e.start.getTime(),
    startInputType: 'utc',
    startOutputType: 'utc',
    end: e.end.getTime(),
    endInputType: 'utc',
    endOutputType: 'utc',
    title: `Remap ${e.label}: ${e.title}`,
    location: e.siteName,
    description: [
      `Re-drive about ${e.areaM2.toFixed(0)} m² at ${e.siteName} (estimate ${e.totalMinutes.toFixed(0)} min including setup).`,
      e.zoneLabels.length ? `Zones: ${e.zoneLabels.join(', ')}.` : '',
      `Request: ${e.link}`,
      'Driftline informs map maintenance; the site’s safety assessment and local rules for driving robots near people apply.',
    ].filter(Boolean).join('\n'),
    url: e.link,
    ...(status ? { status } : {}),
    attendees: attendees.length ? attendees : undefined,
  });
  if (error || !value) throw new Error(`The calendar file could not be made: ${error?.message ?? 'no output'}`);
  return foldOctets(value);
}

/**
 * Folds content lines at 75 octets as RFC 5545 §3.1 asks. ics@3.12.0 folds at 75 characters, so a
 * line with "m²" or "’" came out 76–77 octets long; this unfolds its output and folds again by
 * UTF-8 length, never inside a character.
 */
export function foldOctets(text: string): string {
  const lines = text.replace(/\r\n[ \t]/g, '').split('\r\n');
  const out: string[] = [];
  for (const line of lines) {
    let current = '';
    let octets = 0;
    for (const ch of line) {
      const size = Buffer.byteLength(ch, 'utf8');
      if (octets + size > 75) {
        out.push(current);
        current = ' ';
        octets = 1;
      }
      current += ch;
      octets += size;
    }
    out.push(current);
  }
  return out.join('\r\n');
}
