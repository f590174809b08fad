import { mkdtemp, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { runAnalyze, type AnalyzeIo } from '../../../jobs/commands/analyze.js';
import { runSimulate } from '../../../jobs/commands/simulate.js';
import type { ScenarioTruth } from '../../../shared/sim/scenario.js';

// A simulated site of our own written by the simulate command (fixed seed): 16 days, four robots,
// AMR-02's front scanner turned 1.4° on purpose, light settings (every fourth beam, 60 scans per
// robot and day) so the file stays well under a minute. The detection window is the last 8 days,
// all of them after the rack bays went (day 7): every scripted change is then in force for the
// whole window or comes and goes in it. analyze runs twice on it, with and without --cells.
const DAYS = 16;
const WINDOW_DAYS = 8;
const TURN_DEG = 1.4;
// A zone belongs to a scripted change when one of its cells lies within the change's bounding box
// grown by this margin (the 0.1 m tolerance plus the scatter band), metres; as in the change
// detection test on the same simulator (tests/unit/shared/detect/change-detection.test.ts).
const MATCH_MARGIN_M = 0.25;

interface Captured extends AnalyzeIo {
  lines: string[];
  errors: string[];
}
function capture(): Captured {
  const lines: string[] = [];
  const errors: string[] = [];
  return { lines, errors, out: (l) => lines.push(l), err: (l) => errors.push(l) };
}

type Zone = { kind: string; persistence: string; areaM2: number; cellCount: number; bbox: number[]; centroid: number[]; outline: number[][]; meanHitRate: number; observations: number; cells?: number[][] };
type Robot = { robot: string; scanner: string; returns: number; agreement: number | null; flagged: boolean; mount: { dx: number; dy: number; dyawDeg: number; sigmaYawDeg: number } | null };
interface Doc {
  map: { width: number; height: number; resolution: number; origin: number[] };
  agreement: { returns: number; explained: number; ratio: number | null };
  zones: Zone[];
  robots: Robot[];
}

describe('analyze on a simulated site', () => {
  let dir: string;
  let truth: ScenarioTruth;
  let scanArgs: string[];
  let plain: { code: number; io: Captured; doc: Doc };
  let withCells: { code: number; io: Captured; doc: Doc };

  const analyse = async (extra: string[]) => {
    const io = capture();
    const json = join(dir, `out-${extra.length}.json`);
    const code = await runAnalyze([...scanArgs, '--window-days', String(WINDOW_DAYS), '--json', json, ...extra], io);
    return { code, io, doc: JSON.parse(await readFile(json, 'utf8')) as Doc };
  };

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'driftline-analyze-'));
    const quiet = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    try {
      const simulated = await runSimulate(['--out', join(dir, 'site'), '--days', String(DAYS), '--seed', '1', '--robots', '4', '--beam-step', '4', '--scans', '60', '--mount-error', `AMR-02:${TURN_DEG}`]);
      expect(simulated).toBe(0);
    } finally {
      quiet.mockRestore();
    }
    truth = JSON.parse(await readFile(join(dir, 'site', 'truth.json'), 'utf8')) as ScenarioTruth;
    const files = (await readdir(join(dir, 'site', 'scans'))).sort();
    // The robots' configured mounts, as a site would register them (the turn is not in them).
    const mounts = truth.robots.flatMap((r) => r.mounts.map((m) => ['--mount', `${r.name}:${m.name}=${m.x},${m.y},${m.yaw}`]));
    scanArgs = ['--map', join(dir, 'site', 'map.yaml'), ...files.flatMap((f) => ['--scans', join(dir, 'site', 'scans', f)]), ...mounts.flat()];
    plain = await analyse([]);
    withCells = await analyse(['--cells']);
  }, 180_000);
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  it('when the site is analysed with --json, then the document has exactly the agreed keys', () => {
    // Arrange: the two runs of beforeAll. Act: read their documents. Assert: the shape other tools read.
    expect(plain.code).toBe(0);
    const { doc } = plain;
    expect(Object.keys(doc).sort()).toEqual(['agreement', 'map', 'robots', 'zones']);
    expect(Object.keys(doc.map).sort()).toEqual(['height', 'origin', 'resolution', 'width']);
    expect(Object.keys(doc.agreement).sort()).toEqual(['explained', 'ratio', 'returns']);
    expect(doc.zones.length).toBeGreaterThan(0);
    for (const z of doc.zones) {
      expect(Object.keys(z).sort()).toEqual(['areaM2', 'bbox', 'cellCount', 'centroid', 'kind', 'meanHitRate', 'observations', 'outline', 'persistence']);
      expect(['new', 'missing', 'unmapped']).toContain(z.kind);
      expect(['persistent', 'intermittent']).toContain(z.persistence);
      expect(z.bbox).toHaveLength(4);
      expect(z.centroid).toHaveLength(2);
      for (const p of z.outline) expect(p).toHaveLength(2);
    }
    for (const r of doc.robots) {
      expect(Object.keys(r).sort()).toEqual(['agreement', 'flagged', 'mount', 'returns', 'robot', 'scanner']);
      if (r.mount) expect(Object.keys(r.mount).sort()).toEqual(['dx', 'dy', 'dyawDeg', 'sigmaYawDeg']);
    }
  });

  it('when the map is read, then its size, resolution and origin are those simulate wrote', async () => {
    // Reference: the map's own files (P5 header "P5\n<width> <height>\n255", Netpbm format; map.yaml).
    const pgm = await readFile(join(dir, 'site', 'map.pgm'));
    const [, w, h] = /^P5\s+(\d+)\s+(\d+)/.exec(pgm.subarray(0, 32).toString('latin1'))!;
    const yaml = await readFile(join(dir, 'site', 'map.yaml'), 'utf8');
    expect(plain.doc.map.width).toBe(Number(w));
    expect(plain.doc.map.height).toBe(Number(h));
    expect(plain.doc.map.resolution).toBe(Number(/resolution:\s*([\d.]+)/.exec(yaml)![1]));
    expect(plain.doc.map.origin).toHaveLength(3);
    expect(yaml).toContain(`origin: [${plain.doc.map.origin.join(', ')}]`);
  });

  it('when the window is analysed, then every scripted change in it is a zone of its kind and persistence', () => {
    // Reference: the simulator's ground truth (truth.json, shared/sim/changes.ts).
    const { map, zones } = withCells.doc;
    const windowDays = new Set(Array.from({ length: WINDOW_DAYS }, (_, k) => DAYS - WINDOW_DAYS + k));
    const inWindow = truth.changes.filter((c) => c.days.some((d) => windowDays.has(d)));
    expect(inWindow.map((c) => c.id).sort()).toEqual(['missing-rack-bays', 'new-fence', 'pallets-staging']);
    const touches = (z: Zone, b: { minX: number; minY: number; maxX: number; maxY: number }) =>
      z.cells!.some(([i, j]) => {
        const x = map.origin[0] + (i + 0.5) * map.resolution;
        const y = map.origin[1] + (j + 0.5) * map.resolution;
        return x >= b.minX - MATCH_MARGIN_M && x <= b.maxX + MATCH_MARGIN_M && y >= b.minY - MATCH_MARGIN_M && y <= b.maxY + MATCH_MARGIN_M;
      });
    for (const change of inWindow) {
      const matched = zones.filter((z) => z.kind === change.kind && touches(z, change.bbox));
      expect(matched.length, change.id).toBeGreaterThan(0);
      for (const z of matched) expect(z.persistence, change.id).toBe(change.persistence);
    }
  });

  it('when --cells is given, then each zone lists its cells, all inside the map and the zone; without it, none', () => {
    const { map, zones } = withCells.doc;
    for (const z of plain.doc.zones) expect(z).not.toHaveProperty('cells');
    // Same input, same pipeline: the zones differ by their cells only.
    expect(zones.map(({ cells, ...rest }) => rest)).toEqual(plain.doc.zones);
    for (const z of zones) {
      expect(z.cells).toHaveLength(z.cellCount);
      for (const [i, j] of z.cells!) {
        expect(Number.isInteger(i) && i >= 0 && i < map.width).toBe(true);
        expect(Number.isInteger(j) && j >= 0 && j < map.height).toBe(true);
        // Cell centres lie in the zone's bounding box (bbox runs along cell edges, map yaw 0).
        const x = map.origin[0] + (i + 0.5) * map.resolution;
        const y = map.origin[1] + (j + 0.5) * map.resolution;
        expect(x > z.bbox[0] && x < z.bbox[2] && y > z.bbox[1] && y < z.bbox[3]).toBe(true);
      }
    }
  });

  it('when a scanner is turned, then only it is flagged, with a mount estimate near the truth, and agreement leaves it out', () => {
    const { robots, agreement } = plain.doc;
    const flagged = robots.filter((r) => r.flagged);
    // The simulator's truth: AMR-02's front scanner is turned +1.4° (anticlockwise) against its configured mount.
    const error = truth.robots.find((r) => r.name === 'AMR-02')!.mountErrors[0];
    expect((error.dyaw * 180) / Math.PI).toBeCloseTo(TURN_DEG, 9);
    expect(flagged.map((r) => `${r.robot}/${r.scanner}`)).toEqual(['AMR-02/front']);
    expect(flagged[0].mount!.dyawDeg).toBeGreaterThan(TURN_DEG - 0.3);
    expect(flagged[0].mount!.dyawDeg).toBeLessThan(TURN_DEG + 0.3);
    expect(plain.io.lines.join('\n')).toMatch(/AMR-02 \(front\): Scanner check advised: .*mount appears turned 1\.\d° anticlockwise/);
    // Every robot and scanner of truth.json has a row; agreement sums the unflagged rows' returns.
    expect(robots.map((r) => `${r.robot}/${r.scanner}`).sort()).toEqual(truth.robots.flatMap((r) => r.mounts.map((m) => `${r.name}/${m.name}`)).sort());
    expect(agreement.returns).toBe(robots.filter((r) => !r.flagged).reduce((a, r) => a + r.returns, 0));
    expect(agreement.ratio).toBeCloseTo(agreement.explained / agreement.returns, 12);
  });
});

