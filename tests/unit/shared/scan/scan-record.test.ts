import { describe, expect, it } from 'vitest';
import { isReturn, parseLogLine, parseScanLine, type ScanLineContext } from '../../../../shared/scan/scan-record.js';

const NOW = new Date('2026-11-03T08:20:00.000Z');
const ctx: ScanLineContext = { now: NOW };

// The record layout of DESIGN §4.2; robot names are our own demo scenario.
const GOOD = {
  t: '2026-11-03T08:15:02.120Z',
  robot: 'AMR-07',
  scanner: 'front',
  pose: [12.5, -3.25, 1.5708],
  angleMin: -2.356,
  angleIncrement: 0.00873,
  rangeMin: 0.05,
  rangeMax: 30,
  ranges: [1.5, null, 29.99, 30, 0.01],
};

const line = (patch: Record<string, unknown>, drop: string[] = []): string => {
  const rec: Record<string, unknown> = { ...GOOD, ...patch };
  for (const d of drop) delete rec[d];
  return JSON.stringify(rec);
};

function reasonOf(text: string, c: ScanLineContext = ctx): string {
  const r = parseScanLine(text, c);
  if (r.ok) throw new Error('expected a refusal');
  expect(r.reason).toMatch(/^[A-Z].*\.$/);
  return r.reason;
}

describe('parseScanLine', () => {
  it('when the record is well formed, then every field is read and null ranges become NaN', () => {
    // Act
    const r = parseScanLine(JSON.stringify(GOOD), ctx);

    // Assert
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.scan.timeMs).toBe(Date.UTC(2026, 10, 3, 8, 15, 2, 120));
    expect([r.scan.robot, r.scan.scanner]).toEqual(['AMR-07', 'front']);
    expect(r.scan.pose).toEqual([12.5, -3.25, 1.5708]);
    expect([r.scan.angleMin, r.scan.angleIncrement, r.scan.rangeMin, r.scan.rangeMax]).toEqual([-2.356, 0.00873, 0.05, 30]);
    expect(Array.from(r.scan.ranges)).toEqual([1.5, NaN, 29.99, 30, 0.01]);
  });

  it('when ranges hold null, values below rangeMin or at/above rangeMax, then those are not returns (DESIGN §4.2)', () => {
    // Arrange
    const r = parseScanLine(JSON.stringify(GOOD), ctx);
    if (!r.ok) throw new Error(r.reason);

    // Act
    const flags = Array.from(r.scan.ranges, (v) => isReturn(r.scan, v));

    // Assert
    expect(flags).toEqual([true, false, true, false, false]);
    expect(isReturn(r.scan, 0.05)).toBe(true);
  });

  it('when the timestamp carries an offset, then it is converted to UTC milliseconds', () => {
    const r = parseScanLine(line({ t: '2026-11-03T09:15:02+01:00' }), ctx);
    expect(r.ok && r.scan.timeMs).toBe(Date.UTC(2026, 10, 3, 8, 15, 2));
  });

  it('when the line is empty, not JSON or not an object, then the reason says so', () => {
    expect(reasonOf('   ')).toBe('The line is empty.');
    expect(reasonOf('{"t": ')).toMatch(/^The line is not valid JSON \(/);
    expect(reasonOf('{"pose": [NaN, 0, 0]}')).toMatch(/not valid JSON/);
    expect(reasonOf('[1, 2]')).toBe('The line is not a JSON object.');
    expect(reasonOf('42')).toBe('The line is not a JSON object.');
  });

  it('when the line is longer than a scan line can be, then it is refused unread', () => {
    // Four million nested lists on one line: parsed, they would hold the process for about a second.
    expect(reasonOf('['.repeat(4_000_000) + ']'.repeat(4_000_000))).toBe('The line holds 8,000,000 characters; a scan line has at most 1,048,576.');
  });

  it('when a field is missing or has the wrong type, then the reason names it', () => {
    expect(reasonOf(line({}, ['scanner']))).toBe('The scan has no "scanner" field.');
    expect(reasonOf(line({}, ['ranges']))).toBe('The scan has no "ranges" field.');
    expect(reasonOf(line({ robot: 7 }))).toBe('The scan\'s "robot" must be a non-empty string.');
    expect(reasonOf(line({ robot: ' ' }))).toBe('The scan\'s "robot" must be a non-empty string.');
    expect(reasonOf(line({ angleMin: '-2.356' }))).toBe('The scan\'s "angleMin" must be a finite number.');
    expect(reasonOf(line({ rangeMax: null }))).toBe('The scan\'s "rangeMax" must be a finite number.');
  });

  it('when the pose is not three finite numbers, then it is refused, strings like "NaN" included', () => {
    expect(reasonOf(line({ pose: [1, 2] }))).toMatch(/"pose" must be a list of three numbers/);
    expect(reasonOf(line({ pose: [1, 2, 'NaN'] }))).toMatch(/"pose" must hold three finite numbers/);
    expect(reasonOf(line({ pose: [1, null, 0] }))).toMatch(/"pose" must hold three finite numbers/);
    // JSON.parse reads 1e999 as Infinity.
    expect(reasonOf(line({ pose: [1, 2, 0] }).replace('[1,2,0]', '[1e999,2,0]'))).toMatch(/"pose" must hold three finite numbers/);
  });

  it('when the timestamp is unparsable, zoneless or too far ahead, then the reason says which', () => {
    expect(reasonOf(line({ t: 'yesterday' }))).toMatch(/"t" must be an ISO 8601 timestamp with a time zone/);
    expect(reasonOf(line({ t: '2026-11-03T08:15:02' }))).toMatch(/with a time zone/);
    expect(reasonOf(line({ t: 1762157702120 }))).toMatch(/ISO 8601/);
    expect(reasonOf(line({ t: '2026-13-03T08:15:02Z' }))).toMatch(/not a real date and time/);
    expect(reasonOf(line({ t: '2026-02-30T08:15:02Z' }))).toMatch(/not a real date and time/);
    expect(reasonOf(line({ t: '2026-11-03T24:00:00Z' }))).toMatch(/not a real date and time/);
    expect(parseScanLine(line({ t: '2024-02-29T08:15:02.5Z' }), ctx).ok).toBe(true);
    expect(reasonOf(line({ t: '2026-11-03T08:25:01Z' }))).toBe(
      'The scan\'s "t" (2026-11-03T08:25:01Z) lies 301 s in the future; at most 300 s are allowed.',
    );
  });

  it('when the timestamp is just inside the allowed clock skew, or maxFutureMs is widened, then it is accepted', () => {
    expect(parseScanLine(line({ t: '2026-11-03T08:25:00Z' }), ctx).ok).toBe(true);
    expect(parseScanLine(line({ t: '2026-11-03T09:00:00Z' }), { now: NOW, maxFutureMs: 3_600_000 }).ok).toBe(true);
  });

  it('when ranges are not a list, empty, too long or hold a non-number, then the reason says so', () => {
    expect(reasonOf(line({ ranges: '1,2,3' }))).toBe('The scan\'s "ranges" must be a list of numbers or nulls.');
    expect(reasonOf(line({ ranges: [] }))).toBe('The scan\'s "ranges" is empty.');
    expect(reasonOf(line({ ranges: new Array(10_001).fill(1) }))).toBe('The scan has 10,001 beams; at most 10,000 are accepted.');
    expect(reasonOf(line({ ranges: [1, 2, 3] }), { now: NOW, maxBeams: 2 })).toMatch(/3 beams; at most 2/);
    expect(reasonOf(line({ ranges: [1, 'NaN', 3] }))).toBe('The scan\'s "ranges" entry 1 must be a number or null.');
    expect(reasonOf(line({ ranges: [1, true] }))).toMatch(/entry 1/);
  });

  it('when the angle increment is 0 or the range limits are inverted, then the scan is refused', () => {
    expect(reasonOf(line({ angleIncrement: 0 }))).toBe('The scan\'s "angleIncrement" must not be 0.');
    expect(reasonOf(line({ rangeMin: 30 }))).toBe('The scan\'s "rangeMin" must be smaller than its "rangeMax".');
    expect(reasonOf(line({ rangeMin: 40 }))).toMatch(/smaller than/);
    expect(reasonOf(line({ rangeMin: -1 }))).toBe('The scan\'s "rangeMin" must not be negative.');
  });

  it('when the scan names another robot than the token\'s, then it is refused naming both', () => {
    expect(reasonOf(JSON.stringify(GOOD), { now: NOW, expectedRobot: 'AMR-12' })).toBe(
      'The scan is from robot "AMR-07", but this token belongs to robot "AMR-12".',
    );
    expect(parseScanLine(JSON.stringify(GOOD), { now: NOW, expectedRobot: 'AMR-07' }).ok).toBe(true);
  });
});

