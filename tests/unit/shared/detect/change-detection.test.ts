import { describe, expect, it } from 'vitest';
import { detectChanges, DETECTION_DEFAULTS, type DayCounters, type DetectionResult, type DetectionSettings, type ZoneCandidate } from '../../../../shared/detect/change-detection.js';
import { polygonArea } from '../../../../shared/detect/outline.js';
import { distanceTransform } from '../../../../shared/grid/distance-transform.js';
import { gridFrameToWorld } from '../../../../shared/grid/transform.js';
import { createRng } from '../../../../shared/sim/random.js';
import { wilsonInterval, Z_95 } from '../../../../shared/stats/wilson.js';
import { CellState, type OccupancyGrid } from '../../../../shared/types/grid.js';
import { buildScenarioEvidence, type ScenarioEvidence } from './scenario-evidence.js';

const RES = 0.05;

/** A hand-made grid: all free, then the given rectangles (inclusive cell ranges) set to a state. */
function makeGrid(width: number, height: number, rects: { i0: number; j0: number; i1: number; j1: number; state: number }[], yaw = 0, origin: [number, number] = [0, 0]): OccupancyGrid {
  const cells = new Uint8Array(width * height).fill(CellState.Free);
  for (const r of rects) for (let j = r.j0; j <= r.j1; j++) for (let i = r.i0; i <= r.i1; i++) cells[j * width + i] = r.state;
  return { width, height, resolution: RES, origin: { x: origin[0], y: origin[1], yaw }, cells, probability: new Uint8Array(width * height) };
}

/** Distance in cells to the nearest mapped-occupied cell, as the server computes it. */
function occupiedDistance(grid: OccupancyGrid): Float32Array {
  const mask = new Uint8Array(grid.cells.length);
  for (let k = 0; k < mask.length; k++) mask[k] = grid.cells[k] === CellState.Occupied ? 1 : 0;
  return distanceTransform(mask, grid.width, grid.height).values;
}

/** One day's counters being drawn by hand: beams run up a column from row 0 and end at a row. */
class Day {
  readonly hits: Uint32Array;
  readonly passes: Uint32Array;
  constructor(readonly grid: OccupancyGrid) {
    this.hits = new Uint32Array(grid.width * grid.height);
    this.passes = new Uint32Array(grid.width * grid.height);
  }
  /** A beam up column i from row 0: a pass in rows below `end`, a hit in row `end` (no hit when end ≥ height). */
  beamUp(i: number, end: number, count = 1): void {
    const w = this.grid.width;
    for (let j = 0; j < Math.min(end, this.grid.height); j++) this.passes[j * w + i] += count;
    if (end < this.grid.height) this.hits[end * w + i] += count;
  }
}

function dateOf(d: number): string {
  return new Date(Date.UTC(2026, 10, 2 + d)).toISOString().slice(0, 10);
}

/** Builds `count` days with `draw(day, d)` and returns them as the iterable factory detectChanges takes. */
function makeDays(grid: OccupancyGrid, count: number, draw: (day: Day, d: number) => void): () => Iterable<DayCounters> {
  const list: DayCounters[] = [];
  for (let d = 0; d < count; d++) {
    const day = new Day(grid);
    draw(day, d);
    list.push({ day: dateOf(d), hits: day.hits, passes: day.passes });
  }
  return () => list;
}

function run(grid: OccupancyGrid, days: () => Iterable<DayCounters>, settings: Partial<DetectionSettings> = {}): DetectionResult {
  return detectChanges(grid, occupiedDistance(grid), days, settings);
}

/** Indices of the cells in an inclusive rectangle, ascending. */
function rectCells(width: number, i0: number, j0: number, i1: number, j1: number): number[] {
  const out: number[] = [];
  for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) out.push(j * width + i);
  return out;
}

// A 60 × 60 cell room: a back wall along row 50 that stays, beams coming up every column.
const W = 60;
const H = 60;
const BACK_WALL = { i0: 0, j0: 50, i1: W - 1, j1: 50, state: CellState.Occupied };
const BEHIND_BACK = { i0: 0, j0: 51, i1: W - 1, j1: H - 1, state: CellState.Unknown };
const BEAMS_PER_COLUMN = 6;

/**
 * Beams up every column ending on the back wall, endpoints scattered ±1 cell (pose and range
 * noise), except the columns `[skipFrom, skipTo]` where something stands in front of it today.
 */
