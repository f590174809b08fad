import { appConfig } from '@/config';
import { apiRequest } from './client';
import { postForm, type UploadOptions } from './upload';

export type MapKind = 'floor' | 'station';
export type MapStatus = 'draft' | 'active' | 'archived';
export type MapMode = 'trinary' | 'scale' | 'raw';

/** How the image's grey values were read into free, occupied and unknown cells. */
export interface MapInterpretation {
  negate: 0 | 1;
  occupiedThresh: number;
  freeThresh: number;
  mode: MapMode;
}

/** One uploaded grid map of a site: resolution in m/cell, origin in metres and radians, sizes in cells and metres. */
export interface MapVersion {
  id: string;
  siteId: string;
  version: number;
  kind: MapKind;
  label: string;
  status: MapStatus;
  resolution: number;
  origin: { x: number; y: number; yaw: number };
  width: number;
  height: number;
  widthM: number;
  heightM: number;
  cells: { occupied: number; free: number; unknown: number };
  interpretation: MapInterpretation;
  sourceFileName: string;
  sourceChecksum: string;
  uploadedBy: { id: string; name: string } | null;
  uploadedAt: string;
  activatedAt: string | null;
}

/** Metadata typed into the form when no YAML file comes with the image (PNG, or PGM without YAML). */
export interface MapFormMetadata {
  resolution: number;
  originX: number;
  originY: number;
  originYaw: number;
  negate: 0 | 1;
  occupiedThresh: number;
  freeThresh: number;
  mode: MapMode;
}

/** What one map upload sends: the image, and either its YAML file or the typed metadata. */
export interface MapUploadInput {
  kind: MapKind;
  label: string;
  image: File;
  metadataFile: File | null;
  form: MapFormMetadata | null;
}

const versionsPath = (siteId: string) => `/sites/${encodeURIComponent(siteId)}/map-versions`;
const versionPath = (siteId: string, versionId: string) => `${versionsPath(siteId)}/${encodeURIComponent(versionId)}`;

/** Returns a site's map versions (floors first, newest version first within each kind). */
export async function listMapVersions(siteId: string): Promise<MapVersion[]> {
  return (await apiRequest<{ mapVersions: MapVersion[] }>(versionsPath(siteId))).mapVersions;
}

/** Uploads a map image with its metadata; the server stores it as a draft and returns it, or refuses with a sentence. */
export async function uploadMapVersion(siteId: string, input: MapUploadInput, options: UploadOptions = {}): Promise<MapVersion> {
  const body = new FormData();
  body.set('kind', input.kind);
  body.set('label', input.label);
  body.set('image', input.image, input.image.name);
  if (input.metadataFile) {
    body.set('metadata', input.metadataFile, input.metadataFile.name);
  } else if (input.form) {
    for (const [field, value] of Object.entries(input.form)) body.set(field, String(value));
  }
  return (await postForm<{ mapVersion: MapVersion }>(versionsPath(siteId), body, options)).mapVersion;
}

/** Makes a floor version the site's active map; the previously active one is archived. */
export async function activateMapVersion(siteId: string, versionId: string): Promise<MapVersion> {
  return (await apiRequest<{ mapVersion: MapVersion }>(`${versionPath(siteId, versionId)}/activate`, { method: 'POST' })).mapVersion;
}

/** Returns the URL of a version's preview image in the map palette, longer side at most `size` pixels (64–2048). */
export function mapPreviewUrl(siteId: string, versionId: string, size: number): string {
  return `${appConfig.apiBaseUrl}${versionPath(siteId, versionId)}/preview.png?size=${Math.round(size)}`;
}
