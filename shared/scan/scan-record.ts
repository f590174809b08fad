import { readIsoTime } from './iso-time.js';

/**
 * One laser scan as a robot reports it (one line of a JSON Lines scan log, DESIGN §4.2).
 * Memory: 8 bytes per beam for `ranges` plus a few fields.
 */
export interface ScanRecord {
  /** Timestamp as sent (ISO 8601 with a zone). */
  t: string;
  /** Timestamp in milliseconds since the Unix epoch. */
  timeMs: number;
  robot: string;
  scanner: string;
  /** Robot base pose in the map frame: x, y in metres, theta in radians. */
  pose: [number, number, number];
  /** Bearing of beam 0 relative to the scanner, radians. */
  angleMin: number;
  /** Bearing step between beams, radians (non-zero; negative for clockwise scanners). */
  angleIncrement: number;
  /** Shortest valid range, metres. */
  rangeMin: number;
  /** Range at and beyond which a reading is "no return", metres. */
  rangeMax: number;
  /** Range per beam in metres; NaN where the log holds null. */
  ranges: Float64Array;
}

/** Options for parseScanLine: the clock, limits, and the robot the sender's token belongs to. */
export interface ScanLineContext {
  now: Date;
  /** How far in the future a timestamp may lie, milliseconds (default 5 minutes). */
  maxFutureMs?: number;
  /** Most beams accepted in one scan (default 10,000). */
  maxBeams?: number;
  /** When set, scans from any other robot are refused. */
  expectedRobot?: string;
}

/** Result of parsing one line: the scan, or a readable reason for refusing it. */
export type ScanLineResult = { ok: true; scan: ScanRecord } | { ok: false; reason: string };

/** Default tolerance for timestamps ahead of the server clock (clock skew), milliseconds. A product choice. */
export const DEFAULT_MAX_FUTURE_MS = 5 * 60 * 1000;
/** Default most beams per scan; common scanners give a few hundred to a few thousand. A product choice. */
export const DEFAULT_MAX_BEAMS = 10_000;

/**
 * Longest line read as a scan, characters: a scan of DEFAULT_MAX_BEAMS beams at ~20 characters a
 * beam fits five times. Longer lines are refused unread, since parsing deeply nested JSON of that
 * size holds the process for seconds (a product choice).
 */
export const MAX_SCAN_LINE_CHARS = 1024 * 1024;

/** Thrown inside parseScanLine to leave with a reason; never escapes it. */
class Refusal {
  constructor(readonly reason: string) {}
}

function refuse(reason: string): never {
  throw new Refusal(reason);
}

function field(obj: Record<string, unknown>, name: string): unknown {
  if (!(name in obj)) refuse(`The scan has no "${name}" field.`);
  return obj[name];
}

function finiteNumber(obj: Record<string, unknown>, name: string): number {
  const v = field(obj, name);
  // JSON.parse turns 1e999 into Infinity, so finiteness is checked, not only the type.
  if (typeof v !== 'number' || !Number.isFinite(v)) refuse(`The scan's "${name}" must be a finite number.`);
  return v;
}

function nonEmptyString(obj: Record<string, unknown>, name: string): string {
  const v = field(obj, name);
  if (typeof v !== 'string' || v.trim() === '') refuse(`The scan's "${name}" must be a non-empty string.`);
  return v;
}

function readPose(obj: Record<string, unknown>): [number, number, number] {
  const v = field(obj, 'pose');
  if (!Array.isArray(v) || v.length !== 3) refuse('The scan\'s "pose" must be a list of three numbers [x, y, theta].');
  for (const c of v) {
    if (typeof c !== 'number' || !Number.isFinite(c)) {
      refuse('The scan\'s "pose" must hold three finite numbers [x, y, theta].');
    }
  }
  return [v[0], v[1], v[2]];
}

function readTime(obj: Record<string, unknown>, ctx: ScanLineContext): [string, number] {
  const time = readIsoTime(field(obj, 't'), 'The scan\'s "t"', ctx.now, ctx.maxFutureMs ?? DEFAULT_MAX_FUTURE_MS);
  if (!time.ok) refuse(time.reason);
  return [time.t, time.ms];
}

function readRanges(obj: Record<string, unknown>, maxBeams: number): Float64Array {
  const v = field(obj, 'ranges');
  if (!Array.isArray(v)) refuse('The scan\'s "ranges" must be a list of numbers or nulls.');
  if (v.length === 0) refuse('The scan\'s "ranges" is empty.');
  if (v.length > maxBeams) {
    refuse(`The scan has ${v.length.toLocaleString('en-US')} beams; at most ${maxBeams.toLocaleString('en-US')} are accepted.`);
  }
  const out = new Float64Array(v.length);
  for (let k = 0; k < v.length; k++) {
    const r = v[k];
    if (r === null) out[k] = NaN;
    else if (typeof r === 'number') out[k] = r;
    else refuse(`The scan's "ranges" entry ${k} must be a number or null.`);
  }
  return out;
}

