import { DateTime } from 'luxon';
import type { RemapRequest, Site, User } from '../entities/index.js';
import { renderMail } from '../mail/render.js';
import type { MailService } from './mail.service.js';
import { remapCalendarFile, type RemapCalendarEntry } from './remap-calendar.js';

/** The moves of a remap request that its assignee and requester are told about by e-mail. */
export type RemapNoticeEvent = 'scheduled' | 'rescheduled' | 'cancelled' | 'verified' | 'not_fixed';

/** One committed move of a request, as the notices need it. */
export interface RemapNotice {
  event: RemapNoticeEvent;
  site: Site;
  /** The request after the move, with `assignee` and `requestedBy` loaded. */
  remap: RemapRequest;
  /** The request's calendar entry after the move (its SEQUENCE counted); null while it never had a window. */
  calendar: RemapCalendarEntry | null;
  /**
   * What makes this move unique among the request's moves of the same kind: the calendar SEQUENCE
   * for window moves, the count of such moves so far for verification moves. It keys the dedupe.
   */
  sequence: number;
  /** The request's page in the app. */
  link: string;
  /** Who made the move (null for the nightly check). */
  actorName: string | null;
  /** For a reschedule: the window and the assignee before the move. */
  before?: { start: Date | null; end: Date | null; assignee: User | null };
  /** For a verification move: labels of the request's zones now resolved, and of the new map's zones still flagging in its area. */
  zones?: { resolved: string[]; flagging: string[] };
}

type Part = 'assignee' | 'requester' | 'former';

/** The MIME type of a calendar file sent as a scheduling message; its method matches the file's METHOD (RFC 6047 §2.4). */
export const calendarContentType = (method: 'REQUEST' | 'CANCEL') => `text/calendar; method=${method}; charset=UTF-8`;

/** "Tue 8 Dec, 02:00–03:40" in the site's time zone (the end's day repeated only when it differs). */
export function windowWords(start: Date, end: Date, timezone: string): string {
  const a = DateTime.fromJSDate(start, { zone: timezone }).setLocale('en');
  const b = DateTime.fromJSDate(end, { zone: timezone }).setLocale('en');
  const day = (d: DateTime) => d.toFormat('ccc d LLL');
  return a.hasSame(b, 'day') ? `${day(a)}, ${a.toFormat('HH:mm')}–${b.toFormat('HH:mm')}` : `${day(a)}, ${a.toFormat('HH:mm')} – ${day(b)}, ${b.toFormat('HH:mm')}`;
}

const percent = (a: number | null) => (a === null ? 'not measured' : `${(a * 100).toFixed(1)} %`);
const list = (labels: string[]) => (labels.length ? labels.join(', ') : 'none');
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

function minutesWords(minutes: number): string {
  const m = Math.ceil(minutes - 1e-9);
  const h = Math.floor(m / 60);
  return h > 0 ? `${h} h ${m % 60} min` : `${m} min`;
}

/** "Driftline <driftline@localhost>" → its name and address, for the calendar's ORGANIZER. */
function organizerOf(from: string): { name: string; email: string } {
  const m = /^\s*"?([^"<]*?)"?\s*<([^>]+)>\s*$/.exec(from);
  return m ? { name: m[1] || 'Driftline', email: m[2] } : { name: 'Driftline', email: from.trim() };
}

/**
 * E-mails about a remap request's moves (issue 7): the assignee and the requester each get one
 * message per move (one person holding both gets one), with the calendar file as an iTIP REQUEST
 * for a new or moved window and a CANCEL for a cancelled one or for an assignee taken off it, and
 * the before/after figures once the new map was checked. Queued once per (request, move, sequence,
 * recipient), so a repeated call never mails twice.
 */
export class RemapNoticesService {
  private readonly organizer: { name: string; email: string };

  constructor(
    private readonly mail: MailService,
    from: string,
  ) {
    this.organizer = organizerOf(from);
  }

  /** Queues the notices of one committed move; returns who they go to (active users with an address), by name. */
  async send(n: RemapNotice): Promise<Array<{ id: string; name: string }>> {
    const people = new Map<string, { user: User; parts: Set<Part> }>();
    const add = (user: User | null | undefined, part: Part) => {
      if (!user || user.status !== 'active' || !user.email) return;
      const entry = people.get(user.id) ?? { user, parts: new Set<Part>() };
      entry.parts.add(part);
      people.set(user.id, entry);
    };
    add(n.remap.assignee, 'assignee');
    add(n.remap.requestedBy, 'requester');
    const former = n.before?.assignee;
    if (n.event === 'rescheduled' && former && former.id !== n.remap.assigneeId) add(former, 'former');

    const sent: Array<{ id: string; name: string }> = [];
    for (const { user, parts } of people.values()) {
      const message = this.compose(n, parts);
      const { html, text } = await renderMail('remap_notice', {
        name: user.name,
        headline: message.headline,
        detail: message.detail,
        site: n.site.name,
        window: message.window,
        link: n.link,
        hasCalendar: message.method === 'REQUEST',
      });
      const attachments = message.method && message.ics ? [{ filename: `driftline-remap-R-${n.remap.number}.ics`, contentType: calendarContentType(message.method), content: Buffer.from(message.ics, 'utf8') }] : [];
      await this.mail.enqueue({
        dedupeKey: `remap_notice:${n.remap.id}:${n.event}:${n.sequence}:${user.id}`,
        kind: 'remap_notice',
        organizationId: user.organizationId,
        to: { email: user.email, name: user.name },
        subject: message.subject,
        html,
        text,
        attachments,
      });
      sent.push({ id: user.id, name: user.name });
    }
    return sent;
  }

