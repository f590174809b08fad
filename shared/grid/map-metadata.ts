import { parse, stringify } from 'yaml';
import { z } from 'zod';
import type { MapMetadata } from '../types/grid.js';
import { formatCount, GridFormatError } from './errors.js';

/** Default occupied threshold of the PGM + YAML map convention (common practice). */
export const DEFAULT_OCCUPIED_THRESH = 0.65;
/** Default free threshold of the PGM + YAML map convention (common practice). */
export const DEFAULT_FREE_THRESH = 0.196;

// zod 4's z.number() already refuses NaN and ±Infinity (YAML's .nan / .inf), hence one message.
const finite = (field: string) => z.number({ error: `The map metadata's "${field}" must be a finite number.` });

const threshold = (field: string, fallback: number) =>
  finite(field)
    .refine((v) => v >= 0 && v <= 1, { message: `The map metadata's "${field}" must lie between 0 and 1.` })
    .default(fallback);

// Field names follow the file convention (snake_case); the schema maps them onto MapMetadata.
const schema = z
  .object(
    {
      image: z
        .string({ error: 'The map metadata must name its "image" file.' })
        .trim()
        .min(1, { message: 'The map metadata must name its "image" file.' }),
      resolution: finite('resolution').refine((v) => v > 0, {
        message: 'The map metadata\'s "resolution" must be greater than 0 metres per cell.',
      }),
      origin: z.tuple([finite('origin x'), finite('origin y'), finite('origin yaw')], {
        error: 'The map metadata\'s "origin" must be a list of three numbers [x, y, yaw].',
      }),
      negate: z
        .union([z.literal(0), z.literal(1)], { error: 'The map metadata\'s "negate" must be 0 or 1.' })
        .default(0),
      occupied_thresh: threshold('occupied_thresh', DEFAULT_OCCUPIED_THRESH),
      free_thresh: threshold('free_thresh', DEFAULT_FREE_THRESH),
      mode: z
        .enum(['trinary', 'scale', 'raw'], { error: 'The map metadata\'s "mode" must be trinary, scale or raw.' })
        .default('trinary'),
    },
    { error: 'The map metadata must be a YAML mapping of fields such as image and resolution.' },
  )
  .refine((m) => m.free_thresh < m.occupied_thresh, {
    message: 'The map metadata\'s "free_thresh" must be smaller than its "occupied_thresh".',
  });

/** Longest metadata file accepted, characters: the convention's file is a few lines (product choice). */
export const MAP_METADATA_MAX_CHARS = 8 * 1024;
/** Deepest nesting of flow lists and mappings accepted; the convention needs one level, for origin (product choice). */
export const MAP_METADATA_MAX_DEPTH = 8;

/**
 * Refuses metadata too long or too deeply nested to be a map's before the YAML parser sees it: the
 * parser's time grows with nesting depth (a million brackets took half a minute), a plain scan does not.
 */
function checkSize(yamlText: string): void {
  if (yamlText.length > MAP_METADATA_MAX_CHARS) {
    throw new GridFormatError(`The map metadata file holds ${formatCount(yamlText.length)} characters; a map's metadata is a few lines, and at most ${formatCount(MAP_METADATA_MAX_CHARS)} are accepted.`);
  }
  let depth = 0;
  let quote = '';
  for (let k = 0; k < yamlText.length; k++) {
    const c = yamlText[k];
    if (quote) {
      if (c === quote) quote = '';
      else if (c === '\n') quote = '';
      continue;
    }
    if (c === '"' || c === "'") quote = c;
    else if (c === '#' && (k === 0 || /\s/.test(yamlText[k - 1]))) {
      while (k < yamlText.length && yamlText[k] !== '\n') k++;
    } else if (c === '[' || c === '{') {
      if (++depth > MAP_METADATA_MAX_DEPTH) {
        throw new GridFormatError(`The map metadata nests lists or mappings more than ${MAP_METADATA_MAX_DEPTH} deep; a map's metadata needs one level.`);
      }
    } else if (c === ']' || c === '}') depth = Math.max(0, depth - 1);
  }
}

/**
 * Parses map metadata YAML (image, resolution in m/cell, origin [x m, y m, yaw rad], negate,
 * occupied_thresh, free_thresh, mode) with the convention's defaults. Throws GridFormatError
 * naming the offending field.
 */
export function parseMapMetadata(yamlText: string): MapMetadata {
  checkSize(yamlText);
  let doc: unknown;
  try {
    // Warnings (an unknown tag) would go to the process log for every upload; the schema below
    // refuses what such a value turns into.
    doc = parse(yamlText, { logLevel: 'error' });
  } catch (e) {
    // The YAML library's own message names the line and column; keep only its first line.
    const detail = (e instanceof Error ? e.message : String(e)).split('\n')[0].replace(/[.:]\s*$/, '');
    throw new GridFormatError(`The map metadata is not valid YAML (${detail}).`);
  }
  const result = schema.safeParse(doc ?? undefined);
  if (!result.success) {
    throw new GridFormatError(result.error.issues[0].message);
  }
  const m = result.data;
  return {
    image: m.image,
    resolution: m.resolution,
    origin: [m.origin[0], m.origin[1], m.origin[2]],
    negate: m.negate,
    occupiedThresh: m.occupied_thresh,
    freeThresh: m.free_thresh,
    mode: m.mode,
  };
}

/** Writes map metadata as YAML in the PGM + YAML map convention (snake_case keys, origin as a flow list). */
export function formatMapMetadata(meta: MapMetadata): string {
  // stringify quotes the image name only when YAML needs it (spaces, colons, leading digits...).
  const image = stringify(meta.image).trimEnd();
  return [
    `image: ${image}`,
    `resolution: ${meta.resolution}`,
    `origin: [${meta.origin[0]}, ${meta.origin[1]}, ${meta.origin[2]}]`,
    `negate: ${meta.negate}`,
    `occupied_thresh: ${meta.occupiedThresh}`,
    `free_thresh: ${meta.freeThresh}`,
    `mode: ${meta.mode}`,
    '',
  ].join('\n');
}

/** Returns the last path component of a file name, for either slash direction. */
function basename(name: string): string {
  const parts = name.trim().split(/[\\/]/);
  return parts[parts.length - 1];
}

/**
 * Throws GridFormatError when the metadata's image (compared by basename) is not the uploaded
 * image file; returns nothing when they match.
 */
export function checkImageName(meta: MapMetadata, uploadedFileName: string): void {
  const named = basename(meta.image);
  const uploaded = basename(uploadedFileName);
  if (named !== uploaded) {
    throw new GridFormatError(
      `The map metadata names the image "${named}" but the uploaded image is "${uploaded}".`,
    );
  }
}
