// What each role may do with a remap request, and the words and tones of its states. The server
// decides (and answers 403 or 409 otherwise); these only choose which controls to show.
import type { RemapPriorityLabel, RemapRequest, RemapStatus } from '@/api/remaps.api';
import type { Role } from '@/api/types';
import type { ZoneStatus } from '@/api/zones.api';
import type { TagTone } from '@/components/maps/MapsToneTag.vue';

/** Every status, in the order a request moves through them (cancelled last). */
export const remapStatuses: readonly RemapStatus[] = ['proposed', 'scheduled', 'in_progress', 'map_uploaded', 'verified', 'not_fixed', 'cancelled'];

const statusTags: Record<RemapStatus, { label: string; tone: TagTone }> = {
  proposed: { label: 'proposed', tone: 'slate' },
  scheduled: { label: 'scheduled', tone: 'ink' },
  in_progress: { label: 'in progress', tone: 'amber' },
  map_uploaded: { label: 'new map uploaded', tone: 'ink' },
  verified: { label: 'verified', tone: 'teal' },
  not_fixed: { label: 'not fixed', tone: 'red' },
  cancelled: { label: 'cancelled', tone: 'slate' },
};

/** Returns the words and tag tone of a request status ("in progress", amber). */
export function remapStatusTag(status: RemapStatus): { label: string; tone: TagTone } {
  return statusTags[status];
}

/** Returns the words of a priority ("high priority"). */
export function priorityLabel(label: RemapPriorityLabel): string {
  return `${label} priority`;
}

/** Returns true once a request has reached an end: verified, not fixed or cancelled. */
export function isClosedStatus(status: RemapStatus): boolean {
  return status === 'verified' || status === 'not_fixed' || status === 'cancelled';
}

/** Returns true when the role may create a request from zones (site managers and admins request; mappers propose, to be approved). */
export function canCreateRemaps(role: Role): boolean {
  return role === 'admin' || role === 'mapper' || role === 'site_manager';
}

/** Returns true when a request the role creates still needs a site manager's or admin's approval (a mapper's proposal). */
export function createdRemapNeedsApproval(role: Role): boolean {
  return role === 'mapper';
}

/** Returns true when the role may plan the work: schedule, start, attach the new map (mappers and admins). */
export function canPerformRemaps(role: Role): boolean {
  return role === 'admin' || role === 'mapper';
}

/** Returns true when a request is still waiting for the customer's approval (proposed by a mapper, not yet approved). */
export function awaitsApproval(remap: Pick<RemapRequest, 'status' | 'approvedAt'>): boolean {
  return remap.status === 'proposed' && remap.approvedAt === null;
}

/** A step the signed-in user may take with a request now. */
export type RemapAction = 'approve' | 'schedule' | 'reschedule' | 'start' | 'attach-map' | 'cancel';

/**
 * Returns the steps `role` may take with `remap` in its present state, in the order the header
 * shows them: approve (site managers, admins) while a mapper's proposal waits; schedule once
 * approved and reschedule while scheduled, start when scheduled, attach the remap run's map while
 * in progress, while the attached one is not active (a draft, or rolled back), or after "not fixed" (mappers, admins);
 * cancel until verified (site managers, mappers, admins).
 */
export function allowedRemapActions(remap: Pick<RemapRequest, 'status' | 'approvedAt' | 'mapVersionAfter'>, role: Role): RemapAction[] {
  const actions: RemapAction[] = [];
  const manager = role === 'admin' || role === 'site_manager';
  const performer = canPerformRemaps(role);
  const { status } = remap;
  if (manager && awaitsApproval(remap)) actions.push('approve');
  if (performer && status === 'proposed' && !awaitsApproval(remap)) actions.push('schedule');
  if (performer && status === 'scheduled') actions.push('start', 'reschedule');
  const attachable = status === 'in_progress' || status === 'not_fixed' || (status === 'map_uploaded' && remap.mapVersionAfter?.status !== 'active');
  if (performer && attachable) actions.push('attach-map');
  if (role !== 'viewer' && status !== 'verified' && status !== 'cancelled') actions.push('cancel');
  return actions;
}

