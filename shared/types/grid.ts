/** Cell states of an occupancy grid, as stored in `OccupancyGrid.cells`. */
export const CellState = { Free: 0, Occupied: 1, Unknown: 2 } as const;
export type CellState = (typeof CellState)[keyof typeof CellState];

/** Pose of the grid's cell (0, 0) lower-left corner in the map frame: metres and radians. */
export interface GridOrigin {
  x: number;
  y: number;
  yaw: number;
}

/** Size and placement of a grid: width/height in cells, resolution in metres per cell. */
export interface GridGeometry {
  width: number;
  height: number;
  resolution: number;
  origin: GridOrigin;
}

/**
 * An occupancy grid in Driftline's own layout. Row-major with row j counted from the map's
 * bottom edge: cell (i, j) is at index j * width + i (image row height − 1 − j).
 * Memory: 2 bytes per cell (state + probability).
 */
export interface OccupancyGrid extends GridGeometry {
  /** CellState per cell. */
  cells: Uint8Array;
  /** Occupancy probability per cell scaled to 0–255 (round(p · 255)); 255 where unknown in trinary mode is not special. */
  probability: Uint8Array;
}

/** Interpretation of a map image, per the common PGM + YAML map convention. */
export type MapMode = 'trinary' | 'scale' | 'raw';

/** Metadata that accompanies a grid image (the YAML file, or the upload form for PNG). */
export interface MapMetadata {
  image: string;
  resolution: number;
  origin: [number, number, number];
  negate: 0 | 1;
  occupiedThresh: number;
  freeThresh: number;
  mode: MapMode;
}
