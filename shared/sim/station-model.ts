/**
 * An invented charging station as a station model: an occupancy grid at millimetre-range
 * resolution (DESIGN §4.7) in the station's own frame, the nominal docking point at (0, 0) and
 * the robot approaching from −x. Behind the station a wall (x ≥ 0.30 m) hides what lies
 * beyond; the charger's housing is an outline (a laser sees no further into it), with two
 * contact pads in front and, optionally, guide rails that funnel the robot in.
 */
import { CellState, type MapMetadata, type OccupancyGrid } from '../types/grid.js';

/** Shape of the invented charger, metres. */
export interface ChargerShape {
  /** Width of the charger housing across the approach (y). */
  bodyWidthM: number;
  /** Guide rails from the housing's front corners outward. */
  funnel: boolean;
  /** Metres per cell (default 0.005: 5 mm). */
  resolution: number;
}

const DEFAULT_SHAPE: ChargerShape = { bodyWidthM: 0.32, funnel: true, resolution: 0.005 };
/** The model covers x ∈ [−0.40, 0.40] m and y ∈ [−0.30, 0.30] m. */
const EXTENT = { x0: -0.4, x1: 0.4, y0: -0.3, y1: 0.3 };
const WALL_X = 0.3;

/**
 * Returns the station model grid and the metadata a YAML file would hold (origin at the grid's
 * lower-left corner in the station frame). Memory: 2 bytes per cell (160 × 120 cells at 5 mm).
 */
export function chargerStationModel(shape: Partial<ChargerShape> = {}): { grid: OccupancyGrid; metadata: MapMetadata } {
  const s = { ...DEFAULT_SHAPE, ...shape };
  const res = s.resolution;
  const width = Math.round((EXTENT.x1 - EXTENT.x0) / res);
  const height = Math.round((EXTENT.y1 - EXTENT.y0) / res);
  const cells = new Uint8Array(width * height).fill(CellState.Free);
  // The small bias keeps a coordinate on a cell edge (0.175 m) in the cell it starts, despite rounding.
  const cellOf = (x: number, y: number) => [Math.floor((x - EXTENT.x0) / res + 1e-9), Math.floor((y - EXTENT.y0) / res + 1e-9)] as const;
  const set = (x: number, y: number, state: CellState) => {
    const [i, j] = cellOf(x, y);
    if (i >= 0 && i < width && j >= 0 && j < height) cells[j * width + i] = state;
  };
  const box = (x0: number, y0: number, x1: number, y1: number, state: CellState) => {
    for (let x = x0; x < x1; x += res / 2) for (let y = y0; y < y1; y += res / 2) set(x, y, state);
  };
  const line = (ax: number, ay: number, bx: number, by: number, thickness: number) => {
    const steps = Math.ceil(Math.hypot(bx - ax, by - ay) / (res / 2));
    for (let k = 0; k <= steps; k++) {
      const x = ax + ((bx - ax) * k) / steps;
      const y = ay + ((by - ay) * k) / steps;
      box(x - thickness / 2, y - thickness / 2, x + thickness / 2, y + thickness / 2, CellState.Occupied);
    }
  };

  // Beyond the wall nothing is seen; the wall itself is 30 mm of structure.
  box(WALL_X, EXTENT.y0, EXTENT.x1, EXTENT.y1, CellState.Unknown);
  box(WALL_X, EXTENT.y0, WALL_X + 0.03, EXTENT.y1, CellState.Occupied);
  // The housing: its inside is unknown, its outline structure.
  const half = s.bodyWidthM / 2;
  const front = 0.18;
  box(front, -half, WALL_X, half, CellState.Unknown);
  const t = 2 * res;
  line(front, -half, front, half, t);
  line(front, -half, WALL_X, -half, t);
  line(front, half, WALL_X, half, t);
  // Two contact pads stand 20 mm proud of the housing's front, either side of the centre line.
  box(front - 0.02, -0.06, front, -0.03, CellState.Occupied);
  box(front - 0.02, 0.03, front, 0.06, CellState.Occupied);
  if (s.funnel) {
    line(front, -half, 0.02, -half - 0.1, t);
    line(front, half, 0.02, half + 0.1, t);
  }

  const probability = new Uint8Array(cells.length);
  for (let k = 0; k < cells.length; k++) probability[k] = cells[k] === CellState.Occupied ? 255 : cells[k] === CellState.Free ? 0 : 128;
  const origin = { x: EXTENT.x0, y: EXTENT.y0, yaw: 0 };
  return {
    grid: { width, height, resolution: res, origin, cells, probability },
    metadata: { image: 'station.pgm', resolution: res, origin: [origin.x, origin.y, 0], negate: 0, occupiedThresh: 0.65, freeThresh: 0.196, mode: 'trinary' },
  };
}