describe('analyze refusing bad input', () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'driftline-analyze-bad-'));
    // A 2 × 2 map whose image is not a PGM, and a log without one valid scan.
    await writeFile(join(dir, 'broken.yaml'), 'image: broken.pgm\nresolution: 0.05\norigin: [0, 0, 0]\n');
    await writeFile(join(dir, 'broken.pgm'), 'not an image');
    await writeFile(join(dir, 'garbage.jsonl'), 'hello\n{"t": "yesterday"}\n');
    await writeFile(join(dir, 'good.jsonl'), JSON.stringify({ t: '2026-11-03T08:15:02.120Z', robot: 'AMR-01', scanner: 'front', pose: [0.5, 0.5, 0], angleMin: 0, angleIncrement: 0.01, rangeMin: 0.05, rangeMax: 30, ranges: [0.5] }) + '\n');
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  it.each([
    ['an unknown argument', () => ['--map', 'm.yaml', '--scans', 's.jsonl', '--colour'], /Unknown argument "--colour"/],
    ['no map', () => ['--scans', 's.jsonl'], /Give the map with --map/],
    ['no scans', () => ['--map', 'm.yaml'], /at least one scan log/],
    ['a window of 0 days', () => ['--map', 'm.yaml', '--scans', 's.jsonl', '--window-days', '0'], /--window-days must be a whole number from 1 to 60; got "0"/],
    ['an unknown time zone', () => ['--map', 'm.yaml', '--scans', 's.jsonl', '--timezone', 'Mars/Olympus'], /"Mars\/Olympus" is not a known IANA time zone/],
    ['a malformed mount', () => ['--map', 'm.yaml', '--scans', 's.jsonl', '--mount', 'front=1,2'], /not of the form ROBOT:SCANNER=x,y,yaw/],
    ['--cells without --json', () => ['--map', 'm.yaml', '--scans', 's.jsonl', '--cells'], /give --json OUT.json with it/],
    ['a missing scan log', () => ['--map', join(dir, 'broken.yaml'), '--scans', join(dir, 'absent.jsonl.gz')], /Cannot read the scan log .*absent\.jsonl\.gz: it does not exist/],
    ['a log without valid scans', () => ['--map', join(dir, 'broken.yaml'), '--scans', join(dir, 'garbage.jsonl')], /None of the 2 lines in the scan logs is a valid scan/],
    ['a mount for a robot the logs do not name', () => ['--map', join(dir, 'broken.yaml'), '--scans', join(dir, 'good.jsonl'), '--mount', 'AMR-09:front=0,0,0'], /--mount names AMR-09:front, but no valid scan/],
    ['a map whose image is not a PGM', () => ['--map', join(dir, 'broken.yaml'), '--scans', join(dir, 'good.jsonl')], /broken\.yaml: The image "broken\.pgm" is neither a PGM/],
    ['a missing map', () => ['--map', join(dir, 'absent.yaml'), '--scans', join(dir, 'good.jsonl')], /Cannot read the map metadata .*absent\.yaml: it does not exist/],
  ])('when given %s, then it exits 2 with a clear message', async (_name, argv, message) => {
    // Arrange
    const io = capture();

    // Act
    const code = await runAnalyze(argv(), io);

    // Assert
    expect(code).toBe(2);
    expect(io.errors[0]).toMatch(message);
    expect(io.lines).toEqual([]);
  });
});
