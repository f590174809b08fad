// Pure helpers of the map-version comparison: which versions a version can be compared with, the
// default choice, and the words and colours of the four classes of change.
// Relative imports with .js and no app types, so that the unit tests (and tsc over tests/) take it as it is.
import { DIFF_COLOURS } from '../../../shared/render/diff-tiles.js';

/** What these helpers read of a map version (a MapVersion of src/api/maps.api.ts fits). */
export interface VersionRef {
  id: string;
  version: number;
  kind: 'floor' | 'station';
  status: 'draft' | 'active' | 'archived';
  label: string;
}

/** Returns the floor versions `version` can be compared with: every other floor version of the site, newest first. */
export function compareCandidates<V extends VersionRef>(versions: readonly V[], version: VersionRef): V[] {
  return versions.filter((v) => v.kind === 'floor' && v.id !== version.id).sort((a, b) => b.version - a.version);
}

/**
 * Returns the version to compare with by default: the active floor map, unless `version` is the
 * active one itself, then the newest version before it (what it replaced), else the newest other;
 * null when there is no other floor version.
 */
export function defaultCompareWith<V extends VersionRef>(versions: readonly V[], version: VersionRef): V | null {
  const candidates = compareCandidates(versions, version);
  const active = candidates.find((v) => v.status === 'active');
  if (active) return active;
  return candidates.find((v) => v.version < version.version) ?? candidates[0] ?? null;
}

/** Returns a CSS rgba() colour of [r, g, b, a] bytes. */
export function rgbaCss([r, g, b, a]: readonly number[]): string {
  return `rgba(${r}, ${g}, ${b}, ${+(a / 255).toFixed(3)})`;
}

/** One class of change as the page names and colours it. */
export interface DiffClassRow {
  key: 'added' | 'removed' | 'revealed' | 'hidden';
  label: string;
  /** What the class means, in words, for the other version `o` against the base `b` (version numbers). */
  meaning: (b: number, o: number) => string;
  colour: string;
}

/** The four classes of change in the order the page shows them, with the overlay tiles' colours. */
export const DIFF_CLASS_ROWS: readonly DiffClassRow[] = [
  { key: 'added', label: 'Structure added', meaning: (b, o) => `occupied in v${o}, free or unknown in v${b}`, colour: rgbaCss(DIFF_COLOURS.added) },
  { key: 'removed', label: 'Structure removed', meaning: (b, o) => `free in v${o}, occupied in v${b}`, colour: rgbaCss(DIFF_COLOURS.removed) },
  { key: 'revealed', label: 'Unknown → known', meaning: (b, o) => `mapped in v${o}, unknown in v${b}`, colour: rgbaCss(DIFF_COLOURS.revealed) },
  { key: 'hidden', label: 'Known → unknown', meaning: (b, o) => `unknown in v${o} or past its edge, mapped in v${b}`, colour: rgbaCss(DIFF_COLOURS.hidden) },
];

/** Returns a version's name for choices and sentences ("version 3 (active) · Commissioning map"). */
export function versionName(v: Pick<VersionRef, 'version' | 'status' | 'label'>): string {
  const status = v.status === 'active' ? ' (active)' : v.status === 'draft' ? ' (draft)' : ' (archived)';
  return `version ${v.version}${status}${v.label ? ` · ${v.label}` : ''}`;
}
