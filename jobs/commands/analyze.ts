import { createReadStream } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { dirname, isAbsolute, resolve } from 'node:path';
import { createInterface } from 'node:readline';
import type { Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { GridFormatError } from '../../shared/grid/errors.js';
import { imageToGrid } from '../../shared/grid/image-to-grid.js';
import { parseMapMetadata } from '../../shared/grid/map-metadata.js';
import { parsePgm } from '../../shared/grid/pgm.js';
import {
  accumulateScan,
  addFigures,
  createCounters,
  emptyFigures,
  type EvidenceCounters,
  type ScanFigures,
  type ScannerMount,
} from '../../shared/scan/accumulate.js';
import { parseScanLine } from '../../shared/scan/scan-record.js';
import { CellState, type OccupancyGrid } from '../../shared/types/grid.js';

/** Where the command writes: figures to out, problems to err (console by default; tests pass their own). */
export interface AnalyzeIo {
  out: (line: string) => void;
  err: (line: string) => void;
}

/** Exit code for bad arguments or unreadable files. */
const EXIT_BAD_INPUT = 2;
/** How many rejected lines per file are listed with their reasons. */
const REJECTS_SHOWN = 5;

const USAGE = `Usage: npm run analyze -- --map FILE.yaml --scans FILE.jsonl[.gz] [--scans FILE ...] [--mount SCANNER=x,y,yaw ...]
  --map     map metadata (YAML); its "image" (PGM) is read relative to the YAML's folder
  --scans   scan log, JSON Lines, optionally gzip-compressed (.gz); may be repeated
  --mount   scanner mount in the robot frame (metres, radians), e.g. front=0.35,0,0; may be repeated`;

/** A refusal of the command line or of a file, reported as one sentence and exit code 2. */
class InputError extends Error {}
/** A refusal of the command line itself; the usage text is printed after it. */
class UsageError extends InputError {}

interface Args {
  map: string;
  scans: string[];
  mounts: Map<string, ScannerMount>;
}

/** Figures of one scan file. */
interface FileFigures extends ScanFigures {
  lines: number;
  blank: number;
  scans: number;
  rejected: number;
  firstRejects: string[];
}

function parseMount(text: string): [string, ScannerMount] {
  const m = /^([^=]+)=([^,]+),([^,]+),([^,]+)$/.exec(text);
  const nums = m ? [Number(m[2]), Number(m[3]), Number(m[4])] : [];
  if (!m || !nums.every(Number.isFinite)) {
    throw new UsageError(`The mount "${text}" is not of the form SCANNER=x,y,yaw with three numbers.`);
  }
  return [m[1], { x: nums[0], y: nums[1], yaw: nums[2] }];
}

function parseArgs(argv: string[]): Args {
  let map: string | undefined;
  const scans: string[] = [];
  const mounts = new Map<string, ScannerMount>();
  for (let k = 0; k < argv.length; k++) {
    const arg = argv[k];
    const eq = arg.indexOf('=');
    const name = arg.startsWith('--') && eq > 0 ? arg.slice(0, eq) : arg;
    const inline = arg.startsWith('--') && eq > 0 ? arg.slice(eq + 1) : undefined;
    const value = (): string => {
      if (inline !== undefined) return inline;
      const next = argv[++k];
      if (next === undefined || next.startsWith('--')) throw new UsageError(`The option ${name} needs a value.`);
      return next;
    };
    if (name === '--map') {
      if (map !== undefined) throw new UsageError('Give --map only once.');
      map = value();
    } else if (name === '--scans') {
      scans.push(value());
    } else if (name === '--mount') {
      const [scanner, mount] = parseMount(value());
      mounts.set(scanner, mount);
    } else {
      throw new UsageError(`Unknown argument "${arg}".`);
    }
  }
  if (map === undefined) throw new UsageError('Give the map with --map FILE.yaml.');
  if (scans.length === 0) throw new UsageError('Give at least one scan log with --scans FILE.jsonl[.gz].');
  return { map, scans, mounts };
}

function describeFsError(what: string, file: string, e: unknown): InputError {
  const code = (e as NodeJS.ErrnoException).code;
  const why = code === 'ENOENT' ? 'it does not exist' : code === 'EISDIR' ? 'it is a folder' : (e as Error).message;
  return new InputError(`Cannot read the ${what} ${file}: ${why}.`);
}

/** Runs fn, prefixing a GridFormatError's sentence with the file it is about. */
function withFileName<T>(file: string, fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof GridFormatError) throw new InputError(`${file}: ${e.message}`);
    throw e;
  }
}

async function loadGrid(yamlPath: string): Promise<{ grid: OccupancyGrid; imagePath: string }> {
  let yamlText: string;
  try {
    yamlText = await readFile(yamlPath, 'utf8');
  } catch (e) {
    throw describeFsError('map metadata', yamlPath, e);
  }
  const meta = withFileName(yamlPath, () => parseMapMetadata(yamlText));
  const imagePath = isAbsolute(meta.image) ? meta.image : resolve(dirname(yamlPath), meta.image);
  if (!/\.pgm$/i.test(imagePath)) {
    throw new InputError(`The map image ${imagePath} is not a PGM file (.pgm); analyze reads PGM images only.`);
  }
  let bytes: Uint8Array;
  try {
    bytes = await readFile(imagePath);
  } catch (e) {
    throw describeFsError('map image', imagePath, e);
  }
  return { grid: withFileName(imagePath, () => imageToGrid(parsePgm(bytes), meta)), imagePath };
}