function backWallBeams(day: Day, rng: ReturnType<typeof createRng>, skipFrom = -1, skipTo = -1): void {
  for (let i = 0; i < W; i++) {
    if (i >= skipFrom && i <= skipTo) continue;
    for (let b = 0; b < BEAMS_PER_COLUMN; b++) day.beamUp(i, 50 + rng.int(3) - 1);
  }
}

/**
 * Beams up columns i0…i1 into a stack of goods in rows j0…j1 that stops half of the beams reaching
 * each row (the last row stops the rest), so every cell of the stack returns about half its beams.
 */
function stackBeams(day: Day, i0: number, i1: number, j0: number, j1: number, perColumn = 64): void {
  for (let i = i0; i <= i1; i++) {
    let left = perColumn;
    for (let j = j0; j <= j1 && left > 0; j++) {
      const stopped = j === j1 ? left : Math.ceil(left / 2);
      day.beamUp(i, j, stopped);
      left -= stopped;
    }
  }
}

describe('detectChanges on hand-made grids', () => {
  it('when a wall is still there and its returns scatter ±2 cells, then no zone is reported', () => {
    // Arrange: a wall along row 30 (unknown behind it); endpoints at rows 28…32.
    const grid = makeGrid(W, H, [{ i0: 0, j0: 30, i1: W - 1, j1: 30, state: CellState.Occupied }, { i0: 0, j0: 31, i1: W - 1, j1: H - 1, state: CellState.Unknown }]);
    const rng = createRng(11);
    const days = makeDays(grid, 14, (day) => {
      for (let i = 0; i < W; i++) for (let b = 0; b < 10; b++) day.beamUp(i, 30 + rng.int(5) - 2);
    });

    // Act
    const result = run(grid, days);

    // Assert
    expect(result.zones).toEqual([]);
    expect(result.figures.days).toBe(14);
    expect(result.figures.cellsObserved).toBeGreaterThan(W * 25);
  });

  it("when a wall's cells now get only passes, then one 'missing' zone holds exactly the wall's cells", () => {
    // Arrange: a mapped wall along row 20, columns 10…40; beams now run through it to the back wall.
    const wall = { i0: 10, j0: 20, i1: 40, j1: 20, state: CellState.Occupied };
    const grid = makeGrid(W, H, [wall, BACK_WALL, BEHIND_BACK]);
    const rng = createRng(12);
    const days = makeDays(grid, 14, (day) => backWallBeams(day, rng));

    // Act
    const result = run(grid, days);

    // Assert
    expect(result.zones.length).toBe(1);
    const zone = result.zones[0];
    expect(zone.kind).toBe('missing');
    expect(zone.persistence).toBe('persistent');
    expect([...zone.cells]).toEqual(rectCells(W, 10, 20, 40, 20));
    expect(zone.areaM2).toBeCloseTo(31 * RES * RES, 12);
    expect(zone.meanHitRate).toBe(0);
    expect(zone.daysFlagged).toBe(14);
    expect(zone.firstFlaggedDay).toBe(dateOf(0));
    expect(zone.lastFlaggedDay).toBe(dateOf(13));
    expect(result.figures.cellsFlagged).toEqual({ new: 0, missing: 31, unmapped: 0 });
  });

  it("when a box stands in free space, then one 'new' zone covers it and its outline's shoelace area is cellCount × res²", () => {
    // Arrange: returns land in the box's rows 24…29 of columns 20…27, far from any mapped structure.
    const grid = makeGrid(W, H, [BACK_WALL, BEHIND_BACK]);
    const rng = createRng(13);
    const days = makeDays(grid, 14, (day) => {
      backWallBeams(day, rng, 20, 27);
      stackBeams(day, 20, 27, 24, 29);
    });

    // Act
    const result = run(grid, days);

    // Assert
    expect(result.zones.length).toBe(1);
    const zone = result.zones[0];
    expect(zone.kind).toBe('new');
    expect(zone.persistence).toBe('persistent');
    expect([...zone.cells]).toEqual(rectCells(W, 20, 24, 27, 29));
    // An exact cell-edge outline of a hole-free zone encloses exactly its cells (shoelace formula;
    // common practice), so its area is cellCount × res².
    const outline = Float64Array.from(zone.outline.flat());
    expect(polygonArea(outline)).toBeCloseTo(zone.cellCount * RES * RES, 10);
    expect(zone.bbox).toEqual([20 * RES, 24 * RES, 28 * RES, 30 * RES].map((v) => expect.closeTo(v, 12)));
    expect(zone.centroid[0]).toBeCloseTo(24 * RES, 12);
    expect(zone.centroid[1]).toBeCloseTo(27 * RES, 12);
    expect(zone.trafficPerM2PerDay).toBeGreaterThan(0);
    expect(zone.severity).toBeGreaterThan(0);
    expect(zone.severity).toBeLessThanOrEqual(1);
  });

  it("when hits land in mapped-unknown space far from structure, then the zone is 'unmapped'", () => {
    // Arrange: the map leaves a patch unknown (rows 15…40, columns 10…45); a box stands inside it.
    const grid = makeGrid(W, H, [BACK_WALL, BEHIND_BACK, { i0: 10, j0: 15, i1: 45, j1: 40, state: CellState.Unknown }]);
    const rng = createRng(14);
    const days = makeDays(grid, 14, (day) => {
      backWallBeams(day, rng, 20, 27);
      stackBeams(day, 20, 27, 24, 29);
    });

    // Act
    const result = run(grid, days);

    // Assert
    expect(result.zones.map((z) => z.kind)).toEqual(['unmapped']);
    expect([...result.zones[0].cells]).toEqual(rectCells(W, 20, 24, 27, 29));
  });

  it('when a change is present on 4 of 10 days, then its zone is intermittent with those 4 days flagged', () => {
    // Arrange: on the other days the beams pass the box's place and end on the back wall.
    const present = new Set([1, 4, 6, 8]);
    const grid = makeGrid(W, H, [BACK_WALL, BEHIND_BACK]);
    const rng = createRng(15);
    const days = makeDays(grid, 10, (day, d) => {
      backWallBeams(day, rng, 20, 27);
      if (present.has(d)) stackBeams(day, 20, 27, 24, 29);
      else for (let i = 20; i <= 27; i++) day.beamUp(i, 50, 64);
    });

    // Act
    const result = run(grid, days);

    // Assert
    expect(result.zones.length).toBe(1);
    const zone = result.zones[0];
    expect(zone.kind).toBe('new');
    expect(zone.persistence).toBe('intermittent');
    expect(zone.daysFlagged).toBe(4);
    expect(zone.timeline.filter((t) => t.flagged).map((t) => t.day)).toEqual([...present].map(dateOf));
    expect(zone.firstFlaggedDay).toBe(dateOf(1));
    expect(zone.lastFlaggedDay).toBe(dateOf(8));
    // Decided days from the first flagged day (index 1) on: 9 of the 10.
    expect(zone.daysObserved).toBe(9);
  });

  it('when a change starts on day 8 of 14 and stays, then its zone is persistent and first flagged on day 8', () => {
    // Arrange: days 1…7 see free floor where the box will stand; days 8…14 see the box.
    const grid = makeGrid(W, H, [BACK_WALL, BEHIND_BACK]);
    const rng = createRng(16);
    const days = makeDays(grid, 14, (day, d) => {
      backWallBeams(day, rng, 20, 27);
      if (d >= 7) stackBeams(day, 20, 27, 24, 29);
      else for (let i = 20; i <= 27; i++) day.beamUp(i, 50, 64);
    });

    // Act
    const result = run(grid, days);

    // Assert
    expect(result.zones.length).toBe(1);
    const zone = result.zones[0];
    expect(zone.persistence).toBe('persistent');
    expect(zone.firstFlaggedDay).toBe(dateOf(7));
    expect(zone.daysFlagged).toBe(7);
    // The seven clear days before it began do not count against it, nor as observed since.
    expect(zone.daysObserved).toBe(7);
  });

  it('when people walk through and leave sparse random hits in free space, then nothing is flagged', () => {
    // Arrange: 2 % of the beams end early at a random row (a person crossing the beam), every day.
    const grid = makeGrid(W, H, [BACK_WALL, BEHIND_BACK]);
    const rng = createRng(17);
    const days = makeDays(grid, 14, (day) => {
      for (let i = 0; i < W; i++) {
        for (let b = 0; b < 12; b++) day.beamUp(i, rng.chance(0.02) ? 3 + rng.int(44) : 50 + rng.int(3) - 1);
      }
    });

    // Act
    const result = run(grid, days);

    // Assert
    expect(result.zones).toEqual([]);
    expect(result.figures.cellsFlagged).toEqual({ new: 0, missing: 0, unmapped: 0 });
  });

  it('when the grid is turned by its origin yaw, then the outline and bbox are in the map frame', () => {
    // Arrange: origin (10, 5) turned 90° counter-clockwise; the box of the 'new' test.
    const yaw = Math.PI / 2;
    const grid = makeGrid(W, H, [BACK_WALL, BEHIND_BACK], yaw, [10, 5]);
    const rng = createRng(13);
    const days = makeDays(grid, 14, (day) => {
      backWallBeams(day, rng, 20, 27);
      stackBeams(day, 20, 27, 24, 29);
    });

    // Act
    const zone = run(grid, days).zones[0];

    // Assert: a 90° origin yaw maps grid (u, v) cells to x = 10 − v·res, y = 5 + u·res (rotation
    // about the origin, DESIGN §4.1); corners (20, 24) and (28, 30) bound the box.
    const a = gridFrameToWorld(grid, 20, 24);
    const b = gridFrameToWorld(grid, 28, 30);
    expect(zone.bbox[0]).toBeCloseTo(Math.min(a.x, b.x), 9);
    expect(zone.bbox[1]).toBeCloseTo(Math.min(a.y, b.y), 9);
    expect(zone.bbox[2]).toBeCloseTo(Math.max(a.x, b.x), 9);
    expect(zone.bbox[3]).toBeCloseTo(Math.max(a.y, b.y), 9);
    const outline = Float64Array.from(zone.outline.flat());
    expect(Math.abs(polygonArea(outline))).toBeCloseTo(zone.cellCount * RES * RES, 10);
    expect(zone.centroid[0]).toBeCloseTo(10 - 27 * RES, 9);
    expect(zone.centroid[1]).toBeCloseTo(5 + 24 * RES, 9);
  });
});

