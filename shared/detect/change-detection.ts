/**
 * Change detection (DESIGN §4.4): compares what the robots' beams saw over a window of days with
 * the stored occupancy grid and returns the areas that changed, as zones.
 *
 * Estimator.
 * 1. Pool. Over the window, each cell's hits h and passes m are summed; n = h + m beams reached
 *    it and r = h / n is its hit rate, bounded by a Wilson score interval at z (Wilson 1927).
 * 2. Test (change-flags.ts), on the pooled counts and again on every single day:
 *    - missing: a mapped-occupied cell with the Wilson upper bound of its tolerance-neighbourhood
 *      hit rate (hits within `toleranceM`, over those hits plus the cell's own passes) below
 *      `missingUpperMax`: beams go through where the map has a wall, and none end near it;
 *    - new: a mapped-free cell farther than `toleranceM` from mapped structure whose lower bound
 *      is above `newLowerMin`, tested per cell and on half-overlapping `blockCells`-square blocks
 *      kept `blockClearanceM` clear of mapped structure (a real surface scatters its returns over
 *      a band a few cells wide; a block pools that band, the clearance keeps the scatter beside
 *      walls that are still there out of every pool);
 *    - unmapped: the same test on mapped-unknown cells: structure where the map has none.
 *    A cell is a candidate when the pooled test flags it (a lasting change) or when the day test
 *    flags it on at least `minDaysFlagged` days (a change that comes and goes, which pooling over
 *    the window dilutes below any threshold).
 * 3. Group. Per kind, candidates are closed (square element of `closingRadiusCells`), labelled
 *    8-connected in two passes, and components below `minZoneAreaM2` dropped. Outlines are exact
 *    cell-edge polygons converted to map-frame metres with the grid's origin yaw.
 * 4. Decide per zone and day. The zone's candidate cells (the closing's fill is geometry, not
 *    evidence) are summed per day into one count (h, n) — for missing zones hits over the zone's
 *    tolerance neighbourhood, as in the cell test — and the day is `flagged` when the zone's test
 *    holds that day, `clear` when the opposite bound decides the other way (new: upper bound below
 *    newLowerMin; missing: lower bound above missingUpperMax), and undecided otherwise. Summing
 *    the zone's cells before deciding uses hundreds of beams a day where one cell has a handful,
 *    so each day's decision is sound where a per-cell daily vote would be mostly noise.
 *    `daysObserved` counts decided days from the first flagged day on; among them, a share
 *    flagged ≥ `persistentShare` makes the zone persistent (a moved rack: remap it), else
 *    intermittent (a staging lane: mark it volatile). Counting from the first flagged day keeps a
 *    change that began mid-window persistent. A zone no single day decides is persistent unless
 *    some day was clear: only the window as a whole saw it, and nothing says it comes and goes.
 *    People and forklifts walking through leave a few returns per cell against many passes, so
 *    their rate stays far below newLowerMin on every day and in the pool.
 * 5. Score: traffic = (hits + passes) per m² per day in the zone's bounding box grown by
 *    `trafficMarginM`; severity = strength × area / (area + severityAreaM2) × (½ + ½ · traffic /
 *    (traffic + site traffic)) × (1 persistent, ½ intermittent), where strength is the Wilson lower
 *    bound of the zone's hit rate for new/unmapped zones and 1 − its upper bound for missing ones,
 *    and site traffic is the mean over observed cells. All in [0, 1]; a product choice.
 *
 * Memory: the pooled counters (8 bytes per cell); per cell 1 byte of marks and 1 of eligibility;
 * per block 3 bytes (0.75 per cell at 4-cell blocks); 4 bytes per mapped-occupied cell and per
 * cell with hits on the day being tested; while one kind is grouped, about 7 bytes per cell of its
 * candidates' bounding box (mask, closing scratch, labels); per zone its cells. Measured on
 * 4000 × 4000 cells: about 11 bytes per cell in all (tests/bench/change-detection.bench.ts). The
 * caller's one day of counters (8 bytes per cell) comes on top; `days()` is called twice.
 */
import { gridFrameToWorld } from '../grid/transform.js';
import { wilsonInterval, wilsonLower, wilsonUpper, Z_95 } from '../stats/wilson.js';
import { CellState, type OccupancyGrid } from '../types/grid.js';
import { CellList, createFlagContext, flagChanges, type FlagContext } from './change-flags.js';
import { labelComponents } from './labelling.js';
import { closing } from './morphology.js';
import { outlineToMetres, traceOutline } from './outline.js';