describe('parseLogLine', () => {
  const NOW_CTX: ScanLineContext = { now: new Date('2026-11-04T00:00:00Z') };
  it('when a line has a pose and neither scanner nor ranges, then it is a pose report', () => {
    const r = parseLogLine(JSON.stringify({ t: '2026-11-03T08:00:00Z', robot: 'AMR-07', pose: [1.5, 2, 0.1] }), NOW_CTX);
    expect(r).toEqual({ ok: true, poseReport: { t: '2026-11-03T08:00:00Z', timeMs: Date.UTC(2026, 10, 3, 8), robot: 'AMR-07', pose: [1.5, 2, 0.1] } });
  });

  it('when a pose report has a bad pose or a scan lacks its ranges, then each is refused with its reason', () => {
    const bad = parseLogLine(JSON.stringify({ t: '2026-11-03T08:00:00Z', robot: 'AMR-07', pose: [1.5, null, 0] }), NOW_CTX);
    expect(bad).toEqual({ ok: false, reason: expect.stringMatching(/"pose"/) });
    const noRanges = parseLogLine(JSON.stringify({ t: '2026-11-03T08:00:00Z', robot: 'AMR-07', scanner: 'front', pose: [1, 1, 0] }), NOW_CTX);
    expect(noRanges.ok).toBe(false);
  });
});