describe('detectChanges and the Wilson bounds of shared/stats/wilson.ts', () => {
  /** A missing wall whose 31 cells each get exactly `passes` passes (no hits) over one day. */
  function wallWithPasses(passes: number): { grid: OccupancyGrid; days: () => Iterable<DayCounters> } {
    const grid = makeGrid(W, H, [{ i0: 10, j0: 20, i1: 40, j1: 20, state: CellState.Occupied }, BACK_WALL, BEHIND_BACK]);
    const rng = createRng(21);
    const days = makeDays(grid, 1, (day) => {
      for (let i = 0; i < W; i++) {
        // Columns through the wall get exactly `passes` beams, all ending on the back wall.
        const count = i >= 10 && i <= 40 ? passes : BEAMS_PER_COLUMN;
        for (let b = 0; b < count; b++) day.beamUp(i, 50 + rng.int(3) - 1);
      }
    });
    return { grid, days };
  }

  it('when a wall cell has 0 hits in 20 beams, then it is missing exactly when missingUpperMax exceeds the Wilson upper bound 0.1611', () => {
    // Source: Newcombe, "Two-sided confidence intervals for the single proportion", Statistics in
    // Medicine 17 (1998), worked example 0/20 → Wilson upper bound 0.1611 (from memory).
    const { grid, days } = wallWithPasses(20);
    const settings = { minDaysFlagged: 1, minZoneAreaM2: 0.05 };

    // Act
    const above = run(grid, days, { ...settings, missingUpperMax: 0.162 });
    const below = run(grid, days, { ...settings, missingUpperMax: 0.161 });

    // Assert
    expect(above.zones.map((z) => z.kind)).toEqual(['missing']);
    expect(below.zones).toEqual([]);
  });

  it("when a zone is reported, then its interval is shared/stats/wilson.ts's interval of its hits and beams at z", () => {
    // Arrange: the 'new' box scene.
    const grid = makeGrid(W, H, [BACK_WALL, BEHIND_BACK]);
    const rng = createRng(13);
    const days = makeDays(grid, 14, (day) => {
      backWallBeams(day, rng, 20, 27);
      stackBeams(day, 20, 27, 24, 29);
    });

    for (const z of [Z_95, 2.5758]) {
      // Act
      const zone = run(grid, days, { z }).zones[0];

      // Assert
      const hits = Math.round(zone.meanHitRate * zone.observations);
      const interval = wilsonInterval(hits, zone.observations, z);
      expect(zone.hitRateInterval).toEqual([interval.lower, interval.upper]);
    }
  });
});