/** Settings of change detection; every threshold is a site setting (DESIGN §4.4). */
export interface DetectionSettings {
  /** Most calendar days the evidence may span, days (DESIGN default 14); a day beyond it is refused. */
  windowDays: number;
  /** Distance within which a return is explained by mapped structure, metres (DESIGN §4.3 default 0.10). */
  toleranceM: number;
  /** Normal quantile of the two-sided Wilson intervals (default Z_95, 95 %). */
  z: number;
  /** Fewest beams (h + m) a cell or block needs before it is tested, beams. */
  minObservations: number;
  /** A mapped-occupied cell is missing when its neighbourhood hit rate's upper bound is below this rate. */
  missingUpperMax: number;
  /** A free or unknown cell or block holds new structure when its hit rate's lower bound is above this rate. */
  newLowerMin: number;
  /** Side of the pooled blocks, cells. */
  blockCells: number;
  /** Pooled blocks keep at least this distance from mapped-occupied cells, metres (never less than toleranceM). */
  blockClearanceM: number;
  /** Zones smaller than this are dropped, m² (DESIGN default 0.05). */
  minZoneAreaM2: number;
  /** Radius of the square closing element that joins flagged cells across small gaps, cells (0 = none). */
  closingRadiusCells: number;
  /** Share of decided days, from the first flagged day on, at or above which a zone is persistent (0–1). */
  persistentShare: number;
  /** Days a cell's daily test must flag it to be a candidate without the pooled test, days. */
  minDaysFlagged: number;
  /** Margin around a zone's bounding box over which its traffic is counted, metres. */
  trafficMarginM: number;
  /** Zone area at which the severity's size factor is one half, m². */
  severityAreaM2: number;
}

/**
 * Default settings. DESIGN values: windowDays, toleranceM, z (1.96, Wilson 1927 at 95 %),
 * minZoneAreaM2. Everything else is a product choice, tuned on the simulated site and explained here.
 */
export const DETECTION_DEFAULTS: DetectionSettings = {
  windowDays: 14,
  toleranceM: 0.1,
  z: Z_95,
  // Product choice: below ~10 beams a Wilson bound at 95 % cannot pass either threshold anyway.
  minObservations: 10,
  // Product choice: a wall that still stands returns well over half the beams that reach it.
  missingUpperMax: 0.1,
  // Product choice: people in an aisle return a few per cent of the beams crossing a cell.
  newLowerMin: 0.2,
  // Product choice: 4 cells = 0.2 m at 5 cm, about the width of a surface's scatter band.
  blockCells: 4,
  // Product choice: two and a half times the tolerance, where the scatter of a wall that still stands thins out.
  blockClearanceM: 0.25,
  minZoneAreaM2: 0.05,
  // Product choice: bridges one-cell gaps between flagged cells.
  closingRadiusCells: 1,
  // Product choice: a change seen on at least 70 % of decided days stays; below that it comes and goes.
  persistentShare: 0.7,
  // Product choice: one day alone could be a load waiting for a forklift; two days make a pattern.
  minDaysFlagged: 2,
  // Product choice: 1 m around the zone, the aisle width robots drive past it in.
  trafficMarginM: 1,
  // Product choice: a 0.5 m² zone (about a pallet's face band) gets half the size factor.
  severityAreaM2: 0.5,
};

/** One day's full-grid counters: hits and passes per cell, index j·width + i. */
export interface DayCounters {
  /** Site-local date, YYYY-MM-DD. */
  day: string;
  hits: Uint32Array;
  passes: Uint32Array;
}

/** Kind of change a zone reports. */
export type ZoneKind = 'new' | 'missing' | 'unmapped';