/** Returns a duration in minutes in words: "45 min", "2 h", "1 h 40 min" (rounded to whole minutes). */
export function durationWords(minutes: number): string {
  const total = Math.max(0, Math.round(minutes));
  const hours = Math.floor(total / 60);
  const rest = total % 60;
  if (hours === 0) return `${rest} min`;
  return rest === 0 ? `${hours} h` : `${hours} h ${rest} min`;
}

/** Returns the estimate the way the team says it: "≈ 1 h 40 min incl. setup". */
export function estimateWords(totalMinutes: number): string {
  return `≈ ${durationWords(totalMinutes)} incl. setup`;
}

/** Splits a site-local 'YYYY-MM-DD HH:mm' into its day and time. */
function splitLocal(local: string): { day: string; time: string } {
  const [day, time] = local.split(' ');
  return { day, time: time ?? '' };
}

/** Returns the weekday, day and month of a site-local 'YYYY-MM-DD' ("Tue 8 Dec"), with the year when it differs from `referenceYear`. */
export function localDayWords(day: string, referenceYear?: number): string {
  // A calendar day, read as UTC midnight and written in UTC, so the browser's own zone cannot move it.
  const date = new Date(`${day}T00:00:00Z`);
  const withYear = referenceYear !== undefined && date.getUTCFullYear() !== referenceYear;
  const part = (options: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat('en-GB', { ...options, timeZone: 'UTC' }).format(date);
  // Built from parts: Intl puts a comma after the weekday once a year is added.
  const words = `${part({ weekday: 'short' })} ${date.getUTCDate()} ${part({ month: 'short' })}`;
  return withYear ? `${words} ${date.getUTCFullYear()}` : words;
}

/**
 * Returns a site-local window in words: "Tue 8 Dec, 02:00–03:40", or with both days when it runs
 * past midnight ("Tue 8 Dec, 23:30 – Wed 9 Dec, 01:10").
 */
export function localWindowWords(localStart: string, localEnd: string, referenceYear?: number): string {
  const start = splitLocal(localStart);
  const end = splitLocal(localEnd);
  if (start.day === end.day) return `${localDayWords(start.day, referenceYear)}, ${start.time}–${end.time}`;
  return `${localDayWords(start.day, referenceYear)}, ${start.time} – ${localDayWords(end.day, referenceYear)}, ${end.time}`;
}

/** Returns a share (0–1) as a percentage with one decimal ("91.2 %"), or "no returns" for null. */
export function agreementWords(share: number | null): string {
  return share === null ? 'no returns' : `${(100 * share).toFixed(1)} %`;
}

/** Returns the before → after sentence of a verification: "agreement 91.2 % → 98.6 %, changed area 14.2 → 0.4 m²". */
export function beforeAfterWords(before: { agreement: number | null; changedAreaM2: number }, after: { agreement: number | null; changedAreaM2: number } | null): string {
  const area = (m2: number) => m2.toFixed(1);
  if (!after) return `agreement ${agreementWords(before.agreement)}, changed area ${area(before.changedAreaM2)} m² before the new map`;
  // Without a complete day of evidence on the new map there is no "after" agreement yet, only the zones found so far.
  const afterAgreement = after.agreement === null ? 'not measured yet' : agreementWords(after.agreement);
  return `agreement ${agreementWords(before.agreement)} → ${afterAgreement}, changed area ${area(before.changedAreaM2)} → ${area(after.changedAreaM2)} m²`;
}

/** Returns true when a zone in this status may join a new remap request (open or acknowledged; the server answers 409 otherwise). */
export function isPlannableZoneStatus(status: ZoneStatus): boolean {
  return status === 'open' || status === 'acknowledged';
}
