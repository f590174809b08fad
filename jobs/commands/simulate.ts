import { existsSync, mkdirSync, readdirSync, statSync, writeFileSync, createWriteStream } from 'node:fs';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { parseArgs } from 'node:util';
import { createGzip } from 'node:zlib';
import { gridToImage } from '../../shared/grid/image-to-grid.js';
import { formatMapMetadata } from '../../shared/grid/map-metadata.js';
import { encodePgm } from '../../shared/grid/pgm.js';
import type { MountError } from '../../shared/sim/fleet.js';
import { createScenario, type Scenario, type ScenarioOptions } from '../../shared/sim/scenario.js';

const USAGE = `Usage: npm run simulate -- --out DIR [options]

Writes a simulated warehouse site to DIR: map.pgm and map.yaml (the stored map), scans/day-NN.jsonl.gz
(one gzip-compressed JSON line per scan, NN = 0-based day), and truth.json (scripted changes, mount errors).

Options:
  --out DIR               Folder to write (created if missing; refused if it already holds a simulation).
  --days N                Days to simulate, 1–366 (default 28).
  --seed S                Whole-number seed (default 1); the same options give identical files.
  --start YYYY-MM-DD      First day, site-local (default 2026-11-02).
  --timezone ZONE         IANA time zone of the site (default UTC).
  --robots N              Robots AMR-01 … AMR-NN (default 3; AMR-03 has a rear scanner).
  --scans N               Scans per robot and scanner per day (default 240).
  --beam-step N           Keep every N-th of the 541 beams (default 1).
  --mount-error SPEC      ROBOT:YAW_DEG[:DX_CM[:DY_CM]] for the front scanner, e.g. AMR-02:1.4 (repeatable).
  --force                 Overwrite the files of an earlier simulation in DIR.
  --help                  Show this text.
`;

/** Thrown for bad command-line input; the message is shown as it is, the exit code is 2. */
class UsageError extends Error {}

function wholeNumber(name: string, raw: string | undefined, fallback: number, min: number, max: number): number {
  if (raw === undefined) return fallback;
  const n = Number(raw);
  if (!/^-?\d+$/.test(raw.trim()) || n < min || n > max) {
    throw new UsageError(`--${name} must be a whole number from ${min} to ${max}; got "${raw}".`);
  }
  return n;
}

function parseMountError(spec: string): MountError {
  const parts = spec.split(':');
  const [robot, yaw, dx, dy] = parts;
  const nums = [yaw, dx ?? '0', dy ?? '0'].map(Number);
  if (parts.length < 2 || parts.length > 4 || !robot || nums.some((v) => !Number.isFinite(v)) || yaw.trim() === '') {
    throw new UsageError(`--mount-error must look like ROBOT:YAW_DEG[:DX_CM[:DY_CM]], e.g. AMR-02:1.4; got "${spec}".`);
  }
  return { robot, scanner: 'front', dyaw: (nums[0] * Math.PI) / 180, dx: nums[1] / 100, dy: nums[2] / 100 };
}

/** Turns argv into scenario options and the output folder; throws UsageError on bad input. */
function readArgs(argv: string[]): { out: string; force: boolean; options: ScenarioOptions } | 'help' {
  let values;
  try {
    ({ values } = parseArgs({
      args: argv,
      strict: true,
      allowPositionals: false,
      options: {
        out: { type: 'string' },
        days: { type: 'string' },
        seed: { type: 'string' },
        start: { type: 'string' },
        timezone: { type: 'string' },
        robots: { type: 'string' },
        scans: { type: 'string' },
        'beam-step': { type: 'string' },
        'mount-error': { type: 'string', multiple: true },
        force: { type: 'boolean' },
        help: { type: 'boolean' },
      },
    }));
  } catch (err) {
    throw new UsageError((err as Error).message);
  }
  if (values.help) return 'help';
  if (!values.out) throw new UsageError('--out DIR is required: the folder to write the simulation to.');
  const start = values.start ?? '2026-11-02';
  // Date.parse accepts 2026-02-30 by rolling over; a round trip catches days that do not exist.
  if (!/^\d{4}-\d{2}-\d{2}$/.test(start) || Number.isNaN(Date.parse(start)) || new Date(start).toISOString().slice(0, 10) !== start) {
    throw new UsageError(`--start must be a calendar date like 2026-11-02; got "${start}".`);
  }
  return {
    out: values.out,
    force: values.force === true,
    options: {
      seed: wholeNumber('seed', values.seed, 1, -2147483648, 4294967295),
      days: wholeNumber('days', values.days, 28, 1, 366),
      startDate: start,
      siteTimezone: values.timezone ?? 'UTC',
      robots: wholeNumber('robots', values.robots, 3, 1, 20),
      scansPerRobotPerDay: wholeNumber('scans', values.scans, 240, 0, 100_000),
      beamStep: wholeNumber('beam-step', values['beam-step'], 1, 1, 100),
      mountErrors: (values['mount-error'] ?? []).map(parseMountError),
    },
  };
}

