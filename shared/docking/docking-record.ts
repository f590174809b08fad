/**
 * One docking result as a robot reports it (one line of a JSON Lines batch, DESIGN §4.7): where
 * the robot came to rest against a docking station, relative to the station model's nominal
 * docking pose, in the station model's frame.
 */
import { readIsoTime } from '../scan/iso-time.js';
import { DEFAULT_MAX_FUTURE_MS } from '../scan/scan-record.js';

/** A docking result: time, station name, and the final offset (metres, radians). */
export interface DockingRecord {
  /** Timestamp as sent (ISO 8601 with a zone). */
  t: string;
  /** Timestamp in milliseconds since the Unix epoch. */
  timeMs: number;
  /** The station's name at its site. */
  station: string;
  /** Final position minus the nominal docking position along the station's x and y axes, metres. */
  dx: number;
  dy: number;
  /** Final heading minus the nominal docking heading, radians. */
  dyaw: number;
}

/** Largest |dx| or |dy| accepted, metres: a robot that far off has not docked (product choice). */
export const DOCKING_OFFSET_LIMIT_M = 0.5;
/** Largest |dyaw| accepted, radians (about 29°; product choice). */
export const DOCKING_YAW_LIMIT_RAD = 0.5;
/** Longest station name, characters (product choice). */
export const STATION_NAME_MAX = 80;

/** What the parser checks a line against: the clock, the site's station names, the token's robot. */
export interface DockingLineContext {
  now: Date;
  /** How far in the future a timestamp may lie, milliseconds (default 5 minutes, as for scans). */
  maxFutureMs?: number;
  /** The names of the site's stations; a line naming another is refused. */
  stations: ReadonlySet<string>;
  /** When set, a line whose optional "robot" names another robot is refused. */
  expectedRobot?: string;
}

/** Result of parsing one line: the record, or a readable reason for refusing it. */
export type DockingLineResult = { ok: true; record: DockingRecord } | { ok: false; reason: string };

function readTime(obj: Record<string, unknown>, ctx: DockingLineContext): [string, number] | string {
  if (!('t' in obj)) return 'The docking has no "t" field.';
  const time = readIsoTime(obj.t, 'The docking\'s "t"', ctx.now, ctx.maxFutureMs ?? DEFAULT_MAX_FUTURE_MS);
  return time.ok ? [time.t, time.ms] : time.reason;
}

function readOffset(obj: Record<string, unknown>, name: 'dx' | 'dy' | 'dyaw'): number | string {
  if (!(name in obj)) return `The docking has no "${name}" field.`;
  const v = obj[name];
  // JSON.parse turns 1e999 into Infinity, so finiteness is checked, not only the type.
  if (typeof v !== 'number' || !Number.isFinite(v)) return `The docking's "${name}" must be a finite number.`;
  if (name === 'dyaw') {
    if (Math.abs(v) > DOCKING_YAW_LIMIT_RAD) return `The docking's "dyaw" (${v}) lies beyond ±${DOCKING_YAW_LIMIT_RAD} rad; it is in radians (0.0175 for 1°), and a robot turned that far has not docked.`;
  } else if (Math.abs(v) > DOCKING_OFFSET_LIMIT_M) {
    return `The docking's "${name}" (${v}) lies beyond ±${DOCKING_OFFSET_LIMIT_M} m; it is in metres (0.012 for 12 mm), and a robot that far off has not docked.`;
  }
  return v;
}

function listed(names: ReadonlySet<string>): string {
  if (names.size === 0) return 'the site has no station yet';
  const sorted = [...names].sort((a, b) => a.localeCompare(b));
  return `registered: ${sorted.slice(0, 8).join(', ')}${sorted.length > 8 ? ', …' : ''}`;
}

/**
 * Checks one parsed JSON value as a docking result; returns the record (metres, radians) or a
 * one-sentence reason for refusing it. Never throws.
 */
export function readDockingRecord(doc: unknown, ctx: DockingLineContext): DockingLineResult {
  if (typeof doc !== 'object' || doc === null || Array.isArray(doc)) return { ok: false, reason: 'The line is not a JSON object.' };
  const obj = doc as Record<string, unknown>;
  const time = readTime(obj, ctx);
  if (typeof time === 'string') return { ok: false, reason: time };
  if ('robot' in obj && ctx.expectedRobot !== undefined && obj.robot !== ctx.expectedRobot) {
    return { ok: false, reason: `The docking is from robot "${String(obj.robot)}", but this token belongs to robot "${ctx.expectedRobot}".` };
  }
  const station = obj.station;
  if (typeof station !== 'string' || station.trim() === '') return { ok: false, reason: 'The docking\'s "station" must be the station\'s name, a non-empty string.' };
  if (!ctx.stations.has(station)) return { ok: false, reason: `The station "${station.slice(0, STATION_NAME_MAX)}" is not registered at this site (${listed(ctx.stations)}).` };
  const offsets: number[] = [];
  for (const name of ['dx', 'dy', 'dyaw'] as const) {
    const v = readOffset(obj, name);
    if (typeof v === 'string') return { ok: false, reason: v };
    offsets.push(v);
  }
  return { ok: true, record: { t: time[0], timeMs: time[1], station, dx: offsets[0], dy: offsets[1], dyaw: offsets[2] } };
}

/** Parses and checks one JSON Lines docking line; returns the record or a readable reason. Never throws. */
export function parseDockingLine(line: string, ctx: DockingLineContext): DockingLineResult {
  let doc: unknown;
  try {
    doc = JSON.parse(line);
  } catch (e) {
    const detail = e instanceof Error ? e.message.replace(/\.$/, '') : String(e);
    return { ok: false, reason: `The line is not valid JSON (${detail}).` };
  }
  return readDockingRecord(doc, ctx);
}

/**
 * Splits a posted body into numbered lines: a body that is one JSON object as a whole (perhaps
 * spread over several lines) is one line; otherwise each non-empty line of JSON Lines is one.
 */
export function dockingBodyLines(text: string): Array<{ line: number; text: string }> {
  const trimmed = text.trim();
  if (trimmed.startsWith('{') && trimmed.includes('\n')) {
    try {
      const doc: unknown = JSON.parse(trimmed);
      if (typeof doc === 'object' && doc !== null && !Array.isArray(doc)) return [{ line: 1, text: trimmed }];
    } catch {
      // Not one object: read it as JSON Lines.
    }
  }
  const out: Array<{ line: number; text: string }> = [];
  const lines = text.split('\n');
  for (let k = 0; k < lines.length; k++) {
    const l = lines[k].replace(/\r$/, '');
    if (l.trim() !== '') out.push({ line: k + 1, text: l });
  }
  return out;
}
