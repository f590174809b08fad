import type { Box } from './shapes.js';

/** What a piece of the building is; used for surface properties and for the scenario's truth. */
export type StructureKind = 'wall' | 'dock-door' | 'rack' | 'pillar' | 'charger';

/** One solid piece of the invented building (metres, map frame). */
export interface Structure extends Box {
  /** Stable name, e.g. "rack-r3-b02" or "pillar-24-8". */
  id: string;
  kind: StructureKind;
}

/** A straight stretch of floor in metres where people or vehicles move. */
export interface Lane {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
  /** Half the usable width across the lane, metres. */
  halfWidth: number;
}

/** Size options of the invented warehouse (metres). */
export interface WarehouseOptions {
  /** Outer width along x, metres (default 60, at least 36). */
  width?: number;
  /** Outer depth along y, metres (default 40, at least 30). */
  depth?: number;
}

/** The invented building: structure, its named areas and the lanes robots, people and forklifts use. */
export interface WarehouseLayout {
  /** Outer width along x, metres. */
  width: number;
  /** Outer depth along y, metres. */
  depth: number;
  /** Outer wall thickness, metres. */
  wallThickness: number;
  /** All day-0 structure. */
  structure: Structure[];
  /** Open staging band in front of the dock doors (south side, y small). */
  staging: Box;
  /** Open floor east of the racks, north of the staging band. */
  openArea: Box;
  /** Charging corner (north-east) where robots park and charge. */
  chargingCorner: Box;
  /** Centre x of every rack aisle, metres, west to east (the first runs along the west wall). */
  aisleX: number[];
  /** y extent of the rack block, metres: aisles run from `rackMinY` to `rackMaxY`. */
  rackMinY: number;
  rackMaxY: number;
  /** Centre y of the cross aisle through the rack block, metres. */
  crossAisleY: number;
  /** Centre y of the robots' east–west lane through the staging band, metres. */
  stagingLaneY: number;
  /** Centre y of the main aisle along the north wall, metres. */
  northAisleY: number;
  /** Rack bays by row then bay (each a `rack` structure). */
  rackBays: Structure[][];
  /** Lanes people walk along (rack aisles and the cross aisle). */
  walkways: Lane[];
  /** Lane a forklift drives along (through the staging band). */
  forkliftLane: Lane;
}

// Building figures below are invented for the scenario; proportions follow common practice
// for a small warehouse (from memory): 3 m aisles, 1.1 m deep pallet racks back to back,
// 2.7 m bays, a 12 m staging band in front of the dock doors.
const WALL = 0.3;
const RACK_DEPTH = 2.2;
const AISLE = 3.0;
const BAY = 2.7;
const STAGING_DEPTH = 12;
const OPEN_AREA_WIDTH = 16;
const NORTH_AISLE = 4.7;
const CROSS_AISLE = 3.0;
const DOOR_WIDTH = 3;
const DOOR_PITCH = 5;
const PILLAR = 0.4;