describe('detectChanges refuses bad input', () => {
  const grid = makeGrid(8, 8, []);
  const day = (d: string, cells = 64): DayCounters => ({ day: d, hits: new Uint32Array(cells), passes: new Uint32Array(cells) });

  it('when counters, dates or settings are wrong, then it throws a RangeError that says what is wrong', () => {
    const distance = occupiedDistance(grid);
    expect(() => detectChanges(grid, distance, () => [day('2026-11-02', 63)])).toThrow(/must hold 64 cells/);
    expect(() => detectChanges(grid, new Float32Array(3), () => [])).toThrow(/distance field has 3 cells/);
    expect(() => detectChanges(grid, distance, () => [day('2026-11-03'), day('2026-11-02')])).toThrow(/oldest first/);
    expect(() => detectChanges(grid, distance, () => [day('2026-02-30')])).toThrow(/not a date/);
    expect(() => detectChanges(grid, distance, () => [day('2026-11-01'), day('2026-11-15')])).toThrow(/outside the 14-day window/);
    expect(() => detectChanges(grid, distance, () => [], { newLowerMin: 1.5 })).toThrow(/newLowerMin must be a rate/);
    expect(() => detectChanges(grid, distance, () => [], { blockCells: 0 })).toThrow(/blockCells/);
  });

  it('when no days are given, then it reports no zones and zero days', () => {
    const result = detectChanges(grid, occupiedDistance(grid), () => []);
    expect(result).toEqual({ zones: [], figures: { cellsObserved: 0, cellsFlagged: { new: 0, missing: 0, unmapped: 0 }, days: 0 } });
  });

  it('when the defaults are read, then the DESIGN values are the documented ones', () => {
    // DESIGN §4.3–4.4: 14-day window, 0.10 m tolerance, z = 1.96 (95 %), 0.05 m² minimum zone.
    expect(DETECTION_DEFAULTS.windowDays).toBe(14);
    expect(DETECTION_DEFAULTS.toleranceM).toBe(0.1);
    expect(DETECTION_DEFAULTS.z).toBe(Z_95);
    expect(DETECTION_DEFAULTS.minZoneAreaM2).toBe(0.05);
  });
});