/** One changed area with its geometry (metres, map frame), statistics and per-day decisions. */
export interface ZoneCandidate {
  kind: ZoneKind;
  persistence: 'persistent' | 'intermittent';
  /** Cells in the zone (after closing), cells. */
  cellCount: number;
  /** cellCount × resolution², m². */
  areaM2: number;
  /** Bounding box of the outline [xmin, ymin, xmax, ymax], metres. */
  bbox: [number, number, number, number];
  /** Mean of the zone's cell centres, metres. */
  centroid: [number, number];
  /** Outer boundary along cell edges, counter-clockwise, metres. */
  outline: [number, number][];
  /** Pooled hit rate h / n of the zone's evidence over the window (0–1). */
  meanHitRate: number;
  /** Wilson interval of meanHitRate at the settings' z. */
  hitRateInterval: [number, number];
  /** Beams n = h + m behind meanHitRate over the window. */
  observations: number;
  /** Days from the first flagged day on (every day if none flagged) on which the zone's daily test decided either way. */
  daysObserved: number;
  /** Days on which the zone's daily test flagged the change. */
  daysFlagged: number;
  firstFlaggedDay: string | null;
  lastFlaggedDay: string | null;
  /** Every day of the evidence: beams, hit rate (null without beams) and the day's decision. */
  timeline: { day: string; observations: number; hitRate: number | null; flagged: boolean }[];
  /** Hits + passes per m² per day in the zone's bounding box grown by trafficMarginM. */
  trafficPerM2PerDay: number;
  /** Ranking score in [0, 1] (formula in the module comment). */
  severity: number;
  /** Cell indices j·width + i of the zone, ascending. */
  cells: Int32Array;
}

/** Zones (highest severity first) and the run's figures. */
export interface DetectionResult {
  zones: ZoneCandidate[];
  figures: {
    /** Cells with at least minObservations pooled beams. */
    cellsObserved: number;
    /** Cells of the reported zones, per kind. */
    cellsFlagged: { new: number; missing: number; unmapped: number };
    /** Days of evidence read. */
    days: number;
  };
}

// Bits of the per-cell marks: flagged by the pooled test, flagged today; bits 2–7 count flagged days.
const POOLED = 1;
const TODAY = 2;
const DAY_SHIFT = 2;
const MAX_DAYS_COUNTED = 63;

const KINDS: { kind: ZoneKind; state: number }[] = [
  { kind: 'missing', state: CellState.Occupied },
  { kind: 'new', state: CellState.Free },
  { kind: 'unmapped', state: CellState.Unknown },
];

/**
 * Finds changed zones (metres, map frame) by comparing the window's hit/pass evidence with the grid.
 * `distance`: cells from each cell to the nearest mapped-occupied cell (distanceTransform of the occupied mask).
 * `days`: called (possibly more than once) to iterate the window's days one at a time, so that only one
 * day's counters need be in memory besides the pooled ones; each day's arrays are read before the next is asked for.
 */
export function detectChanges(
  grid: OccupancyGrid,
  distance: Float32Array,
  days: () => Iterable<DayCounters>,
  settings: Partial<DetectionSettings> = {},
): DetectionResult {
  const s = resolveSettings(settings);
  const cellCount = grid.width * grid.height;
  if (grid.cells.length !== cellCount) throw new RangeError(`The grid has ${grid.cells.length} cells but ${grid.width} × ${grid.height} needs ${cellCount}.`);
  if (distance.length !== cellCount) throw new RangeError(`The distance field has ${distance.length} cells but the grid has ${cellCount}.`);

  const ctx = createFlagContext(grid, distance, s);
  const pooledHits = new Uint32Array(cellCount);
  const pooledPasses = new Uint32Array(cellCount);
  const marks = new Uint8Array(cellCount);
  const dates: string[] = [];
  const marked = new CellList();

  // Pass 1: pool the window and run the day tests, one day in memory at a time.
  for (const d of days()) {
    checkDay(d, cellCount, dates, s.windowDays);
    dates.push(d.day);
    const { hits, passes } = d;
    for (let k = 0; k < cellCount; k++) {
      pooledHits[k] += hits[k];
      pooledPasses[k] += passes[k];
    }
    marked.size = 0;
    flagChanges(ctx, hits, passes, marks, TODAY, marked);
    countFlaggedDay(marks, marked);
  }
  marked.size = 0;
  flagChanges(ctx, pooledHits, pooledPasses, marks, POOLED, marked);

  let cellsObserved = 0;
  let observedBeams = 0;
  for (let k = 0; k < cellCount; k++) {
    const n = pooledHits[k] + pooledPasses[k];
    if (n >= s.minObservations) {
      cellsObserved++;
      observedBeams += n;
    }
  }
  const res2 = grid.resolution * grid.resolution;
  const siteTraffic = cellsObserved > 0 && dates.length > 0 ? observedBeams / (cellsObserved * res2 * dates.length) : 0;

  const zones: WorkingZone[] = [];
  const minDayMarks = Math.min(s.minDaysFlagged, MAX_DAYS_COUNTED);
  for (const { kind, state } of KINDS) {
    const isCandidate = (k: number): boolean =>
      grid.cells[k] === state && ((marks[k] & POOLED) !== 0 || marks[k] >> DAY_SHIFT >= minDayMarks);
    zones.push(...groupZones(grid, ctx, kind, isCandidate, s));
  }

  decideDays(zones, days, dates, ctx);

  const result: ZoneCandidate[] = zones.map((z) => finishZone(grid, z, pooledHits, pooledPasses, dates, s, siteTraffic));
  result.sort((a, b) => b.severity - a.severity || a.cells[0] - b.cells[0]);
  const cellsFlagged = { new: 0, missing: 0, unmapped: 0 };
  for (const z of result) cellsFlagged[z.kind] += z.cellCount;
  return { zones: result, figures: { cellsObserved, cellsFlagged, days: dates.length } };
}

