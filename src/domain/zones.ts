import type { ZoneKind, ZonePersistence, ZoneStatus, ZoneStatusFilter } from '@/api/zones.api';
import type { TagTone } from '@/components/maps/MapsToneTag.vue';
import { palette } from '@/theme/palette';

/** Every zone kind, in the order the app lists them. */
export const zoneKinds: readonly ZoneKind[] = ['new', 'missing', 'unmapped'];

const kindColours: Record<ZoneKind, string> = { new: palette.amber, missing: palette.violet, unmapped: palette.teal };
const kindWords: Record<ZoneKind, string> = { new: 'new', missing: 'missing', unmapped: 'unmapped' };

/** Returns the map colour of a zone kind (new amber, missing violet, unmapped teal), as a CSS hex colour. */
export function kindColour(kind: ZoneKind): string {
  return kindColours[kind];
}

/** Returns the short word of a kind ("missing"). */
export function kindLabel(kind: ZoneKind): string {
  return kindWords[kind];
}

/** Returns what the kind means in a sentence ("missing structure"). */
export function kindPhrase(kind: ZoneKind): string {
  return `${kindWords[kind]} structure`;
}

/** Returns a persistence in words ("persistent", "intermittent"). */
export function persistenceLabel(persistence: ZonePersistence): string {
  return persistence;
}

const statusTags: Record<ZoneStatus, { label: string; tone: TagTone }> = {
  open: { label: 'open', tone: 'amber' },
  acknowledged: { label: 'acknowledged', tone: 'ink' },
  planned: { label: 'remap planned', tone: 'ink' },
  resolved: { label: 'resolved', tone: 'teal' },
  dismissed: { label: 'dismissed', tone: 'slate' },
  cleared: { label: 'no longer seen', tone: 'slate' },
};

/** Returns the words and tag tone of a zone status. */
export function zoneStatusTag(status: ZoneStatus): { label: string; tone: TagTone } {
  return statusTags[status];
}

/** The status filter's choices, 'active' (still to deal with) first. */
export const zoneStatusFilters: readonly { value: ZoneStatusFilter; label: string }[] = [
  { value: 'active', label: 'still to deal with' },
  ...(Object.keys(statusTags) as ZoneStatus[]).map((value) => ({ value, label: statusTags[value].label })),
];

/** Returns true when a zone in this status may still be acknowledged (the server answers 409 otherwise). */
export function mayAcknowledgeStatus(status: ZoneStatus): boolean {
  return status === 'open';
}

/** Returns true when a zone in this status may still be dismissed (the server answers 409 otherwise). */
export function mayDismissStatus(status: ZoneStatus): boolean {
  return status !== 'resolved' && status !== 'cleared' && status !== 'dismissed';
}