// The simulated site (shared/sim/scenario.ts): a 28-day scenario, analysed over its last 14 days
// at light settings (every third beam, 100 scans per robot per day) so the file stays well under
// a minute. Evidence is built once per scenario and shared by the tests below.
const SIM = { seed: 1, days: 28, startDate: '2026-11-02', scansPerRobotPerDay: 100, beamStep: 3 } as const;
const NO_CHANGES = { missingFromDay: null, fenceFromDay: null, palletDays: null, unmappedFromDay: null };
const MOUNT_ERROR_ROBOT = 'AMR-02';
// 1.4° of scanner yaw: at 10 m a wall's returns land 0.24 m away from it.
const MOUNT_ERROR_RAD = (1.4 * Math.PI) / 180;
// A zone belongs to a scripted change when one of its cells lies within the change's bounding
// box grown by this margin (tolerance plus the scatter band), metres.
const MATCH_MARGIN_M = 0.25;

const cache = new Map<string, ScenarioEvidence>();
function evidence(name: 'changes' | 'quiet' | 'mount-error'): ScenarioEvidence {
  let e = cache.get(name);
  if (!e) {
    const scenario =
      name === 'changes'
        ? { ...SIM }
        : name === 'quiet'
          ? { ...SIM, changes: NO_CHANGES }
          : { ...SIM, changes: NO_CHANGES, mountErrors: [{ robot: MOUNT_ERROR_ROBOT, dyaw: MOUNT_ERROR_RAD }] };
    e = buildScenarioEvidence({ scenario, windowDays: 14, groups: { [MOUNT_ERROR_ROBOT]: 'flagged' } });
    cache.set(name, e);
  }
  return e;
}

function detectOn(e: ScenarioEvidence, groups?: string[]): DetectionResult {
  return detectChanges(e.scenario.map, occupiedDistance(e.scenario.map), e.days(groups));
}