/** Returns complete settings from partial ones, refusing values that would make the tests meaningless. */
export function resolveSettings(partial: Partial<DetectionSettings>): DetectionSettings {
  const s: DetectionSettings = { ...DETECTION_DEFAULTS, ...partial };
  const check = (ok: boolean, message: string): void => {
    if (!ok) throw new RangeError(message);
  };
  const whole = (v: number, min: number): boolean => Number.isInteger(v) && v >= min;
  const rate = (v: number): boolean => Number.isFinite(v) && v > 0 && v < 1;
  check(whole(s.windowDays, 1), `windowDays must be a whole number of days ≥ 1, got ${s.windowDays}.`);
  check(Number.isFinite(s.toleranceM) && s.toleranceM >= 0, `toleranceM must be zero or more metres, got ${s.toleranceM}.`);
  check(Number.isFinite(s.z) && s.z > 0, `z must be a positive number, got ${s.z}.`);
  check(whole(s.minObservations, 1), `minObservations must be a whole number of beams ≥ 1, got ${s.minObservations}.`);
  check(rate(s.missingUpperMax), `missingUpperMax must be a rate between 0 and 1, got ${s.missingUpperMax}.`);
  check(rate(s.newLowerMin), `newLowerMin must be a rate between 0 and 1, got ${s.newLowerMin}.`);
  check(whole(s.blockCells, 1), `blockCells must be a whole number of cells ≥ 1, got ${s.blockCells}.`);
  check(Number.isFinite(s.blockClearanceM) && s.blockClearanceM >= 0, `blockClearanceM must be zero or more metres, got ${s.blockClearanceM}.`);
  check(Number.isFinite(s.minZoneAreaM2) && s.minZoneAreaM2 >= 0, `minZoneAreaM2 must be zero or more square metres, got ${s.minZoneAreaM2}.`);
  check(whole(s.closingRadiusCells, 0), `closingRadiusCells must be a whole number of cells ≥ 0, got ${s.closingRadiusCells}.`);
  check(Number.isFinite(s.persistentShare) && s.persistentShare > 0 && s.persistentShare <= 1, `persistentShare must lie in (0, 1], got ${s.persistentShare}.`);
  check(whole(s.minDaysFlagged, 1), `minDaysFlagged must be a whole number of days ≥ 1, got ${s.minDaysFlagged}.`);
  check(Number.isFinite(s.trafficMarginM) && s.trafficMarginM >= 0, `trafficMarginM must be zero or more metres, got ${s.trafficMarginM}.`);
  check(Number.isFinite(s.severityAreaM2) && s.severityAreaM2 > 0, `severityAreaM2 must be a positive number of square metres, got ${s.severityAreaM2}.`);
  return s;
}

const DATE = /^\d{4}-\d{2}-\d{2}$/;

/** Day number since 1970-01-01 of a YYYY-MM-DD date, or NaN when it is not a real date. */
function dayNumber(date: string): number {
  if (!DATE.test(date)) return Number.NaN;
  const ms = Date.parse(`${date}T00:00:00Z`);
  // Date.parse rolls 2026-02-30 over to March; a round trip catches it.
  return Number.isFinite(ms) && new Date(ms).toISOString().slice(0, 10) === date ? ms / 86_400_000 : Number.NaN;
}

