/** What a map version models: a building floor, or a docking station at fine resolution. */
export type MapKind = 'floor' | 'station';

/** Resolution accepted per kind, metres per cell: floors centimetre-range, stations millimetre-range (common practice). */
export const RESOLUTION_BOUNDS: Readonly<Record<MapKind, readonly [number, number]>> = { floor: [0.01, 0.5], station: [0.0005, 0.01] };

/** Largest map image accepted, bytes: a 16-bit 4000 × 4000 PGM is 32 MB (product choice). */
export const MAP_IMAGE_MAX_BYTES = 64 * 1024 * 1024;
