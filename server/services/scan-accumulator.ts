import { deflateRawSync } from 'node:zlib';
import { encodeChunkCounters, splitIntoChunks } from '../../shared/evidence/chunks.js';
import { frameU, frameV, makeGridFrame } from '../../shared/grid/transform.js';
import { accumulateScan, createCounters, type EvidenceCounters } from '../../shared/scan/accumulate.js';
import { parseLogLine } from '../../shared/scan/scan-record.js';
import { TrailThinner, type TrailPoints } from '../../shared/scan/trail.js';
import type { OccupancyGrid } from '../../shared/types/grid.js';
import type { Robot } from '../entities/index.js';
import type { RejectedLine } from '../entities/scan-batch.entity.js';
import { ChunkSpill, type ChunkKey, type PendingChunk } from './chunk-spill.js';
import { localDayFinder } from './site-days.js';

/** Most refused lines kept with their reasons per batch; the count covers all. */
export const MAX_REJECTED_KEPT = 200;
/** Raw scans kept per robot, scanner and day in one batch, for mount estimation (product choice). */
export const SAMPLE_PER_BATCH = 24;
/** Memory for full-size counters of (robot, day) pairs in flight; older pairs are packed (product choice). */
const RESIDENT_BUDGET_BYTES = 48 * 1024 * 1024;

/** Per robot, scanner and day: what one batch added. */
export interface PendingStat {
  robotId: string;
  scanner: string;
  day: string;
  scans: number;
  beams: number;
  returns: number;
  explained: number;
  outOfMap: number;
}

/** Per robot and day: returns and explained returns per agreement block (row-major from the bottom). */
export interface PendingBlocks {
  robotId: string;
  day: string;
  /** returns of block b at [b], explained returns at [blockCount + b]. */
  counts: Uint32Array;
}

/** A few raw scan lines of one robot, scanner and day (reservoir sample of the batch). */
export interface PendingSample {
  robotId: string;
  scanner: string;
  day: string;
  lines: string[];
}

/** Per robot and day: the thinned base poses of its scans (the map's paths layer). */
export interface PendingTrail {
  robotId: string;
  day: string;
  points: TrailPoints;
}

/** A chunk's counters still unpacked (a (robot, day) pair that stayed in memory to the end of the batch). */
export interface UnpackedChunk extends ChunkKey {
  hits: Uint32Array;
  passes: Uint32Array;
}

/** A chunk of the batch's counters: packed in the spill, or still unpacked. */
export type BatchChunk = PendingChunk | UnpackedChunk;

/** Scans and returns of one UTC hour (the quiet-window planner's traffic). */
export interface PendingHour {
  hourStartMs: number;
  scans: number;
  returns: number;
}

/** Batch totals as the receipt shows them. */
export interface BatchFigures {
  lines: number;
  scans: number;
  /** Pose reports (lines with a pose and no beams), kept for the paths layer only. */
  poses: number;
  beams: number;
  returns: number;
  explained: number;
  outOfMap: number;
  rejectedCount: number;
  rejectedLines: RejectedLine[];
  days: string[];
}

/** How returns are judged: the map's distance field and the tolerances (site settings). */
export interface AgreementSetup {
  /** Distance in cells from each cell to the nearest mapped occupied cell. */
  distance: Float32Array;
  /** A return is explained within this distance of mapped structure, in cells. */
  toleranceCells: number;
  /** Side of an agreement block, in cells. */
  blockCells: number;
}

/** What the accumulator needs to know about the batch's site. */
export interface AccumulatorContext {
  grid: OccupancyGrid;
  agreement: AgreementSetup;
  timezone: string;
  robotsByName: Map<string, Robot>;
  /** Set for robot batches: lines naming another robot are refused. */
  expectedRobot?: string;
  countNoReturnAsPass: boolean;
  maxNoReturnTraceM?: number;
  now: Date;
  /** Scratch file for packed chunks (uploads); in memory when absent. */
  spillFile?: string;
}

/**
 * Reads scan lines one at a time into per-robot, per-day hit/pass counters, agreement figures
 * and refused lines, without touching the database: the store adds the result in one
 * transaction. Memory: 8 bytes per map cell for each (robot, day) pair in flight, within a
 * budget; packed pairs go to the spill (memory or a scratch file).
 */
