/**
 * Quiet windows for a remap: the site's mean returns per hour of the week (site-local wall-clock
 * hours, so a window keeps to the quiet night across a daylight-saving change), and the windows of
 * a given length in the coming days that expect the fewest returns. Local time comes from luxon's
 * time-zone rules (IANA database), never from a fixed UTC offset.
 */
import { DateTime } from 'luxon';

const HOUR_MS = 3_600_000;
const MINUTE_MS = 60_000;

/** Returns counted in one UTC hour (ms since the epoch at the hour's start). */
export interface HourCount {
  hourStartMs: number;
  returns: number;
}

/** Mean returns of one hour of the week: ISO weekday 1–7 (Monday = 1), local hour 0–23; null when no hour of it was in the history. */
export interface HourOfWeekMean {
  dow: number;
  hour: number;
  meanReturns: number | null;
}

/** A proposed window: UTC instants (ms), local wall-clock start and end ("YYYY-MM-DD HH:mm"), expected returns, rank from 1. */
export interface QuietWindow {
  startMs: number;
  endMs: number;
  localStart: string;
  localEnd: string;
  expectedReturns: number;
  rank: number;
}

/** The slot 0–167 (Monday 00:00 first) of the local hour that holds the instant `ms` in `timezone`. */
export function hourOfWeekSlot(ms: number, timezone: string): number {
  const local = DateTime.fromMillis(ms, { zone: timezone });
  return (local.weekday - 1) * 24 + local.hour;
}

/**
 * Returns the 168 hour-of-week means (Monday 00:00 first) of the returns in the UTC hours starting
 * in [fromMs, toMs): each hour counts once in the slot of its local start, hours absent from
 * `hours` count as zero returns. On the night the clocks go back a slot gets two hours that day,
 * on the night they go forward one slot gets none; the mean over the hours that did occur stays right.
 */
export function hourOfWeekProfile(hours: readonly HourCount[], timezone: string, fromMs: number, toMs: number): HourOfWeekMean[] {
  checkZone(timezone);
  const byHour = new Map<number, number>();
  for (const h of hours) byHour.set(h.hourStartMs, (byHour.get(h.hourStartMs) ?? 0) + h.returns);
  const sums = new Float64Array(168);
  const samples = new Int32Array(168);
  for (let t = Math.ceil(fromMs / HOUR_MS) * HOUR_MS; t < toMs; t += HOUR_MS) {
    const slot = hourOfWeekSlot(t, timezone);
    sums[slot] += byHour.get(t) ?? 0;
    samples[slot]++;
  }
  return Array.from({ length: 168 }, (_, slot) => ({ dow: Math.floor(slot / 24) + 1, hour: slot % 24, meanReturns: samples[slot] > 0 ? sums[slot] / samples[slot] : null }));
}

/** Where and how long to look for windows, and how many to return. */
export interface QuietWindowOptions {
  timezone: string;
  /** Windows start at or after this instant, ms. */
  nowMs: number;
  /** Look this many days ahead (windows end within them). */
  days: number;
  durationMinutes: number;
  count: number;
  /** Candidate starts every this many minutes from the hour (default 30). */
  stepMinutes?: number;
  /** Fewest hours between the starts of two proposed windows (default 12: different nights, not three slots of one). */
  minGapHours?: number;
}

/**
 * Expected returns in [startMs, endMs): the profile's mean of each UTC hour piece's local slot,
 * weighted by the piece's share of the hour; null when a piece falls in a slot without history.
 */
export function expectedReturns(profile: readonly HourOfWeekMean[], timezone: string, startMs: number, endMs: number): number | null {
  let total = 0;
  for (let t = startMs; t < endMs; ) {
    const next = Math.min(endMs, Math.floor(t / HOUR_MS) * HOUR_MS + HOUR_MS);
    const mean = profile[hourOfWeekSlot(Math.floor(t / HOUR_MS) * HOUR_MS, timezone)].meanReturns;
    if (mean === null) return null;
    total += (mean * (next - t)) / HOUR_MS;
    t = next;
  }
  return total;
}

/** Local wall-clock time of an instant as "YYYY-MM-DD HH:mm". */
export function localStamp(ms: number, timezone: string): string {
  return DateTime.fromMillis(ms, { zone: timezone }).toFormat('yyyy-MM-dd HH:mm');
}

/**
 * Returns up to `count` windows of `durationMinutes` within the next `days` days that expect the
 * fewest returns, lowest first: candidates start every `stepMinutes` on the clock; ties go to the
 * window whose neighbouring hours are quieter (it sits inside the quiet spell, leaving slack on
 * both sides), then to the earlier one. Chosen windows never overlap and start at least
 * `minGapHours` apart.
 */
export function quietWindows(profile: readonly HourOfWeekMean[], options: QuietWindowOptions): QuietWindow[] {
  const { timezone, nowMs, days, durationMinutes, count } = options;
  const step = options.stepMinutes ?? 30;
  const gapMs = (options.minGapHours ?? 12) * HOUR_MS;
  checkZone(timezone);
  if (profile.length !== 168) throw new RangeError(`The profile must have 168 hours of the week, got ${profile.length}.`);
  if (!(days > 0 && days <= 60)) throw new RangeError(`Look ahead from 1 to 60 days, got ${days}.`);
  if (!(durationMinutes > 0 && durationMinutes <= 7 * 24 * 60)) throw new RangeError(`A window must last from 1 minute to 7 days, got ${durationMinutes} minutes.`);
  if (!(Number.isInteger(step) && step > 0 && step <= 60 && 60 % step === 0)) throw new RangeError(`The step must divide the hour (1–60 minutes), got ${step}.`);
  const durationMs = durationMinutes * MINUTE_MS;
  const horizon = nowMs + days * 24 * HOUR_MS;
  const stepMs = step * MINUTE_MS;
  const candidates: Array<{ startMs: number; expected: number; shoulder: number }> = [];
  for (let s = Math.ceil(nowMs / stepMs) * stepMs; s + durationMs <= horizon; s += stepMs) {
    const expected = expectedReturns(profile, timezone, s, s + durationMs);
    if (expected === null) continue;
    const before = expectedReturns(profile, timezone, s - HOUR_MS, s) ?? 0;
    const after = expectedReturns(profile, timezone, s + durationMs, s + durationMs + HOUR_MS) ?? 0;
    candidates.push({ startMs: s, expected, shoulder: before + after });
  }
  // Means are sums of whole returns divided by whole counts: compare at a tolerance, so that equal
  // windows computed along different hour pieces tie.
  const eps = 1e-9;
  candidates.sort((a, b) => (Math.abs(a.expected - b.expected) > eps ? a.expected - b.expected : Math.abs(a.shoulder - b.shoulder) > eps ? a.shoulder - b.shoulder : a.startMs - b.startMs));
  const chosen: typeof candidates = [];
  for (const c of candidates) {
    if (chosen.length >= count) break;
    const clashes = chosen.some((w) => (c.startMs < w.startMs + durationMs && w.startMs < c.startMs + durationMs) || Math.abs(c.startMs - w.startMs) < gapMs);
    if (!clashes) chosen.push(c);
  }
  return chosen.map((c, k) => ({
    startMs: c.startMs,
    endMs: c.startMs + durationMs,
    localStart: localStamp(c.startMs, timezone),
    localEnd: localStamp(c.startMs + durationMs, timezone),
    expectedReturns: c.expected,
    rank: k + 1,
  }));
}

function checkZone(timezone: string): void {
  if (!DateTime.now().setZone(timezone).isValid) throw new RangeError(`"${timezone}" is not a known time zone.`);
}