/** Refuses a day whose counters do not fit the grid, whose date is not after the previous one, or that leaves the window. */
function checkDay(d: DayCounters, cellCount: number, dates: string[], windowDays: number): void {
  if (d.hits.length !== cellCount || d.passes.length !== cellCount) {
    throw new RangeError(`The counters of ${d.day} must hold ${cellCount} cells each (width × height).`);
  }
  const n = dayNumber(d.day);
  if (Number.isNaN(n)) throw new RangeError(`Day "${d.day}" is not a date of the form YYYY-MM-DD.`);
  if (dates.length > 0) {
    const previous = dates[dates.length - 1];
    if (!(n > dayNumber(previous))) throw new RangeError(`Days must come oldest first, once each; ${d.day} came after ${previous}.`);
    if (n - dayNumber(dates[0]) >= windowDays) {
      throw new RangeError(`Day ${d.day} lies outside the ${windowDays}-day window that starts on ${dates[0]}.`);
    }
  }
}

/** Moves today's flags of the marked cells into their flagged-day counts (saturating at 63 days). */
function countFlaggedDay(marks: Uint8Array, marked: CellList): void {
  for (let q = 0; q < marked.size; q++) {
    const k = marked.data[q];
    const v = marks[k];
    const count = Math.min(MAX_DAYS_COUNTED, (v >> DAY_SHIFT) + 1);
    marks[k] = (v & POOLED) | (count << DAY_SHIFT);
  }
}

/** A zone while it is being built: geometry, and the cells whose counts form its evidence. */
interface WorkingZone {
  kind: ZoneKind;
  cells: Int32Array;
  /** Candidate cells of the zone: their passes (and, for new/unmapped, hits) are its evidence. */
  evidence: Int32Array;
  /** Cells whose hits count: the evidence cells, grown by the tolerance disc for missing zones. */
  support: Int32Array;
  outline: Float64Array;
  centroidX: number;
  centroidY: number;
  /** Bounding box in cells, inclusive. */
  minI: number;
  minJ: number;
  maxI: number;
  maxJ: number;
  daily: Float64Array;
}

/** Groups one kind's candidate cells into zones: closing, 8-connected labelling and the area filter, inside the candidates' bounding box. */
function groupZones(grid: OccupancyGrid, ctx: FlagContext, kind: ZoneKind, isCandidate: (k: number) => boolean, s: DetectionSettings): WorkingZone[] {
  const { width, height } = grid;
  let minI = width;
  let minJ = height;
  let maxI = -1;
  let maxJ = -1;
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      if (!isCandidate(j * width + i)) continue;
      if (i < minI) minI = i;
      if (i > maxI) maxI = i;
      if (j < minJ) minJ = j;
      if (j > maxJ) maxJ = j;
    }
  }
  if (maxI < 0) return [];
  // A pad of 2r + 1 cells keeps the crop's closing equal to the whole grid's: the dilation stays
  // r + 1 cells inside the crop, so the erosion never reads past it.
  const pad = 2 * s.closingRadiusCells + 1;
  const ci0 = Math.max(0, minI - pad);
  const cj0 = Math.max(0, minJ - pad);
  const cw = Math.min(width - 1, maxI + pad) - ci0 + 1;
  const ch = Math.min(height - 1, maxJ + pad) - cj0 + 1;
  const raw = new Uint8Array(cw * ch);
  for (let j = 0; j < ch; j++) for (let i = 0; i < cw; i++) raw[j * cw + i] = isCandidate((j + cj0) * width + i + ci0) ? 1 : 0;
  const mask = s.closingRadiusCells > 0 ? closing(raw, cw, ch, s.closingRadiusCells, 'square') : raw;
  const labelling = labelComponents(mask, cw, ch, 8);
  const { stats } = labelling;
  const minCells = s.minZoneAreaM2 / (grid.resolution * grid.resolution);
  const zones: WorkingZone[] = [];
  for (let label = 1; label <= labelling.count; label++) {
    if (stats.cellCount[label] < minCells - 1e-9) continue;
    const cells = new Int32Array(stats.cellCount[label]);
    const evidence: number[] = [];
    let c = 0;
    for (let j = stats.minJ[label]; j <= stats.maxJ[label]; j++) {
      for (let i = stats.minI[label]; i <= stats.maxI[label]; i++) {
        const local = j * cw + i;
        if (labelling.labels[local] !== label) continue;
        const k = (j + cj0) * width + i + ci0;
        cells[c++] = k;
        if (raw[local] !== 0) evidence.push(k);
      }
    }
    const outline = traceOutline(labelling, label);
    // Shift the crop's cell-corner coordinates back to the whole grid's.
    for (let v = 0; v < outline.length; v += 2) {
      outline[v] += ci0;
      outline[v + 1] += cj0;
    }
    const evidenceCells = Int32Array.from(evidence);
    zones.push({
      kind,
      cells,
      evidence: evidenceCells,
      support: kind === 'missing' ? toleranceSupport(ctx, evidenceCells) : evidenceCells,
      outline,
      centroidX: stats.centroidX[label] + ci0,
      centroidY: stats.centroidY[label] + cj0,
      minI: stats.minI[label] + ci0,
      minJ: stats.minJ[label] + cj0,
      maxI: stats.maxI[label] + ci0,
      maxJ: stats.maxJ[label] + cj0,
      daily: new Float64Array(0),
    });
  }
  return zones;
}