/** A pose report: where a robot was between scans (no beams), for the map's paths layer. */
export interface PoseReport {
  t: string;
  timeMs: number;
  robot: string;
  /** Robot base pose in the map frame: x, y in metres, theta in radians. */
  pose: [number, number, number];
}

/** Result of parsing one log line: a scan, a pose report, or a readable reason for refusing it. */
export type LogLineResult = ScanLineResult | { ok: true; poseReport: PoseReport };

/** Reads the JSON object of a line, or the reason it is not one. */
function readObject(line: string): Record<string, unknown> | { refused: string } {
  if (line.trim() === '') return { refused: 'The line is empty.' };
  if (line.length > MAX_SCAN_LINE_CHARS) {
    return { refused: `The line holds ${line.length.toLocaleString('en-US')} characters; a scan line has at most ${MAX_SCAN_LINE_CHARS.toLocaleString('en-US')}.` };
  }
  let doc: unknown;
  try {
    doc = JSON.parse(line);
  } catch (e) {
    const detail = e instanceof Error ? e.message.replace(/\.$/, '') : String(e);
    return { refused: `The line is not valid JSON (${detail}).` };
  }
  if (typeof doc !== 'object' || doc === null || Array.isArray(doc)) return { refused: 'The line is not a JSON object.' };
  return doc as Record<string, unknown>;
}

function readRobot(obj: Record<string, unknown>, ctx: ScanLineContext): string {
  const robot = nonEmptyString(obj, 'robot');
  if (ctx.expectedRobot !== undefined && robot !== ctx.expectedRobot) {
    refuse(`The scan is from robot "${robot}", but this token belongs to robot "${ctx.expectedRobot}".`);
  }
  return robot;
}

function readScan(obj: Record<string, unknown>, ctx: ScanLineContext): ScanRecord {
  const [t, timeMs] = readTime(obj, ctx);
  const robot = readRobot(obj, ctx);
  const scanner = nonEmptyString(obj, 'scanner');
  const pose = readPose(obj);
  const angleMin = finiteNumber(obj, 'angleMin');
  const angleIncrement = finiteNumber(obj, 'angleIncrement');
  if (angleIncrement === 0) refuse('The scan\'s "angleIncrement" must not be 0.');
  const rangeMin = finiteNumber(obj, 'rangeMin');
  const rangeMax = finiteNumber(obj, 'rangeMax');
  if (rangeMin < 0) refuse('The scan\'s "rangeMin" must not be negative.');
  if (rangeMin >= rangeMax) refuse('The scan\'s "rangeMin" must be smaller than its "rangeMax".');
  const ranges = readRanges(obj, ctx.maxBeams ?? DEFAULT_MAX_BEAMS);
  return { t, timeMs, robot, scanner, pose, angleMin, angleIncrement, rangeMin, rangeMax, ranges };
}

/** Runs a reader and turns a refusal into its result; anything else thrown is a bug and escapes. */
function attempt<T>(read: () => T): T | { ok: false; reason: string } {
  try {
    return read();
  } catch (e) {
    if (e instanceof Refusal) return { ok: false, reason: e.reason };
    throw e;
  }
}

/**
 * Parses and validates one JSON Lines scan record; returns the scan (ranges in metres, angles in
 * radians) or a one-sentence reason for refusing the line. Never throws.
 */
export function parseScanLine(line: string, ctx: ScanLineContext): ScanLineResult {
  const obj = readObject(line);
  if ('refused' in obj) return { ok: false, reason: obj.refused as string };
  return attempt(() => ({ ok: true as const, scan: readScan(obj, ctx) }));
}

/**
 * Parses one line of a robot's log: a scan as `parseScanLine` reads it, or a pose report — a line
 * with "t", "robot" and "pose" and neither "scanner" nor "ranges" — that only says where the robot
 * was (robots may send them between scans so that the paths layer shows where they drove).
 */
export function parseLogLine(line: string, ctx: ScanLineContext): LogLineResult {
  const obj = readObject(line);
  if ('refused' in obj) return { ok: false, reason: obj.refused as string };
  if (!('scanner' in obj) && !('ranges' in obj)) {
    return attempt(() => {
      const [t, timeMs] = readTime(obj, ctx);
      return { ok: true as const, poseReport: { t, timeMs, robot: readRobot(obj, ctx), pose: readPose(obj) } };
    });
  }
  return attempt(() => ({ ok: true as const, scan: readScan(obj, ctx) }));
}

/** True when range r (metres) is a return for this scan: rangeMin ≤ r < rangeMax (NaN never is). */
export function isReturn(scan: ScanRecord, r: number): boolean {
  return r >= scan.rangeMin && r < scan.rangeMax;
}