  /** The requester as an attendee for information, when another person than the assignee and reachable. */
  private observers(n: RemapNotice): Array<{ name: string; email: string }> {
    const r = n.remap.requestedBy;
    return r && r.id !== n.remap.assigneeId && r.status === 'active' && r.email ? [{ name: r.name, email: r.email }] : [];
  }

  private compose(n: RemapNotice, parts: Set<Part>) {
    const { remap, site } = n;
    const tz = remap.windowTimezone ?? site.timezone;
    const head = `Remap R-${remap.number} at ${site.name}`;
    const windowNow = remap.windowStart && remap.windowEnd ? windowWords(remap.windowStart, remap.windowEnd, tz) : null;
    const windowLine = (w: string | null) => (w ? `${w} (${tz})` : 'not scheduled');
    const assigneeName = remap.assignee?.name ?? 'nobody yet';
    const job = `Re-drive about ${remap.area.areaM2.toFixed(0)} m² (estimate ${minutesWords(remap.estimate.totalMinutes)} including setup)${n.calendar?.zoneLabels.length ? ` over ${n.calendar.zoneLabels.join(', ')}` : ''}.`;
    const roles = [
      parts.has('assignee') ? `You are assigned to drive it. ${job}` : '',
      parts.has('requester') ? (parts.has('assignee') ? 'You also requested it.' : `You requested it; ${assigneeName} drives it.`) : '',
    ].filter(Boolean).join(' ');
    const onlyFormer = parts.size === 1 && parts.has('former');
    const removes = 'The attached calendar file removes the entry from your calendar.';

    let subject: string;
    let detail: string;
    let method: 'REQUEST' | 'CANCEL' | null = null;
    let entry: RemapCalendarEntry | null = n.calendar;

    switch (n.event) {
      case 'scheduled':
        subject = `${head} scheduled for ${windowNow}`;
        detail = roles;
        method = 'REQUEST';
        break;
      case 'rescheduled': {
        const b = n.before;
        const moved = !b?.start || !b.end || b.start.getTime() !== remap.windowStart?.getTime() || b.end.getTime() !== remap.windowEnd?.getTime();
        const reassigned = !!b?.assignee && b.assignee.id !== remap.assigneeId;
        const was = b?.start && b.end ? windowWords(b.start, b.end, tz) : null;
        if (onlyFormer) {
          subject = `${head}: you are no longer assigned`;
          detail = `${n.actorName ?? 'The mapping team'} assigned it to ${assigneeName}${moved ? `, ${windowNow}` : ''}; it was yours${was ? ` for ${was}` : ''}. ${removes}`;
          method = 'CANCEL';
          // RFC 5546 §3.2.5: the uninvited attendee is named; the event itself goes on (no STATUS).
          entry = n.calendar && b?.assignee ? { ...n.calendar, assignee: { name: b.assignee.name, email: b.assignee.email }, observers: [] } : null;
        } else {
          subject = moved && reassigned ? `${head} moved to ${windowNow}, now with ${assigneeName}` : moved ? `${head} moved to ${windowNow}` : `${head} reassigned to ${assigneeName}`;
          detail = `${was && moved ? `It was ${was}. ` : ''}${roles}`;
          method = 'REQUEST';
        }
        break;
      }
      case 'cancelled':
        subject = `${head} cancelled`;
        detail = `${n.actorName ?? 'Someone'} cancelled it${remap.cancelReason ? `: ${remap.cancelReason.replace(/[.\s]+$/, '')}` : ''}. Its zones are back to the status they had before.${n.calendar ? ` ${removes}` : ''}`;
        method = n.calendar ? 'CANCEL' : null;
        break;
      case 'verified':
      case 'not_fixed': {
        const v = remap.verification;
        const zones = n.zones ?? { resolved: [], flagging: [] };
        const agreement = `agreement ${percent(v?.before.agreement ?? null)} → ${percent(v?.after?.agreement ?? null)}`;
        const area = `changed area ${(v?.before.changedAreaM2 ?? 0).toFixed(1)} m² → ${(v?.after?.changedAreaM2 ?? 0).toFixed(1)} m²`;
        const days = plural(v?.evidenceDays ?? 0, 'day');
        const version = remap.mapVersionAfter ? `map version ${remap.mapVersionAfter.version}` : 'the new map';
        if (n.event === 'verified') {
          subject = `${head} verified: ${agreement}`;
          detail = `After ${days} of evidence on ${version}, no zone flags in the request's area: ${agreement}, ${area}. Zones resolved: ${list(zones.resolved)} (${zones.resolved.length}).`;
        } else {
          subject = `${head} not fixed: ${plural(v?.zonesStillFlagging ?? zones.flagging.length, 'zone')} still flag`;
          detail = `After ${days} of evidence on ${version}, zones still flag in the request's area: ${list(zones.flagging)} (${v?.zonesStillFlagging ?? zones.flagging.length}); ${agreement}, ${area}. Another new map can be attached to the request.`;
        }
        break;
      }
    }
    const ics = method && entry ? remapCalendarFile({ ...entry, observers: entry.observers ?? this.observers(n), method, organizer: this.organizer, cancelled: n.event === 'cancelled' }) : null;
    return { subject, headline: `${subject}.`, detail, window: windowLine(windowNow), method: ics ? method : null, ics };
  }
}