export class ScanAccumulator {
  private readonly resident = new Map<string, { robotId: string; day: string; counters: EvidenceCounters }>();
  private readonly maxResident: number;
  readonly spill: ChunkSpill;
  private readonly stats = new Map<string, PendingStat>();
  private readonly blocks = new Map<string, PendingBlocks>();
  private readonly daySet = new Set<string>();
  private readonly samples = new Map<string, PendingSample & { seen: number }>();
  private readonly trails = new Map<string, { robotId: string; day: string; thinner: TrailThinner }>();
  private readonly hours = new Map<number, PendingHour>();
  // Deterministic reservoir sampling: the same batch keeps the same scans.
  private sampleState = 0x9e3779b9;
  private readonly frame;
  private readonly blockCols: number;
  private readonly blockCount: number;
  // Scans arrive in time order, so the day of the previous scan is usually the answer.
  private readonly dayOf: (ms: number) => string;
  // The stat and block counters the current scan's returns are added to (set before each scan).
  private current: { stat: PendingStat; blocks: Uint32Array } | null = null;
  readonly figures: BatchFigures = { lines: 0, scans: 0, poses: 0, beams: 0, returns: 0, explained: 0, outOfMap: 0, rejectedCount: 0, rejectedLines: [], days: [] };

  constructor(private readonly ctx: AccumulatorContext) {
    const cells = ctx.grid.width * ctx.grid.height;
    this.maxResident = Math.max(1, Math.floor(RESIDENT_BUDGET_BYTES / (8 * cells)));
    this.spill = new ChunkSpill(ctx.spillFile);
    this.dayOf = localDayFinder(ctx.timezone);
    this.frame = makeGridFrame(ctx.grid);
    this.blockCols = Math.ceil(ctx.grid.width / ctx.agreement.blockCells);
    this.blockCount = this.blockCols * Math.ceil(ctx.grid.height / ctx.agreement.blockCells);
  }

  // One handler for every return, allocated once: judges the endpoint against the map.
  private readonly onReturn = (x: number, y: number, inMap: boolean) => {
    const cur = this.current!;
    if (!inMap) return;
    const { grid, agreement } = this.ctx;
    const i = Math.floor(frameU(this.frame, x, y));
    const j = Math.floor(frameV(this.frame, x, y));
    const block = Math.floor(j / agreement.blockCells) * this.blockCols + Math.floor(i / agreement.blockCells);
    cur.blocks[block]++;
    if (agreement.distance[j * grid.width + i] <= agreement.toleranceCells) {
      cur.stat.explained++;
      cur.blocks[this.blockCount + block]++;
    }
  };

  /** Adds one line (1-based number) of the log; blank lines are skipped silently. */
  addLine(lineNo: number, text: string): void {
    if (text.trim() === '') return;
    this.figures.lines++;
    const parsed = parseLogLine(text, { now: this.ctx.now, expectedRobot: this.ctx.expectedRobot });
    if (!parsed.ok) return this.reject(lineNo, parsed.reason);
    if ('poseReport' in parsed) {
      const report = parsed.poseReport;
      const reporter = this.ctx.robotsByName.get(report.robot);
      if (!reporter) return this.reject(lineNo, `The robot "${report.robot}" is not registered at this site.`);
      this.trailFor(reporter.id, this.dayOf(report.timeMs)).add(report.timeMs, report.pose[0], report.pose[1]);
      this.figures.poses++;
      return;
    }
    const scan = parsed.scan;
    const robot = this.ctx.robotsByName.get(scan.robot);
    if (!robot) return this.reject(lineNo, `The robot "${scan.robot}" is not registered at this site.`);
    const mount = robot.mounts.find((m) => m.name === scan.scanner) ?? null;
    if (!mount && robot.mounts.length > 0) {
      return this.reject(lineNo, `The scanner "${scan.scanner}" is not configured for ${robot.name} (configured: ${robot.mounts.map((m) => m.name).join(', ')}).`);
    }
    const day = this.dayOf(scan.timeMs);
    const stat = this.statFor(robot.id, scan.scanner, day);
    const explainedBefore = stat.explained;
    this.current = { stat, blocks: this.blocksFor(robot.id, day) };
    const f = accumulateScan(this.ctx.grid, this.countersFor(robot.id, day), scan, mount, {
      countNoReturnAsPass: this.ctx.countNoReturnAsPass,
      maxNoReturnTraceM: this.ctx.maxNoReturnTraceM,
      onReturn: this.onReturn,
    });
    this.sample(robot.id, scan.scanner, day, text);
    this.trailFor(robot.id, day).add(scan.timeMs, scan.pose[0], scan.pose[1]);
    this.figures.scans++;
    this.figures.beams += f.beams;
    this.figures.returns += f.returns;
    this.figures.explained += stat.explained - explainedBefore;
    this.figures.outOfMap += f.outOfMap;
    stat.scans++;
    const hourStartMs = scan.timeMs - (((scan.timeMs % 3_600_000) + 3_600_000) % 3_600_000);
    let hour = this.hours.get(hourStartMs);
    if (!hour) this.hours.set(hourStartMs, (hour = { hourStartMs, scans: 0, returns: 0 }));
    hour.scans++;
    hour.returns += f.returns;
    stat.beams += f.beams;
    stat.returns += f.returns;
    stat.outOfMap += f.outOfMap;
  }