/** True when a cell centre of the zone lies in the box grown by `margin` metres. */
function zoneTouches(grid: OccupancyGrid, zone: ZoneCandidate, box: { minX: number; minY: number; maxX: number; maxY: number }, margin: number): boolean {
  for (const k of zone.cells) {
    const i = k % grid.width;
    const c = gridFrameToWorld(grid, i + 0.5, (k - i) / grid.width + 0.5);
    if (c.x >= box.minX - margin && c.x <= box.maxX + margin && c.y >= box.minY - margin && c.y <= box.maxY + margin) return true;
  }
  return false;
}

const totalArea = (zones: ZoneCandidate[]): number => zones.reduce((a, z) => a + z.areaM2, 0);

describe('detectChanges on the simulated warehouse', () => {
  it('when the last 14 of 28 days are analysed, then every scripted change is found with its kind, persistence and start', () => {
    // Arrange
    const e = evidence('changes');
    const { truth, map } = e.scenario;
    const first = e.dayNumbers[0];

    // Act
    const { zones } = detectOn(e);

    // Assert: the scenario's ground truth is the reference (shared/sim/changes.ts).
    const inWindow = truth.changes.filter((c) => c.days.some((d) => d >= first));
    expect(inWindow.map((c) => c.id).sort()).toEqual(['missing-rack-bays', 'new-fence', 'pallets-staging', 'unmapped-shelving']);
    for (const change of inWindow) {
      const matched = zones.filter((z) => z.kind === change.kind && zoneTouches(map, z, change.bbox, MATCH_MARGIN_M));
      expect(matched.length, change.id).toBeGreaterThan(0);
      for (const z of matched) expect(z.persistence, change.id).toBe(change.persistence);
      const activeDates = new Set(change.days.map((d) => truth.dayDates[d]));
      for (const z of matched) for (const t of z.timeline) if (t.flagged) expect(activeDates.has(t.day), `${change.id} on ${t.day}`).toBe(true);
      if (change.persistence === 'persistent') {
        // Flagged from the day it began, or from the window's first day if it began before.
        const biggest = matched.reduce((a, b) => (b.areaM2 > a.areaM2 ? b : a));
        expect(biggest.firstFlaggedDay, change.id).toBe(truth.dayDates[Math.max(first, change.days[0])]);
      }
    }
  });

  it('when the last 14 of 28 days are analysed, then zones that touch no scripted change cover under 1 m²', () => {
    // Bound: 1 m² is 400 cells, less than one pallet's footprint (1.2 m × 1.2 m, common practice)
    // on a 2,400 m² site; below it a mapper loses no remap decision to false zones.
    const e = evidence('changes');
    const { truth, map } = e.scenario;

    // Act
    const { zones } = detectOn(e);

    // Assert
    const unmatched = zones.filter((z) => !truth.changes.some((c) => zoneTouches(map, z, c.bbox, MATCH_MARGIN_M)));
    expect(totalArea(unmatched)).toBeLessThan(1);
  });

  it('when nothing changed on the site, then (almost) no zone is reported', () => {
    // Arrange: same site, same robots, people and forklifts, no scripted change.
    const e = evidence('quiet');

    // Act
    const result = detectOn(e);

    // Assert: at most two minimum-size zones' worth of area.
    expect(totalArea(result.zones)).toBeLessThanOrEqual(2 * DETECTION_DEFAULTS.minZoneAreaM2);
    expect(result.figures.days).toBe(14);
    expect(result.figures.cellsObserved).toBeGreaterThan(0.5 * e.scenario.map.width * e.scenario.map.height);
  });

  it("when one robot's scanner is turned 1.4°, then its skewed returns make ghost zones that leaving its evidence out removes", () => {
    // Arrange: nothing changed; AMR-02's front scanner sits 1.4° off its configured yaw, so its
    // returns land beside and behind the walls it sees. The server leaves such a robot out (§4.5).
    const e = evidence('mount-error');

    // Act
    const all = detectOn(e);
    const without = detectOn(e, ['rest']);

    // Assert
    expect(totalArea(all.zones)).toBeGreaterThan(0.2);
    expect(totalArea(without.zones)).toBeLessThanOrEqual(2 * DETECTION_DEFAULTS.minZoneAreaM2);
  });
});