/** Cells within the tolerance disc of any evidence cell, each once, ascending (for a missing zone's hits). */
function toleranceSupport(ctx: FlagContext, evidence: Int32Array): Int32Array {
  const { width, height, discI, discJ } = ctx;
  const seen = new Set<number>();
  for (let q = 0; q < evidence.length; q++) {
    const k = evidence[q];
    const i = k % width;
    const j = (k - i) / width;
    for (let o = 0; o < discI.length; o++) {
      const ii = i + discI[o];
      const jj = j + discJ[o];
      if (ii >= 0 && jj >= 0 && ii < width && jj < height) seen.add(jj * width + ii);
    }
  }
  return Int32Array.from(seen).sort();
}

/** Pass 2: sums each zone's evidence per day into `daily` as (h, n) pairs, one pair per day. */
function decideDays(zones: WorkingZone[], days: () => Iterable<DayCounters>, dates: string[], ctx: FlagContext): void {
  if (zones.length === 0) return;
  for (const z of zones) z.daily = new Float64Array(2 * dates.length);
  let d = 0;
  for (const day of days()) {
    if (d >= dates.length || day.day !== dates[d]) throw new RangeError('days() must yield the same days each time it is called.');
    const cellCount = ctx.width * ctx.height;
    if (day.hits.length !== cellCount || day.passes.length !== cellCount) throw new RangeError(`The counters of ${day.day} must hold ${cellCount} cells each.`);
    for (const z of zones) {
      const [h, n] = zoneCounts(z, day.hits, day.passes);
      z.daily[2 * d] = h;
      z.daily[2 * d + 1] = n;
    }
    d++;
  }
  if (d !== dates.length) throw new RangeError('days() must yield the same days each time it is called.');
}

/** A zone's (hits, beams) on one set of counters: hits over its support, beams = those hits + passes through its evidence cells. */
function zoneCounts(z: WorkingZone, hits: Uint32Array, passes: Uint32Array): [number, number] {
  let h = 0;
  let m = 0;
  for (let q = 0; q < z.support.length; q++) h += hits[z.support[q]];
  for (let q = 0; q < z.evidence.length; q++) m += passes[z.evidence[q]];
  return [h, h + m];
}

type DayDecision = 'flagged' | 'clear' | 'undecided';

/** The zone test on one (h, n): flagged, clear (the opposite bound decides the other way) or undecided. */
function decide(kind: ZoneKind, h: number, n: number, s: DetectionSettings): DayDecision {
  if (n === 0) return 'undecided';
  if (kind === 'missing') {
    if (wilsonUpper(h, n, s.z) < s.missingUpperMax) return 'flagged';
    return wilsonLower(h, n, s.z) > s.missingUpperMax ? 'clear' : 'undecided';
  }
  if (wilsonLower(h, n, s.z) > s.newLowerMin) return 'flagged';
  return wilsonUpper(h, n, s.z) < s.newLowerMin ? 'clear' : 'undecided';
}