  /** Returns the per-robot-day figures, agreement blocks, samples, trails and hourly traffic; the counters come from `chunks()`. */
  finish(): { stats: PendingStat[]; blocks: PendingBlocks[]; samples: PendingSample[]; trails: PendingTrail[]; hours: PendingHour[] } {
    this.figures.days = [...this.daySet].sort();
    const samples = [...this.samples.values()].map(({ robotId, scanner, day, lines }) => ({ robotId, scanner, day, lines }));
    const trails = [...this.trails.values()].map(({ robotId, day, thinner }) => ({ robotId, day, points: thinner.points }));
    return { stats: [...this.stats.values()], blocks: [...this.blocks.values()], samples, trails, hours: [...this.hours.values()] };
  }

  /**
   * The batch's counters one chunk at a time: the packed ones from the spill, then those of the
   * pairs still in memory, unpacked (packing them only to unpack them again in the store would
   * cost two zlib passes a chunk), split pair by pair so that memory stays as it is.
   */
  *chunks(): Generator<BatchChunk> {
    yield* this.spill.chunks();
    for (const { robotId, day, counters } of this.resident.values()) {
      for (const c of splitIntoChunks(this.ctx.grid.width, this.ctx.grid.height, counters.hits, counters.passes)) yield { robotId, day, cx: c.cx, cy: c.cy, hits: c.hits, passes: c.passes };
    }
  }

  // Per robot, not per scanner: every scanner of a robot reports the same base pose.
  private trailFor(robotId: string, day: string): TrailThinner {
    const key = `${robotId}|${day}`;
    let trail = this.trails.get(key);
    if (!trail) this.trails.set(key, (trail = { robotId, day, thinner: new TrailThinner() }));
    return trail.thinner;
  }

  private sample(robotId: string, scanner: string, day: string, line: string) {
    const key = `${robotId}|${scanner}|${day}`;
    let s = this.samples.get(key);
    if (!s) this.samples.set(key, (s = { robotId, scanner, day, lines: [], seen: 0 }));
    s.seen++;
    if (s.lines.length < SAMPLE_PER_BATCH) {
      s.lines.push(line);
      return;
    }
    // Algorithm R (Vitter 1985): the k-th line replaces a kept one with probability SAMPLE_PER_BATCH / k.
    this.sampleState = (Math.imul(this.sampleState, 1664525) + 1013904223) >>> 0;
    const slot = this.sampleState % s.seen;
    if (slot < SAMPLE_PER_BATCH) s.lines[slot] = line;
  }

  private reject(line: number, reason: string) {
    this.figures.rejectedCount++;
    if (this.figures.rejectedLines.length < MAX_REJECTED_KEPT) this.figures.rejectedLines.push({ line, reason });
  }

  private statFor(robotId: string, scanner: string, day: string): PendingStat {
    const key = `${robotId}|${scanner}|${day}`;
    let stat = this.stats.get(key);
    if (!stat) this.stats.set(key, (stat = { robotId, scanner, day, scans: 0, beams: 0, returns: 0, explained: 0, outOfMap: 0 }));
    return stat;
  }

  private blocksFor(robotId: string, day: string): Uint32Array {
    const key = `${robotId}|${day}`;
    let b = this.blocks.get(key);
    if (!b) this.blocks.set(key, (b = { robotId, day, counts: new Uint32Array(2 * this.blockCount) }));
    return b.counts;
  }


  private countersFor(robotId: string, day: string): EvidenceCounters {
    const key = `${robotId}|${day}`;
    const hit = this.resident.get(key);
    if (hit) {
      // Re-inserting keeps the map in least-recently-used order, so interleaved robots stay resident.
      this.resident.delete(key);
      this.resident.set(key, hit);
      return hit.counters;
    }
    if (this.resident.size >= this.maxResident) this.pack(this.resident.keys().next().value!);
    const entry = { robotId, day, counters: createCounters(this.ctx.grid) };
    this.resident.set(key, entry);
    this.daySet.add(day);
    return entry.counters;
  }

  private pack(key: string) {
    const { robotId, day, counters } = this.resident.get(key)!;
    this.resident.delete(key);
    for (const c of splitIntoChunks(this.ctx.grid.width, this.ctx.grid.height, counters.hits, counters.passes)) {
      this.spill.push({ robotId, day, cx: c.cx, cy: c.cy }, deflateRawSync(encodeChunkCounters(c.hits, c.passes), { level: 1 }));
    }
  }
}