/** Builds the invented warehouse with its outer walls at x ∈ [0, width], y ∈ [0, depth] (metres). */
export function buildWarehouse(options: WarehouseOptions = {}): WarehouseLayout {
  const width = options.width ?? 60;
  const depth = options.depth ?? 40;
  if (!(width >= 36) || !(depth >= 30)) {
    throw new RangeError(`The warehouse must be at least 36 m × 30 m; got ${width} m × ${depth} m.`);
  }
  const structure: Structure[] = [];
  const add = (id: string, kind: StructureKind, minX: number, minY: number, maxX: number, maxY: number): Structure => {
    const s = { id, kind, minX, minY, maxX, maxY };
    structure.push(s);
    return s;
  };

  // Outer walls; the south (dock) wall is broken by recessed roller doors.
  add('wall-north', 'wall', 0, depth - WALL, width, depth);
  add('wall-west', 'wall', 0, 0, WALL, depth - WALL);
  add('wall-east', 'wall', width - WALL, 0, width, depth - WALL);
  const doorStart = 8;
  const doorEnd = width - OPEN_AREA_WIDTH;
  let x = WALL;
  let door = 1;
  for (let dx = doorStart; dx + DOOR_WIDTH <= doorEnd; dx += DOOR_PITCH) {
    add(`wall-south-${door}`, 'wall', x, 0, dx, WALL);
    // Doors sit 0.2 m behind the wall's inner face, so the dock side has a stepped outline.
    add(`dock-door-${door}`, 'dock-door', dx, -0.2, dx + DOOR_WIDTH, 0.1);
    x = dx + DOOR_WIDTH;
    door++;
  }
  add(`wall-south-${door}`, 'wall', x, 0, width - WALL, WALL);

  // Rack block: double rows along y, aisles between them, a cross aisle through the middle.
  const rackMinY = STAGING_DEPTH + 2;
  const rackMaxY = depth - NORTH_AISLE;
  const crossAisleY = (rackMinY + rackMaxY) / 2;
  const rackEastLimit = width - OPEN_AREA_WIDTH;
  const firstRowX = WALL + AISLE + 0.7;
  const rows = Math.floor((rackEastLimit - firstRowX + AISLE) / (RACK_DEPTH + AISLE));
  const aisleX = [(WALL + firstRowX) / 2];
  const rackBays: Structure[][] = [];
  for (let r = 0; r < rows; r++) {
    const x0 = firstRowX + r * (RACK_DEPTH + AISLE);
    const bays: Structure[] = [];
    const runs: [number, number][] = [
      [rackMinY, crossAisleY - CROSS_AISLE / 2],
      [crossAisleY + CROSS_AISLE / 2, rackMaxY],
    ];
    for (const [y0, y1] of runs) {
      const n = Math.floor((y1 - y0) / BAY);
      // Centre the whole bays in the run, leaving equal slack at both ends.
      const start = y0 + (y1 - y0 - n * BAY) / 2;
      for (let b = 0; b < n; b++) {
        const id = `rack-r${r + 1}-b${String(bays.length + 1).padStart(2, '0')}`;
        bays.push(add(id, 'rack', x0, start + b * BAY, x0 + RACK_DEPTH, start + (b + 1) * BAY));
      }
    }
    rackBays.push(bays);
    aisleX.push(x0 + RACK_DEPTH + AISLE / 2);
  }
  const racksEast = firstRowX + rows * (RACK_DEPTH + AISLE) - AISLE;

  const staging: Box = { minX: WALL, minY: WALL, maxX: width - WALL, maxY: STAGING_DEPTH };
  const chargingCorner: Box = { minX: width - 8, minY: depth - 8, maxX: width - WALL, maxY: depth - WALL };
  const openArea: Box = { minX: racksEast + AISLE, minY: STAGING_DEPTH, maxX: width - WALL, maxY: chargingCorner.minY };

  // Building columns: a row through the staging band between lanes, and two in the open area.
  const stagingLaneY = STAGING_DEPTH - 2;
  for (let px = 12; px < width - 6; px += 12) {
    add(`pillar-${px}-7`, 'pillar', px - PILLAR / 2, 7 - PILLAR / 2, px + PILLAR / 2, 7 + PILLAR / 2);
  }
  const openMidX = (openArea.minX + openArea.maxX) / 2;
  for (const py of [openArea.minY + 4, openArea.maxY - 3]) {
    const id = `pillar-${Math.round(openMidX)}-${Math.round(py)}`;
    add(id, 'pillar', openMidX - PILLAR / 2, py - PILLAR / 2, openMidX + PILLAR / 2, py + PILLAR / 2);
  }

  // Charging stations against the east wall, 2 m apart.
  for (let k = 0; k < 3; k++) {
    const cy = chargingCorner.maxY - 1.5 - 2 * k;
    add(`charger-${k + 1}`, 'charger', width - WALL - 0.35, cy - 0.3, width - WALL, cy + 0.3);
  }

  const northAisleY = depth - NORTH_AISLE / 2 - 0.3;
  const walkways: Lane[] = aisleX.map((ax) => ({ x0: ax, y0: rackMinY, x1: ax, y1: rackMaxY, halfWidth: 1.0 }));
  walkways.push({ x0: aisleX[0], y0: crossAisleY, x1: aisleX[aisleX.length - 1], y1: crossAisleY, halfWidth: 1.0 });
  const forkliftLane: Lane = { x0: 4, y0: 4.5, x1: width - 6, y1: 4.5, halfWidth: 0.5 };

  return {
    width,
    depth,
    wallThickness: WALL,
    structure,
    staging,
    openArea,
    chargingCorner,
    aisleX,
    rackMinY,
    rackMaxY,
    crossAisleY,
    stagingLaneY,
    northAisleY,
    rackBays,
    walkways,
    forkliftLane,
  };
}