/** Day file name for a 0-based day: day-00.jsonl.gz … (three digits past day 99). */
function dayFile(day: number, days: number): string {
  return `day-${String(day).padStart(days > 100 ? 3 : 2, '0')}.jsonl.gz`;
}

/** Streams one day's scans through gzip into `path`; never holds the whole day in memory. Returns the scan count. */
async function writeDay(scenario: Scenario, day: number, path: string): Promise<number> {
  let count = 0;
  // Lines are grouped into ~256 KB chunks: one stream write per scan would cost more than the scan.
  function* chunks(): Generator<string> {
    let buf: string[] = [];
    let size = 0;
    for (const rec of scenario.scansForDay(day)) {
      const line = JSON.stringify(rec) + '\n';
      buf.push(line);
      size += line.length;
      count++;
      if (size > 256 * 1024) {
        yield buf.join('');
        buf = [];
        size = 0;
      }
    }
    if (buf.length > 0) yield buf.join('');
  }
  await pipeline(Readable.from(chunks()), createGzip({ level: 6 }), createWriteStream(path));
  return count;
}

function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KB`;
  return `${(n / 1024 / 1024).toFixed(2)} MB`;
}

/** Runs `simulate` with its arguments (without the command name); resolves to the exit code: 0 written, 2 bad arguments. */
export async function runSimulate(argv: string[]): Promise<number> {
  let args: ReturnType<typeof readArgs>;
  let scenario: Scenario;
  try {
    args = readArgs(argv);
    if (args === 'help') {
      process.stdout.write(USAGE);
      return 0;
    }
    const { out, force } = args;
    if (existsSync(out) && !statSync(out).isDirectory()) throw new UsageError(`--out "${out}" exists and is not a folder.`);
    const earlier = ['map.pgm', 'map.yaml', 'truth.json', 'scans'].filter((f) => existsSync(join(out, f)));
    if (earlier.length > 0 && !force) {
      throw new UsageError(`"${out}" already holds ${earlier.join(', ')}; choose another folder or pass --force to overwrite.`);
    }
    scenario = createScenario(args.options);
  } catch (err) {
    if (err instanceof UsageError || err instanceof RangeError) {
      process.stderr.write(`simulate: ${err.message}\n\n${USAGE}`);
      return 2;
    }
    throw err;
  }

  const { out, options } = args;
  const started = performance.now();
  mkdirSync(join(out, 'scans'), { recursive: true });
  const written: [string, number][] = [];
  const put = (name: string, data: Uint8Array | string): void => {
    writeFileSync(join(out, name), data);
    written.push([name, statSync(join(out, name)).size]);
  };
  put('map.pgm', encodePgm(gridToImage(scenario.map), 'P5'));
  put('map.yaml', formatMapMetadata(scenario.metadata));
  let scans = 0;
  for (let day = 0; day < options.days; day++) {
    const name = join('scans', dayFile(day, options.days));
    scans += await writeDay(scenario, day, join(out, name));
    written.push([name, statSync(join(out, name)).size]);
  }
  put('truth.json', JSON.stringify(scenario.truth, null, 2) + '\n');
  // Day files of an earlier, longer run would be mistaken for this run's days.
  const current = new Set(written.map(([n]) => n));
  const stale = readdirSync(join(out, 'scans')).filter((f) => /^day-\d+\.jsonl\.gz$/.test(f) && !current.has(join('scans', f)));

  const seconds = (performance.now() - started) / 1000;
  const total = written.reduce((s, [, n]) => s + n, 0);
  const lines = written.map(([n, size]) => `  ${n.padEnd(24)} ${formatBytes(size).padStart(10)}`);
  process.stdout.write(
    `Simulated ${options.days} days, ${scans.toLocaleString('en-US')} scans, seed ${options.seed}, in ${seconds.toFixed(1)} s. Wrote to ${out}:\n` +
      `${lines.join('\n')}\n  ${'total'.padEnd(24)} ${formatBytes(total).padStart(10)}\n` +
      (stale.length > 0 ? `Note: ${stale.length} older day file(s) in ${join(out, 'scans')} are not part of this run (${stale.join(', ')}).\n` : ''),
  );
  return 0;
}