/** Turns a working zone into the reported one: window statistics, timeline, persistence, traffic and severity. */
function finishZone(
  grid: OccupancyGrid,
  z: WorkingZone,
  pooledHits: Uint32Array,
  pooledPasses: Uint32Array,
  dates: string[],
  s: DetectionSettings,
  siteTraffic: number,
): ZoneCandidate {
  const [h, n] = zoneCounts(z, pooledHits, pooledPasses);
  const interval = wilsonInterval(h, n, s.z);
  const timeline: ZoneCandidate['timeline'] = [];
  const decisions: DayDecision[] = [];
  for (let d = 0; d < dates.length; d++) {
    const dh = z.daily[2 * d];
    const dn = z.daily[2 * d + 1];
    const decision = decide(z.kind, dh, dn, s);
    decisions.push(decision);
    timeline.push({ day: dates[d], observations: dn, hitRate: dn > 0 ? dh / dn : null, flagged: decision === 'flagged' });
  }
  const first = decisions.indexOf('flagged');
  const last = decisions.lastIndexOf('flagged');
  const daysFlagged = decisions.filter((v) => v === 'flagged').length;
  // Counted from the first flagged day on, like persistence, so "seen on 10 of 10 days since
  // 22 Nov" reads true; a zone no single day flagged counts every decided day.
  const daysObserved = decisions.slice(Math.max(first, 0)).filter((v) => v !== 'undecided').length;
  let persistent: boolean;
  if (first < 0) persistent = !decisions.includes('clear');
  else persistent = daysFlagged / daysObserved >= s.persistentShare;

  const res = grid.resolution;
  const outlineM = outlineToMetres(z.outline, grid);
  const outline: [number, number][] = [];
  let xmin = Infinity;
  let ymin = Infinity;
  let xmax = -Infinity;
  let ymax = -Infinity;
  for (let v = 0; v < outlineM.length; v += 2) {
    const x = outlineM[v];
    const y = outlineM[v + 1];
    outline.push([x, y]);
    xmin = Math.min(xmin, x);
    ymin = Math.min(ymin, y);
    xmax = Math.max(xmax, x);
    ymax = Math.max(ymax, y);
  }
  const centre = gridFrameToWorld(grid, z.centroidX, z.centroidY);
  const areaM2 = z.cells.length * res * res;
  const traffic = trafficAround(grid, z, pooledHits, pooledPasses, s.trafficMarginM, dates.length);
  const strength = z.kind === 'missing' ? 1 - interval.upper : interval.lower;
  const trafficShare = traffic + siteTraffic > 0 ? traffic / (traffic + siteTraffic) : 0;
  const severity = strength * (areaM2 / (areaM2 + s.severityAreaM2)) * (0.5 + 0.5 * trafficShare) * (persistent ? 1 : 0.5);

  return {
    kind: z.kind,
    persistence: persistent ? 'persistent' : 'intermittent',
    cellCount: z.cells.length,
    areaM2,
    bbox: [xmin, ymin, xmax, ymax],
    centroid: [centre.x, centre.y],
    outline,
    meanHitRate: n > 0 ? h / n : 0,
    hitRateInterval: [interval.lower, interval.upper],
    observations: n,
    daysObserved,
    daysFlagged,
    firstFlaggedDay: first >= 0 ? dates[first] : null,
    lastFlaggedDay: last >= 0 ? dates[last] : null,
    timeline,
    trafficPerM2PerDay: traffic,
    severity: Math.min(1, Math.max(0, severity)),
    cells: z.cells,
  };
}

/** Hits + passes per m² per day over the zone's cell bounding box grown by `marginM` (clipped to the grid). */
function trafficAround(grid: OccupancyGrid, z: WorkingZone, hits: Uint32Array, passes: Uint32Array, marginM: number, days: number): number {
  const { width, height, resolution } = grid;
  const m = Math.round(marginM / resolution);
  const i0 = Math.max(0, z.minI - m);
  const j0 = Math.max(0, z.minJ - m);
  const i1 = Math.min(width - 1, z.maxI + m);
  const j1 = Math.min(height - 1, z.maxJ + m);
  let beams = 0;
  for (let j = j0; j <= j1; j++) for (let k = j * width + i0, end = j * width + i1; k <= end; k++) beams += hits[k] + passes[k];
  const area = (i1 - i0 + 1) * (j1 - j0 + 1) * resolution * resolution;
  return days > 0 ? beams / (area * days) : 0;
}
