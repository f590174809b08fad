import { deflateRawSync } from 'node:zlib';
import { DateTime } from 'luxon';
import { accumulateScan, createCounters, type EvidenceCounters } from '../../shared/scan/accumulate.js';
import { parseScanLine } from '../../shared/scan/scan-record.js';
import { encodeChunkCounters, splitIntoChunks } from '../../shared/evidence/chunks.js';
import type { OccupancyGrid } from '../../shared/types/grid.js';
import type { RejectedLine } from '../entities/scan-batch.entity.js';
import type { Robot } from '../entities/index.js';

/** Most refused lines kept with their reasons per batch; the count covers all. */
export const MAX_REJECTED_KEPT = 200;
/** Days of full-size counters held at once; older days are packed into compressed chunks. */
const RESIDENT_DAYS = 2;

/** Chunk counters ready to be added to the store: deflated encodeChunkCounters bytes. */
export interface PendingChunk {
  day: string;
  cx: number;
  cy: number;
  data: Buffer;
}

/** Per robot, scanner and day: what one batch added. */
export interface PendingStat {
  robotId: string;
  scanner: string;
  day: string;
  scans: number;
  beams: number;
  returns: number;
  outOfMap: number;
}

/** Batch totals as the receipt shows them. */
export interface BatchFigures {
  lines: number;
  scans: number;
  beams: number;
  returns: number;
  outOfMap: number;
  rejectedCount: number;
  rejectedLines: RejectedLine[];
  days: string[];
}

/** What the accumulator needs to know about the batch's site. */
export interface AccumulatorContext {
  grid: OccupancyGrid;
  timezone: string;
  robotsByName: Map<string, Robot>;
  /** Set for robot batches: lines naming another robot are refused. */
  expectedRobot?: string;
  countNoReturnAsPass: boolean;
  maxNoReturnTraceM?: number;
  now: Date;
}

/**
 * Reads scan lines one at a time into per-day hit/pass counters, per-robot-day figures and
 * refused lines, without touching the database: the store adds the result in one transaction.
 * Memory: 8 bytes per map cell for each of at most two resident days, plus packed chunks.
 */
export class ScanAccumulator {
  private readonly resident = new Map<string, EvidenceCounters>();
  private readonly packed: PendingChunk[] = [];
  private readonly stats = new Map<string, PendingStat>();
  private readonly daySet = new Set<string>();
  private lastDayMs = { start: Infinity, end: -Infinity, day: '' };
  readonly figures: BatchFigures = { lines: 0, scans: 0, beams: 0, returns: 0, outOfMap: 0, rejectedCount: 0, rejectedLines: [], days: [] };

  constructor(private readonly ctx: AccumulatorContext) {}

  /** Adds one line (1-based number) of the log; blank lines are skipped silently. */
  addLine(lineNo: number, text: string): void {
    if (text.trim() === '') return;
    this.figures.lines++;
    const parsed = parseScanLine(text, { now: this.ctx.now, expectedRobot: this.ctx.expectedRobot });
    if (!parsed.ok) return this.reject(lineNo, parsed.reason);
    const scan = parsed.scan;
    const robot = this.ctx.robotsByName.get(scan.robot);
    if (!robot) return this.reject(lineNo, `The robot "${scan.robot}" is not registered at this site.`);
    const mount = robot.mounts.find((m) => m.name === scan.scanner) ?? null;
    if (!mount && robot.mounts.length > 0) {
      return this.reject(lineNo, `The scanner "${scan.scanner}" is not configured for ${robot.name} (configured: ${robot.mounts.map((m) => m.name).join(', ')}).`);
    }
    const day = this.dayOf(scan.timeMs);
    const f = accumulateScan(this.ctx.grid, this.countersFor(day), scan, mount, {
      countNoReturnAsPass: this.ctx.countNoReturnAsPass,
      maxNoReturnTraceM: this.ctx.maxNoReturnTraceM,
    });
    this.figures.scans++;
    this.figures.beams += f.beams;
    this.figures.returns += f.returns;
    this.figures.outOfMap += f.outOfMap;
    const key = `${robot.id}|${scan.scanner}|${day}`;
    let stat = this.stats.get(key);
    if (!stat) this.stats.set(key, (stat = { robotId: robot.id, scanner: scan.scanner, day, scans: 0, beams: 0, returns: 0, outOfMap: 0 }));
    stat.scans++;
    stat.beams += f.beams;
    stat.returns += f.returns;
    stat.outOfMap += f.outOfMap;
  }

  /** Everything to add to the store: chunks of every day touched, and per-robot-day figures. */
  finish(): { chunks: PendingChunk[]; stats: PendingStat[] } {
    for (const day of [...this.resident.keys()]) this.pack(day);
    this.figures.days = [...this.daySet].sort();
    return { chunks: this.packed, stats: [...this.stats.values()] };
  }

  private reject(line: number, reason: string) {
    this.figures.rejectedCount++;
    if (this.figures.rejectedLines.length < MAX_REJECTED_KEPT) this.figures.rejectedLines.push({ line, reason });
  }

  // Scans arrive in time order, so the day of the previous scan is usually the answer; only a
  // scan outside that day's bounds pays for a time-zone conversion.
  private dayOf(ms: number): string {
    if (ms >= this.lastDayMs.start && ms < this.lastDayMs.end) return this.lastDayMs.day;
    const local = DateTime.fromMillis(ms, { zone: this.ctx.timezone });
    const start = local.startOf('day');
    this.lastDayMs = { start: start.toMillis(), end: start.plus({ days: 1 }).toMillis(), day: local.toISODate()! };
    return this.lastDayMs.day;
  }

  private countersFor(day: string): EvidenceCounters {
    let counters = this.resident.get(day);
    if (counters) return counters;
    if (this.resident.size >= RESIDENT_DAYS) this.pack(this.resident.keys().next().value!);
    counters = createCounters(this.ctx.grid);
    this.resident.set(day, counters);
    this.daySet.add(day);
    return counters;
  }

  private pack(day: string) {
    const counters = this.resident.get(day)!;
    this.resident.delete(day);
    for (const c of splitIntoChunks(this.ctx.grid.width, this.ctx.grid.height, counters.hits, counters.passes)) {
      this.packed.push({ day, cx: c.cx, cy: c.cy, data: deflateRawSync(encodeChunkCounters(c.hits, c.passes), { level: 1 }) });
    }
  }
}
