import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { parseScanLine } from '../../../../shared/scan/scan-record.js';
import { beamTable, castScan } from '../../../../shared/sim/scanner.js';
import { createScenario, type Scenario, type ScanLogLine, type ScenarioOptions } from '../../../../shared/sim/scenario.js';
import type { Box } from '../../../../shared/sim/shapes.js';
import { CellState } from '../../../../shared/types/grid.js';

/** A scenario without noise or traffic, so ranges are exact geometry. */
const QUIET: Omit<ScenarioOptions, 'seed'> = {
  days: 28,
  startDate: '2026-11-02',
  scansPerRobotPerDay: 120,
  beamStep: 2,
  noise: { rangeSigma: 0, poseSigmaXY: 0, poseSigmaYaw: 0, dropout: 0 },
  traffic: { peoplePerDay: 0, forkliftChance: 0 },
};

/** Beam endpoints in metres computed the way an analysis would: reported pose ∘ mount, then range along the bearing. */
function endpoints(sc: Scenario, rec: ScanLogLine, useTrueMount = false): [number, number][] {
  const robot = sc.robots.find((r) => r.name === rec.robot)!;
  const m = (useTrueMount ? robot.trueMounts : robot.mounts).find((q) => q.name === rec.scanner)!;
  const [x, y, th] = rec.pose;
  const sx = x + Math.cos(th) * m.x - Math.sin(th) * m.y;
  const sy = y + Math.sin(th) * m.x + Math.cos(th) * m.y;
  const out: [number, number][] = [];
  rec.ranges.forEach((r, k) => {
    if (r === null) return;
    const a = th + m.yaw + rec.angleMin + k * rec.angleIncrement;
    out.push([sx + r * Math.cos(a), sy + r * Math.sin(a)]);
  });
  return out;
}

function inside(b: Box, margin: number, [x, y]: [number, number]): boolean {
  return x >= b.minX - margin && x <= b.maxX + margin && y >= b.minY - margin && y <= b.maxY + margin;
}

/** Returns of day `day` whose endpoints fall in the box grown by `margin` metres. */
function returnsIn(sc: Scenario, day: number, b: Box, margin: number): number {
  let n = 0;
  for (const rec of sc.scansForDay(day)) for (const p of endpoints(sc, rec)) if (inside(b, margin, p)) n++;
  return n;
}

