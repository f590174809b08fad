/*
 * The checks the server makes on a map upload, repeated in the browser so that a person hears
 * about a typo before sending a large file. The server checks again and has the last word:
 * the limits come from shared/grid/map-kinds.ts, which the server uses too; keep the rest in step
 * with server/routes/map-versions.routes.ts and shared/grid/map-metadata.ts.
 */
import type { MapFormMetadata, MapKind, MapMode } from '@/api/maps.api';

/** Occupied threshold the PGM + YAML map convention assumes when none is given (common practice). */
export const DEFAULT_OCCUPIED_THRESH = 0.65;
/** Free threshold the PGM + YAML map convention assumes when none is given (common practice). */
export const DEFAULT_FREE_THRESH = 0.196;
import { MAP_IMAGE_MAX_BYTES, RESOLUTION_BOUNDS } from '../../../shared/grid/map-kinds';

export { MAP_IMAGE_MAX_BYTES, RESOLUTION_BOUNDS };

/** The metadata fields as the form holds them: numbers may still be empty. */
export interface MetadataDraft {
  resolution: number | null;
  originX: number | null;
  originY: number | null;
  originYaw: number | null;
  negate: boolean;
  occupiedThresh: number | null;
  freeThresh: number | null;
  mode: MapMode;
}

export type MetadataField = keyof MetadataDraft;

/** Returns a fresh form: origin at 0, the convention's thresholds, trinary mode; resolution left for the person to type. */
export function emptyMetadataDraft(): MetadataDraft {
  return { resolution: null, originX: 0, originY: 0, originYaw: 0, negate: false, occupiedThresh: DEFAULT_OCCUPIED_THRESH, freeThresh: DEFAULT_FREE_THRESH, mode: 'trinary' };
}

/** Returns a sentence per field that the server would refuse, for a map of this kind; empty when all is well. */
export function metadataProblems(kind: MapKind, draft: MetadataDraft): Partial<Record<MetadataField, string>> {
  const problems: Partial<Record<MetadataField, string>> = {};
  const [lo, hi] = RESOLUTION_BOUNDS[kind];
  if (draft.resolution === null) problems.resolution = 'Enter the resolution in metres per cell.';
  else if (draft.resolution <= 0) problems.resolution = 'The resolution must be greater than 0 m per cell.';
  else if (draft.resolution < lo || draft.resolution > hi) {
    problems.resolution = `A ${kind === 'floor' ? 'floor map' : 'station model'} needs a resolution between ${lo} and ${hi} m per cell.`;
  }
  if (draft.originX === null) problems.originX = 'Enter the x of the origin in metres.';
  if (draft.originY === null) problems.originY = 'Enter the y of the origin in metres.';
  if (draft.originYaw === null) problems.originYaw = 'Enter the yaw of the origin in radians.';
  else if (Math.abs(draft.originYaw) > Math.PI) problems.originYaw = 'The yaw must lie between −π and π radians.';
  for (const field of ['occupiedThresh', 'freeThresh'] as const) {
    const value = draft[field];
    if (value === null) problems[field] = 'Enter a threshold between 0 and 1.';
    else if (value < 0 || value > 1) problems[field] = 'A threshold must lie between 0 and 1.';
  }
  if (!problems.occupiedThresh && !problems.freeThresh && (draft.freeThresh as number) >= (draft.occupiedThresh as number)) {
    problems.freeThresh = 'The free threshold must be smaller than the occupied threshold.';
  }
  return problems;
}

/** Returns the draft as the API takes it; call only when metadataProblems found nothing. */
export function toFormMetadata(draft: MetadataDraft): MapFormMetadata {
  return {
    resolution: draft.resolution as number,
    originX: draft.originX as number,
    originY: draft.originY as number,
    originYaw: draft.originYaw as number,
    negate: draft.negate ? 1 : 0,
    occupiedThresh: draft.occupiedThresh as number,
    freeThresh: draft.freeThresh as number,
    mode: draft.mode,
  };
}

/** Returns what the server would say about the chosen files before anything is sent, or null when they may go. */
export function fileProblem(image: File | null, metadata: File | null): string | null {
  if (!image) return 'Choose the map image (.pgm or .png).';
  if (!/\.(pgm|png)$/i.test(image.name)) return `“${image.name}” is not a .pgm or .png image.`;
  if (image.size === 0) return `“${image.name}” is empty.`;
  if (image.size > MAP_IMAGE_MAX_BYTES) return `“${image.name}” is larger than the ${MAP_IMAGE_MAX_BYTES / 1024 / 1024} MB the server accepts for a map image.`;
  if (metadata && !/\.ya?ml$/i.test(metadata.name)) return `“${metadata.name}” is not a .yaml metadata file.`;
  return null;
}

/** True when the image file is a PNG by its name: PNG maps carry no metadata file, so the form asks for it. */
export function isPngName(name: string): boolean {
  return /\.png$/i.test(name);
}