/** Streams one scan log line by line (gunzipping .gz on the fly) into the counters. */
async function analyzeFile(
  file: string,
  grid: OccupancyGrid,
  counters: EvidenceCounters,
  mounts: Map<string, ScannerMount>,
  now: Date,
): Promise<FileFigures> {
  const figures: FileFigures = { ...emptyFigures(), lines: 0, blank: 0, scans: 0, rejected: 0, firstRejects: [] };
  const raw = createReadStream(file);
  // Errors of either stream (missing file, corrupt gzip) must end the loop, not hang it.
  const input: Readable = file.toLowerCase().endsWith('.gz') ? raw.pipe(createGunzip()) : raw;
  const failed = new Promise<never>((_, reject) => {
    raw.on('error', (e) => reject(describeFsError('scan log', file, e)));
    if (input !== raw) input.on('error', (e) => reject(new InputError(`The scan log ${file} is not valid gzip data (${e.message}).`)));
  });
  failed.catch(() => undefined); // handled by the race below; avoids an unhandled rejection
  const lines = createInterface({ input, crlfDelay: Infinity });
  const loop = (async () => {
    for await (const line of lines) {
      figures.lines++;
      if (line.trim() === '') {
        figures.blank++;
        continue;
      }
      const parsed = parseScanLine(line, { now });
      if (!parsed.ok) {
        figures.rejected++;
        if (figures.firstRejects.length < REJECTS_SHOWN) figures.firstRejects.push(`line ${figures.lines}: ${parsed.reason}`);
        continue;
      }
      figures.scans++;
      addFigures(figures, accumulateScan(grid, counters, parsed.scan, mounts.get(parsed.scan.scanner) ?? null));
    }
  })();
  try {
    await Promise.race([loop, failed]);
  } finally {
    lines.close();
    raw.destroy();
  }
  return figures;
}

const fmt = (n: number): string => n.toLocaleString('en-US');
/** "1 scan", "2 scans": a count with its noun, plural unless exactly one. */
const counted = (n: number, noun: string, plural = `${noun}s`): string => `${fmt(n)} ${n === 1 ? noun : plural}`;

function describeMap(grid: OccupancyGrid, yamlPath: string, imagePath: string): string {
  let occupied = 0;
  let free = 0;
  for (let k = 0; k < grid.cells.length; k++) {
    if (grid.cells[k] === CellState.Occupied) occupied++;
    else if (grid.cells[k] === CellState.Free) free++;
  }
  const unknown = grid.cells.length - occupied - free;
  const wM = (grid.width * grid.resolution).toFixed(2);
  const hM = (grid.height * grid.resolution).toFixed(2);
  return (
    `Map ${yamlPath} (image ${imagePath}): ${fmt(grid.width)} × ${fmt(grid.height)} cells at ${grid.resolution} m/cell ` +
    `(${wM} m × ${hM} m), origin (${grid.origin.x}, ${grid.origin.y}) m, yaw ${grid.origin.yaw} rad; ` +
    `${fmt(occupied)} occupied, ${fmt(free)} free, ${fmt(unknown)} unknown cells.`
  );
}

function describeFigures(label: string, f: FileFigures): string {
  return (
    `${label}: ${counted(f.lines, 'line')}, ${counted(f.scans, 'scan')}, ${counted(f.beams, 'beam')}, ` +
    `${counted(f.returns, 'return')} (${fmt(f.outOfMap)} out of the map), ${counted(f.rejected, 'rejected line')}` +
    (f.blank > 0 ? `, ${counted(f.blank, 'blank line')}` : '')
  );
}

function describeEvidence(c: EvidenceCounters): string {
  let hitCells = 0;
  let passCells = 0;
  let hits = 0;
  let passes = 0;
  for (let k = 0; k < c.hits.length; k++) {
    if (c.hits[k] > 0) hitCells++;
    if (c.passes[k] > 0) passCells++;
    hits += c.hits[k];
    passes += c.passes[k];
  }
  return `Evidence: ${fmt(hits)} hits in ${fmt(hitCells)} cells, ${fmt(passes)} passes in ${fmt(passCells)} cells.`;
}

/**
 * Runs `analyze`: builds the grid from --map, streams every --scans log into in-memory hit/pass
 * counters and prints per-file and total figures. Returns the exit code (0, or 2 on bad input).
 */
export async function runAnalyze(
  argv: string[],
  io: AnalyzeIo = { out: (l) => console.log(l), err: (l) => console.error(l) },
): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    io.out(USAGE);
    return 0;
  }
  try {
    const args = parseArgs(argv);
    const { grid, imagePath } = await loadGrid(args.map);
    io.out(describeMap(grid, args.map, imagePath));
    const counters = createCounters(grid);
    const now = new Date();
    const total: FileFigures = { ...emptyFigures(), lines: 0, blank: 0, scans: 0, rejected: 0, firstRejects: [] };
    for (const file of args.scans) {
      const f = await analyzeFile(file, grid, counters, args.mounts, now);
      io.out(describeFigures(file, f));
      for (const r of f.firstRejects) io.out(`  ${r}`);
      if (f.rejected > f.firstRejects.length) io.out(`  … and ${counted(f.rejected - f.firstRejects.length, 'more rejected line', 'more rejected lines')}`);
      addFigures(total, f);
      total.lines += f.lines;
      total.blank += f.blank;
      total.scans += f.scans;
      total.rejected += f.rejected;
    }
    if (args.scans.length > 1) io.out(describeFigures('Total', total));
    io.out(describeEvidence(counters));
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      io.err(e.message);
      if (e instanceof UsageError) io.err(USAGE);
      return EXIT_BAD_INPUT;
    }
    throw e;
  }
}
