/** Driftline's map colours (DESIGN.md §5) as [r, g, b] bytes. */
export const MAP_COLOURS = {
  free: [0xf6, 0xf3, 0xea],
  structure: [0x1e, 0x2a, 0x3f],
  unknown: [0xd5, 0xda, 0xe3],
  newStructure: [0xe3, 0x8b, 0x1b],
  missingStructure: [0x6a, 0x4b, 0xd6],
  unmappedStructure: [0x1c, 0x9a, 0x8a],
} as const satisfies Record<string, readonly [number, number, number]>;

/**
 * Version of how tiles look (these colours and the tile rule). Tile URLs carry it as `?style=` and
 * tile ETags include it, so bumping it after a colour change makes browsers fetch fresh tiles
 * despite their year-long immutable caching.
 */
export const TILE_STYLE = 1;
