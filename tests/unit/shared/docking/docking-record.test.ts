import { describe, expect, it } from 'vitest';
import { dockingBodyLines, parseDockingLine } from '../../../../shared/docking/docking-record.js';

const ctx = { now: new Date('2026-11-20T12:00:00Z'), stations: new Set(['Charger bay 1', 'Charger bay 2']), expectedRobot: 'AMR-01' };
const line = (fields: Record<string, unknown>) => JSON.stringify({ t: '2026-11-20T08:15:02.120Z', station: 'Charger bay 1', dx: 0.0042, dy: -0.0013, dyaw: 0.004, ...fields });

describe('docking record', () => {
  it('when a line is good, then it becomes a record in metres and radians with its time', () => {
    const result = parseDockingLine(line({}), ctx);
    expect(result).toEqual({ ok: true, record: { t: '2026-11-20T08:15:02.120Z', timeMs: Date.parse('2026-11-20T08:15:02.120Z'), station: 'Charger bay 1', dx: 0.0042, dy: -0.0013, dyaw: 0.004 } });
    expect(parseDockingLine(line({ robot: 'AMR-01', t: '2026-11-20T09:15:02+01:00' }), ctx).ok).toBe(true);
  });

  it('when a line is bad, then the reason names the problem in a sentence', () => {
    const reason = (fields: Record<string, unknown>) => {
      const r = parseDockingLine(line(fields), ctx);
      return r.ok ? null : r.reason;
    };
    expect(reason({ station: 'Bay 9' })).toBe('The station "Bay 9" is not registered at this site (registered: Charger bay 1, Charger bay 2).');
    expect(reason({ dx: 12 })).toMatch(/"dx" \(12\) lies beyond ±0.5 m; it is in metres/);
    expect(reason({ dy: -0.51 })).toMatch(/"dy" \(-0.51\) lies beyond ±0.5 m/);
    expect(reason({ dyaw: 0.6 })).toMatch(/"dyaw" \(0.6\) lies beyond ±0.5 rad/);
    expect(reason({ dx: 'near' })).toBe('The docking\'s "dx" must be a finite number.');
    expect(reason({ dyaw: undefined })).toBe('The docking has no "dyaw" field.');
    expect(reason({ t: '2026-11-20T08:15:02' })).toMatch(/ISO 8601 timestamp with a time zone/);
    expect(reason({ t: '2026-02-30T08:00:00Z' })).toMatch(/not a real date/);
    expect(reason({ t: '2026-11-20T13:00:00Z' })).toBe('The docking\'s "t" (2026-11-20T13:00:00Z) lies 3600 s in the future; at most 300 s are allowed.');
    expect(reason({ robot: 'AMR-02' })).toBe('The docking is from robot "AMR-02", but this token belongs to robot "AMR-01".');
    expect(reason({ station: '' })).toMatch(/"station" must be the station's name/);
    // JSON.parse reads 1e999 as Infinity.
    expect(parseDockingLine('{"t":"2026-11-20T08:15:02Z","station":"Charger bay 1","dx":1e999,"dy":0,"dyaw":0}', ctx)).toEqual({ ok: false, reason: 'The docking\'s "dx" must be a finite number.' });
    expect(parseDockingLine('{"t": "broken', ctx)).toMatchObject({ ok: false, reason: expect.stringMatching(/^The line is not valid JSON/) });
    expect(parseDockingLine('[1, 2]', ctx)).toEqual({ ok: false, reason: 'The line is not a JSON object.' });
  });

  it('when a body is one pretty-printed object or JSON Lines, then it splits into numbered lines without the empty ones', () => {
    const pretty = JSON.stringify(JSON.parse(line({})), null, 2);
    expect(dockingBodyLines(pretty)).toEqual([{ line: 1, text: pretty }]);
    expect(dockingBodyLines(`${line({})}\r\n\n${line({ dx: 0 })}\n`).map((l) => l.line)).toEqual([1, 3]);
    expect(dockingBodyLines('{"t": 1}\n{"t": 2}').map((l) => l.text)).toEqual(['{"t": 1}', '{"t": 2}']);
    expect(dockingBodyLines('  \n')).toEqual([]);
  });
});