describe('createScenario', () => {
  it('when created twice with the same seed, then map and scans are identical; another seed changes the scans', () => {
    // Arrange
    const opts: ScenarioOptions = { seed: 7, days: 5, startDate: '2026-11-02', scansPerRobotPerDay: 30 };

    // Act
    const a = createScenario(opts);
    const b = createScenario(opts);
    const c = createScenario({ ...opts, seed: 8 });
    const lines = (s: Scenario, day: number): string[] => [...s.scansForDay(day)].map((r) => JSON.stringify(r));

    // Assert
    expect(Buffer.from(a.map.cells).equals(Buffer.from(b.map.cells))).toBe(true);
    expect(lines(a, 3)).toEqual(lines(b, 3));
    // Days are independent streams: generating day 3 first or after day 1 gives the same lines.
    lines(b, 1);
    expect(lines(b, 3)).toEqual(lines(a, 3));
    expect(lines(c, 3)).not.toEqual(lines(a, 3));
    expect(JSON.stringify(a.truth)).toBe(JSON.stringify(b.truth));
  });

  it('when a day is generated, then every line parses as a scan log line and times are ordered inside working hours', () => {
    // Arrange: the reference parser of the scan log format (DESIGN §4.2).
    const sc = createScenario({ seed: 3, days: 2, startDate: '2026-11-02', scansPerRobotPerDay: 40 });
    const [from, to] = sc.workingWindow(1);

    // Act
    const recs = [...sc.scansForDay(1)];

    // Assert: 3 robots × 40 scans, AMR-03 with two scanners → 160 lines.
    expect(recs.length).toBe(160);
    let last = -Infinity;
    for (const rec of recs) {
      const parsed = parseScanLine(JSON.stringify(rec), { now: new Date('2030-01-01T00:00:00Z') });
      expect(parsed.ok).toBe(true);
      const ms = Date.parse(rec.t);
      expect(ms).toBeGreaterThanOrEqual(from);
      expect(ms).toBeLessThan(to);
      expect(ms).toBeGreaterThanOrEqual(last);
      last = ms;
      expect(rec.ranges.length).toBe(541);
    }
    expect(new Set(recs.map((r) => `${r.robot}/${r.scanner}`))).toEqual(new Set(['AMR-01/front', 'AMR-02/front', 'AMR-03/front', 'AMR-03/rear']));
  });

  it('when the site clock leaves summer time, then the local 06:00–22:00 window moves by an hour in UTC', () => {
    // Arrange: EU summer time ends on the last Sunday of October at 01:00 UTC (Directive
    // 2000/84/EC); 2026-10-25 is that Sunday, so Berlin is UTC+2 on the 24th and UTC+1 on the 25th.
    const sc = createScenario({ seed: 1, days: 2, startDate: '2026-10-24', siteTimezone: 'Europe/Berlin', scansPerRobotPerDay: 1 });

    // Act
    const [d0, d1] = [sc.workingWindow(0), sc.workingWindow(1)];

    // Assert
    expect(d0.map((t) => new Date(t).toISOString())).toEqual(['2026-10-24T04:00:00.000Z', '2026-10-24T20:00:00.000Z']);
    expect(d1.map((t) => new Date(t).toISOString())).toEqual(['2026-10-25T05:00:00.000Z', '2026-10-25T21:00:00.000Z']);
    expect(sc.truth.dayDates).toEqual(['2026-10-24', '2026-10-25']);
  });

  it('when a scanner is hand-placed in the west aisle facing the west wall, then ranges equal 1.85 m / cos(bearing)', () => {
    // Arrange: the wall's inner face is x = 0.3 and the scanner stands at x = 2.15, so a beam at
    // bearing a from straight west meets it after 1.85 / cos a (right-triangle geometry) while
    // its y stays between the south and north walls (|a| ≤ 75° from y = 30).
    const sc = createScenario({ seed: 1, days: 1, startDate: '2026-11-02', scansPerRobotPerDay: 0 });
    const out = new Float64Array(sc.scanner.beams);

    // Act
    castScan(sc.worldForDay(0), null, 2.15, 30, Math.PI, sc.scanner, beamTable(sc.scanner), null, out);

    // Assert
    let checked = 0;
    for (let k = 0; k < sc.scanner.beams; k++) {
      const a = sc.scanner.angleMin + k * sc.scanner.angleIncrement;
      if (Math.abs(a) > (75 * Math.PI) / 180 + 1e-9) continue;
      expect(out[k]).toBeCloseTo(1.85 / Math.cos(a), 9);
      checked++;
    }
    expect(checked).toBe(301);
  });

  it('when each scripted change begins, then returns appear in (or vanish from) its area that day and not before', () => {
    // Arrange
    const sc = createScenario({ seed: 11, ...QUIET, changes: { missingFromDay: 7, fenceFromDay: 12, unmappedFromDay: 18, palletDays: [4, 6] } });
    const change = (id: string) => sc.truth.changes.find((c) => c.id === id)!;
    const missing = change('missing-rack-bays');
    const fence = change('new-fence');
    const shelf = change('unmapped-shelving');
    const pallets = change('pallets-staging');

    // Act, Assert: removed bays return beams up to day 6 and none from day 7. Their faces lie on
    // the area's x edges, so x grows by 1 cm; y shrinks by 2 cm so that the end face of the
    // remaining neighbour bay, seen once the bays are gone, does not count.
    const b = missing.bbox;
    const bays = { minX: b.minX - 0.01, maxX: b.maxX + 0.01, minY: b.minY + 0.02, maxY: b.maxY - 0.02 };
    expect(returnsIn(sc, 6, bays, 0)).toBeGreaterThan(50);
    expect(returnsIn(sc, 7, bays, 0)).toBe(0);
    expect(returnsIn(sc, 11, fence.bbox, 0.01)).toBe(0);
    expect(returnsIn(sc, 12, fence.bbox, 0.01)).toBeGreaterThan(20);
    expect(returnsIn(sc, 17, shelf.bbox, 0.01)).toBe(0);
    expect(returnsIn(sc, 18, shelf.bbox, 0.01)).toBeGreaterThan(20);
    expect(returnsIn(sc, 3, pallets.bbox, 0.01)).toBe(0);
    expect(returnsIn(sc, 4, pallets.bbox, 0.01)).toBeGreaterThan(20);
    expect(returnsIn(sc, 5, pallets.bbox, 0.01)).toBe(0);
    expect(pallets.persistence).toBe('intermittent');
    expect(pallets.parts.length).toBe(8);
    expect(pallets.days).toEqual([4, 6]);
  });

  it('when the stored map is read at each change, then it shows the day-0 building: bays mapped, fence area free, shelving area unknown', () => {
    // Arrange
    const sc = createScenario({ seed: 11, ...QUIET, scansPerRobotPerDay: 0 });
    const at = (x: number, y: number): number => {
      const i = Math.floor((x - sc.map.origin.x) / sc.map.resolution);
      const j = Math.floor((y - sc.map.origin.y) / sc.map.resolution);
      return sc.map.cells[j * sc.map.width + i];
    };
    const change = (id: string) => sc.truth.changes.find((c) => c.id === id)!;
    const bays = change('missing-rack-bays').bbox;
    const fence = change('new-fence').bbox;
    const shelf = change('unmapped-shelving').bbox;

    // Act, Assert
    expect(at(bays.minX + 0.025, (bays.minY + bays.maxY) / 2)).toBe(CellState.Occupied);
    expect(at((fence.minX + fence.maxX) / 2, (fence.minY + fence.maxY) / 2)).toBe(CellState.Free);
    expect(at((shelf.minX + shelf.maxX) / 2, (shelf.minY + shelf.maxY) / 2)).toBe(CellState.Unknown);
    expect(sc.metadata).toEqual({
      image: 'map.pgm',
      resolution: 0.05,
      origin: [-1, -1, 0],
      negate: 0,
      occupiedThresh: 0.65,
      freeThresh: 0.196,
      mode: 'trinary',
    });
  });

  it('when a scanner is turned 1.4° on its mount, then its returns land on structure only with the true mount, not the configured one', () => {
    // Arrange
    const dyaw = (1.4 * Math.PI) / 180;
    const sc = createScenario({ seed: 5, ...QUIET, days: 1, scansPerRobotPerDay: 20, mountErrors: [{ robot: 'AMR-02', dyaw }] });
    const boxes = sc.layout.structure;
    const offSurface = (p: [number, number]): number =>
      Math.min(...boxes.map((b) => Math.hypot(p[0] - Math.max(b.minX, Math.min(b.maxX, p[0])), p[1] - Math.max(b.minY, Math.min(b.maxY, p[1])))));
    const recs = [...sc.scansForDay(0)].filter((r) => r.robot === 'AMR-02');

    // Act
    const share = (useTrue: boolean): number => {
      const pts = recs.flatMap((r) => endpoints(sc, r, useTrue));
      return pts.filter((p) => offSurface(p) > 0.01).length / pts.length;
    };

    // Assert: pose rounding (0.1 mm, 10 µrad) keeps true-mount endpoints within 1 cm of a surface.
    expect(share(true)).toBe(0);
    expect(share(false)).toBeGreaterThan(0.3);
    expect(sc.truth.robots[1].mountErrors).toEqual([{ scanner: 'front', dx: 0, dy: 0, dyaw }]);
    expect(sc.truth.robots[0].mountErrors).toEqual([]);
  });

  it('when localization noise is σ = 2.5 cm and 0.3°, then reported-minus-true poses have those standard deviations', () => {
    // Arrange: with σ = 0 the generator draws the same deviates, so a noisy scenario minus a
    // noise-free one with the same seed isolates the pose noise. Intervals: χ²(n − 1) quantiles
    // of jstat@1.9.6; the 0.1 mm / 10 µrad rounding of poses is far below σ.
    const base: ScenarioOptions = { seed: 21, days: 1, startDate: '2026-11-02', scansPerRobotPerDay: 1500, beamStep: 10 };
    const noisy = [...createScenario({ ...base, noise: { poseSigmaXY: 0.025, poseSigmaYaw: (0.3 * Math.PI) / 180 } }).scansForDay(0)];
    const clean = [...createScenario({ ...base, noise: { poseSigmaXY: 0, poseSigmaYaw: 0 } }).scansForDay(0)].filter((r) => r.scanner === 'front');
    const front = noisy.filter((r) => r.scanner === 'front');

    // Act
    const dx = front.map((r, k) => r.pose[0] - clean[k].pose[0]);
    const dth = front.map((r, k) => {
      const d = r.pose[2] - clean[k].pose[2];
      return Math.atan2(Math.sin(d), Math.cos(d));
    });

    // Assert
    const check = (xs: number[], sigma: number): void => {
      const n = xs.length;
      const mean = xs.reduce((s, v) => s + v, 0) / n;
      const variance = xs.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1);
      const stat = ((n - 1) * variance) / sigma ** 2;
      expect(Math.abs(mean)).toBeLessThan((jStat.normal.inv(0.9995, 0, 1) * sigma) / Math.sqrt(n));
      expect(stat).toBeGreaterThan(jStat.chisquare.inv(0.0005, n - 1));
      expect(stat).toBeLessThan(jStat.chisquare.inv(0.9995, n - 1));
    };
    expect(front.length).toBe(4500);
    check(dx, 0.025);
    check(dth, (0.3 * Math.PI) / 180);
  });

  it('when people walk the aisles, then some beams end on them, at different places on different days', () => {
    // Arrange: returns that land off every static surface by more than 5 cm can only be people.
    const sc = createScenario({ seed: 9, ...QUIET, days: 3, traffic: { peoplePerDay: 8, forkliftChance: 0 } });
    const boxes = sc.layout.structure;
    const transientCells = (day: number): Set<string> => {
      const cells = new Set<string>();
      for (const rec of sc.scansForDay(day)) {
        for (const p of endpoints(sc, rec)) {
          const d = Math.min(...boxes.map((b) => Math.hypot(p[0] - Math.max(b.minX, Math.min(b.maxX, p[0])), p[1] - Math.max(b.minY, Math.min(b.maxY, p[1])))));
          if (d > 0.05) cells.add(`${Math.floor(p[0])}:${Math.floor(p[1])}`);
        }
      }
      return cells;
    };

    // Act
    const a = transientCells(0);
    const b = transientCells(1);

    // Assert: both days see people; most of day 1's person squares were empty on day 0.
    expect(a.size).toBeGreaterThan(5);
    expect(b.size).toBeGreaterThan(5);
    const shared = [...b].filter((k) => a.has(k)).length;
    expect(shared / b.size).toBeLessThan(0.5);
  });

  it('when options are out of range, then creation fails with a message naming the option', () => {
    expect(() => createScenario({ seed: 1.5, days: 1, startDate: '2026-11-02' })).toThrow(/seed/);
    expect(() => createScenario({ seed: 1, days: 0, startDate: '2026-11-02' })).toThrow(/days/);
    expect(() => createScenario({ seed: 1, days: 1, startDate: '2026-13-02' })).toThrow(/startDate/);
    expect(() => createScenario({ seed: 1, days: 1, startDate: '2026-11-02', siteTimezone: 'Mars/Olympus' })).toThrow(/time zone/);
    expect(() => createScenario({ seed: 1, days: 1, startDate: '2026-11-02', workingHours: [22, 6] })).toThrow(/workingHours/);
    expect(() => createScenario({ seed: 1, days: 2, startDate: '2026-11-02' }).scansForDay(2).next()).toThrow(/day must be/);
  });
});
