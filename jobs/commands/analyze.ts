import { createReadStream } from 'node:fs';
import { readFile, stat, writeFile } from 'node:fs/promises';
import { basename, dirname, extname, isAbsolute, resolve } from 'node:path';
import { createInterface } from 'node:readline';
import { pipeline, type Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { DateTime } from 'luxon';
import pino from 'pino';
import { In, type DataSource } from 'typeorm';
import { GridFormatError } from '../../shared/grid/errors.js';
import { parseMapMetadata } from '../../shared/grid/map-metadata.js';
import { parseScanLine } from '../../shared/scan/scan-record.js';
import type { Actor } from '../../server/auth/actor.js';
import { createApp } from '../../server/app.js';
import { testConfig } from '../../server/config.js';
import { openDatabase } from '../../server/data-source.js';
import { DailyStat, Organization, Robot, Site, User } from '../../server/entities/index.js';
import type { ScannerMount } from '../../server/entities/robot.entity.js';
import { HttpError } from '../../server/http-error.js';
import type { DetectionFigures, ZoneView } from '../../server/services/detection.service.js';
import { newId } from '../../server/services/ids.js';
import type { Services } from '../../server/services/index.js';
import type { BatchFigures } from '../../server/services/scan-accumulator.js';
import { mountSentence } from '../../server/services/scanner-check.service.js';
import { completeDays } from '../../server/services/site-days.js';
import { siteSettings } from '../../server/services/site-settings.js';

/** Where the command writes: the summary to out, problems to err (console by default; tests pass their own). */
export interface AnalyzeIo {
  out: (line: string) => void;
  err: (line: string) => void;
}

/** Exit code for bad arguments, unreadable files, a bad map or no valid scan. */
const EXIT_BAD_INPUT = 2;
/** Exit code when the detection run itself failed (a fault of ours, not of the input). */
const EXIT_FAILED = 1;
/** How many refused lines per file are listed with their reasons. */
const REJECTS_SHOWN = 5;
/** Range of --window-days: the server keeps 60 days of evidence by default (site settings). */
const WINDOW_DAYS_MAX = 60;
/** Clock for reading scans in the first pass: no timestamp is "in the future" offline. */
const FAR_FUTURE = new Date(8.64e15);

const USAGE = `Usage: npm run analyze -- --map FILE.yaml --scans FILE.jsonl[.gz] [--scans FILE ...] [options]

Runs Driftline's whole pipeline offline, through the server's own services on a throwaway
in-memory database: registers the robots named in the scan logs, uploads and activates the map,
counts every log, runs the scanner check and change detection as the nightly job does, and prints
the result. Detection runs as of the start of the day after the last scan day.

  --map FILE.yaml        map metadata (YAML); its "image" (PGM) is read relative to the YAML's folder
  --scans FILE           scan log, JSON Lines, gzip-compressed when the name ends in .gz; repeatable
  --window-days N        days of evidence change detection pools, 1-${WINDOW_DAYS_MAX} (default: the site default, 14)
  --timezone ZONE        IANA time zone of the site, which decides the calendar days (default UTC)
  --mount ROBOT:SCANNER=x,y,yaw
                         a scanner's mount in the robot frame (metres, radians), e.g. AMR-03:rear=-0.4,0,3.14159;
                         repeatable. Scanners without one are taken as mounted at the robot's origin.
  --json OUT.json        also write the result as JSON (map, agreement, zones, robots)
  --cells                with --json: list each zone's cells as [i, j] (i across, j up from the bottom row)
  --help                 show this text

"Agreement" is the share of laser returns within the site's tolerance of mapped structure over
the detection window's days, counting robots WITHOUT a scanner check advised, as the server's
health score does (their evidence is left out of detection too). The robots table lists every
robot and scanner, flagged ones included, each with its own agreement over the same days.
Exit codes: 0 done, 2 bad arguments or input (missing file, bad map, no valid scan), 1 failure.`;

/** A refusal of the command line or of a file, reported as one sentence and exit code 2. */
class InputError extends Error {}
/** A refusal of the command line itself; the usage text is printed after it. */
class UsageError extends InputError {}

type Mount = Omit<ScannerMount, 'name'>;
type MapFiles = Pick<Parameters<Services['mapVersions']['upload']>[2], 'image' | 'metadataFile'>;

interface Args {
  map: string;
  scans: string[];
  windowDays: number | null;
  timezone: string;
  json: string | null;
  cells: boolean;
  /** Mounts by "ROBOT:SCANNER". */
  mounts: Map<string, Mount>;
}

function parseMount(text: string): [string, Mount] {
  const m = /^([^:=]+):([^=]+)=([^,]+),([^,]+),([^,]+)$/.exec(text);
  const nums = m ? [Number(m[3]), Number(m[4]), Number(m[5])] : [];
  if (!m || !nums.every(Number.isFinite)) {
    throw new UsageError(`The mount "${text}" is not of the form ROBOT:SCANNER=x,y,yaw with three numbers (metres, radians).`);
  }
  return [`${m[1]}:${m[2]}`, { x: nums[0], y: nums[1], yaw: nums[2] }];
}

function parseArgs(argv: string[]): Args {
  let map: string | undefined;
  let windowDays: number | null = null;
  let timezone: string | null = null;
  let json: string | null = null;
  let cells = false;
  const scans: string[] = [];
  const mounts = new Map<string, Mount>();
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
    const once = <T>(current: T | null, v: T): T => {
      if (current !== null) throw new UsageError(`Give ${name} only once.`);
      return v;
    };
    if (name === '--map') {
      map = once(map ?? null, value());
    } else if (name === '--scans') {
      scans.push(value());
    } else if (name === '--window-days') {
      const raw = value();
      const n = Number(raw);
      if (!/^\d+$/.test(raw) || n < 1 || n > WINDOW_DAYS_MAX) throw new UsageError(`--window-days must be a whole number from 1 to ${WINDOW_DAYS_MAX}; got "${raw}".`);
      windowDays = once(windowDays, n);
    } else if (name === '--timezone') {
      const zone = value();
      if (!DateTime.now().setZone(zone).isValid) throw new UsageError(`"${zone}" is not a known IANA time zone (e.g. Europe/London, America/Chicago, UTC).`);
      timezone = once(timezone, zone);
    } else if (name === '--json') {
      json = once(json, value());
    } else if (name === '--cells') {
      if (inline !== undefined) throw new UsageError('--cells takes no value.');
      cells = true;
    } else if (name === '--mount') {
      const [key, mount] = parseMount(value());
      if (mounts.has(key)) throw new UsageError(`The mount of ${key} is given twice.`);
      mounts.set(key, mount);
    } else {
      throw new UsageError(`Unknown argument "${arg}".`);
    }
  }
  if (map === undefined) throw new UsageError('Give the map with --map FILE.yaml.');
  if (scans.length === 0) throw new UsageError('Give at least one scan log with --scans FILE.jsonl[.gz].');
  if (cells && json === null) throw new UsageError('--cells lists zone cells in the JSON output; give --json OUT.json with it.');
  return { map, scans, windowDays, timezone: timezone ?? 'UTC', json, cells, mounts };
}

function describeFsError(what: string, file: string, e: unknown): InputError {
  const code = (e as NodeJS.ErrnoException).code;
  const why = code === 'ENOENT' ? 'it does not exist' : code === 'EISDIR' ? 'it is a folder' : code === 'EACCES' ? 'permission denied' : (e as Error).message;
  return new InputError(`Cannot read the ${what} ${file}: ${why}.`);
}

/** The map's YAML and image bytes as the upload form would send them. */
async function readMapFiles(yamlPath: string): Promise<MapFiles> {
  let yamlText: Buffer;
  try {
    yamlText = await readFile(yamlPath);
  } catch (e) {
    throw describeFsError('map metadata', yamlPath, e);
  }
  let image: string;
  try {
    image = parseMapMetadata(yamlText.toString('utf8')).image;
  } catch (e) {
    if (e instanceof GridFormatError) throw new InputError(`${yamlPath}: ${e.message}`);
    throw e;
  }
  const imagePath = isAbsolute(image) ? image : resolve(dirname(yamlPath), image);
  let bytes: Buffer;
  try {
    bytes = await readFile(imagePath);
  } catch (e) {
    throw describeFsError('map image', imagePath, e);
  }
  return { metadataFile: { originalname: basename(yamlPath), buffer: yamlText }, image: { originalname: basename(imagePath), buffer: bytes } };
}

/**
 * One scan log's lines, streamed (gunzipped on the fly for .gz). A missing file or damaged gzip
 * data ends the iteration with an InputError: pipeline() passes the file's error on to gunzip,
 * and readline passes its input's error on to the loop.
 */
async function* fileLines(file: string): AsyncGenerator<string> {
  const raw = createReadStream(file);
  const input: Readable = file.toLowerCase().endsWith('.gz') ? pipeline(raw, createGunzip(), () => undefined) : raw;
  const lines = createInterface({ input, crlfDelay: Infinity });
  try {
    for await (const line of lines) yield line;
  } catch (e) {
    const code = String((e as NodeJS.ErrnoException).code ?? '');
    if (code.startsWith('Z_')) throw new InputError(`The scan log ${file} is not valid gzip data (${(e as Error).message}).`);
    if (code.startsWith('E')) throw describeFsError('scan log', file, e);
    throw e;
  } finally {
    lines.close();
    raw.destroy();
  }
}

/** What the first pass learns from the logs: robots with their scanners, valid scans and the last scan time. */
interface Survey {
  robots: Map<string, Set<string>>;
  lines: number;
  valid: number;
  lastMs: number;
  firstRejects: string[];
}

/** Reads every log once before anything is stored, so a missing or damaged file changes nothing. */
async function surveyLogs(files: string[]): Promise<Survey> {
  const survey: Survey = { robots: new Map(), lines: 0, valid: 0, lastMs: -Infinity, firstRejects: [] };
  for (const file of files) {
    let lineNo = 0;
    for await (const line of fileLines(file)) {
      lineNo++;
      if (line.trim() === '') continue;
      survey.lines++;
      const parsed = parseScanLine(line, { now: FAR_FUTURE });
      if (!parsed.ok) {
        if (survey.firstRejects.length < REJECTS_SHOWN) survey.firstRejects.push(`${file} line ${lineNo}: ${parsed.reason}`);
        continue;
      }
      const { robot, scanner, timeMs } = parsed.scan;
      let scanners = survey.robots.get(robot);
      if (!scanners) survey.robots.set(robot, (scanners = new Set()));
      scanners.add(scanner);
      survey.valid++;
      if (timeMs > survey.lastMs) survey.lastMs = timeMs;
    }
  }
  return survey;
}

/** One row of the robots table and of the JSON. */
interface RobotRow {
  robot: string;
  scanner: string;
  returns: number;
  agreement: number | null;
  flagged: boolean;
  mount: { dx: number; dy: number; dyawDeg: number; sigmaYawDeg: number } | null;
}

/** One zone of the JSON: the zone's figures as the server keeps them; `cells` only with --cells. */
type ZoneRow = Pick<ZoneView, 'kind' | 'persistence' | 'areaM2' | 'cellCount' | 'bbox' | 'centroid' | 'outline' | 'meanHitRate' | 'observations'> & { cells?: [number, number][] };

/** The --json document; other tools read it, so its shape stays as it is. */
interface AnalysisJson {
  map: { width: number; height: number; resolution: number; origin: [number, number, number] };
  agreement: { returns: number; explained: number; ratio: number | null };
  zones: ZoneRow[];
  robots: RobotRow[];
}

const fmt = (n: number): string => n.toLocaleString('en-US');
/** "1 scan", "2 scans": a count with its noun, plural unless exactly one. */
const counted = (n: number, noun: string, plural = `${noun}s`): string => `${fmt(n)} ${n === 1 ? noun : plural}`;
const pct = (ratio: number | null): string => (ratio === null ? '—' : `${(100 * ratio).toFixed(1)} %`);
const deg = (rad: number): number => (rad * 180) / Math.PI;

/** Lays out rows as left-aligned columns under a header. */
function table(header: string[], rows: string[][]): string[] {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const line = (r: string[]) => '  ' + r.map((v, c) => v.padEnd(widths[c])).join('  ').trimEnd();
  return [line(header), ...rows.map(line)];
}

function describeFile(file: string, f: BatchFigures, fresh: boolean): string[] {
  const days = f.days.length === 0 ? '' : f.days.length === 1 ? `, day ${f.days[0]}` : `, days ${f.days[0]} … ${f.days[f.days.length - 1]}`;
  const out = [
    `${file}: ${counted(f.lines, 'line')}, ${counted(f.scans, 'scan')}, ${counted(f.beams, 'beam')}, ${counted(f.returns, 'return')} ` +
      `(${fmt(f.outOfMap)} out of the map), ${counted(f.rejectedCount, 'rejected line')}${days}` +
      (fresh ? '' : ' — the same content was already counted from an earlier file, so nothing was added'),
  ];
  for (const r of f.rejectedLines.slice(0, REJECTS_SHOWN)) out.push(`  line ${r.line}: ${r.reason}`);
  const more = f.rejectedCount - Math.min(f.rejectedLines.length, REJECTS_SHOWN);
  if (more > 0) out.push(`  … and ${counted(more, 'more rejected line', 'more rejected lines')}`);
  return out;
}

function describeMount(m: RobotRow['mount']): string {
  if (!m) return '—';
  const turn = `turned ${Math.abs(m.dyawDeg).toFixed(1)}° ${m.dyawDeg >= 0 ? 'anticlockwise' : 'clockwise'} ± ${Math.max(m.sigmaYawDeg, 0.05).toFixed(1)}°`;
  return `${turn}, shifted dx ${(100 * m.dx).toFixed(1)} cm, dy ${(100 * m.dy).toFixed(1)} cm`;
}

/** Creates the throwaway operator, customer, site and robots the analysis runs under; returns the admin actor and the site. */
async function setUpSite(db: DataSource, services: Services, args: Args, survey: Survey) {
  const operatorId = newId();
  await db.getRepository(Organization).insert({ id: operatorId, name: 'Offline analysis operator', kind: 'operator', timezone: 'UTC' });
  const admin: Actor = { id: newId(), email: 'analyst@offline-analysis.example', name: 'Offline analyst', role: 'admin', organizationId: operatorId };
  // Nobody signs in to this database, which lives only as long as the command; "!" is no valid
  // password hash, so no password could ever match it.
  await db.getRepository(User).insert({ ...admin, passwordHash: '!', status: 'active' });
  const customer = await services.organizations.create(admin, { name: 'Offline analysis site owner', timezone: args.timezone });
  const siteName = basename(args.map, extname(args.map));
  const created = await services.sites.create(admin, { name: siteName, city: 'Offline', timezone: args.timezone, organizationId: customer.id });
  if (args.windowDays !== null) await db.getRepository(Site).update(created.id, { settings: { detectionWindowDays: args.windowDays } });
  for (const [robot, scanners] of [...survey.robots].sort(([a], [b]) => a.localeCompare(b))) {
    const mounts = [...scanners].sort().map((name) => ({ name, ...(args.mounts.get(`${robot}:${name}`) ?? { x: 0, y: 0, yaw: 0 }) }));
    await services.robots.create(admin, created.id, { name: robot, model: 'Named in the scan logs', mounts });
  }
  return { admin, site: await services.sites.getVisible(admin, created.id) };
}

/** Uploads and activates the map through the map service; its refusal becomes an InputError. */
async function installMap(services: Services, admin: Actor, site: Site, args: Args, files: MapFiles) {
  try {
    const version = await services.mapVersions.upload(admin, site.id, { kind: 'floor', label: basename(args.map), ...files });
    return await services.mapVersions.activate(admin, site.id, version.id);
  } catch (e) {
    if (e instanceof HttpError && e.status < 500) throw new InputError(`${args.map}: ${e.message}`);
    throw e;
  }
}

/** Every zone of the site, highest severity first (all pages of the zones list). */
async function allZones(services: Services, admin: Actor, siteId: string): Promise<ZoneView[]> {
  const zones: ZoneView[] = [];
  for (let page = 1; ; page++) {
    const res = await services.detection.list(admin, siteId, { page, pageSize: 100 });
    zones.push(...res.zones);
    if (zones.length >= res.total || res.zones.length === 0) return zones;
  }
}

/** Per robot and scanner over the window's days: returns, agreement, flag and mount estimate. */
async function robotRows(db: DataSource, services: Services, site: Site, mapVersionId: string, days: string[]): Promise<RobotRow[]> {
  const robots = await db.getRepository(Robot).find({ where: { siteId: site.id }, order: { name: 'ASC' } });
  const stats = await db.getRepository(DailyStat).find({ where: { siteId: site.id, mapVersionId, day: In(days) } });
  const flags = (await services.scannerCheck.flagsOf(site.id)).filter((f) => f.status === 'active');
  const rows: RobotRow[] = [];
  for (const robot of robots) {
    for (const { name: scanner } of robot.mounts) {
      const own = stats.filter((s) => s.robotId === robot.id && s.scanner === scanner);
      const returns = own.reduce((a, s) => a + s.returns, 0);
      const explained = own.reduce((a, s) => a + s.explained, 0);
      const flag = flags.find((f) => f.robotId === robot.id && f.scanner === scanner);
      const m = flag?.mount;
      rows.push({
        robot: robot.name,
        scanner,
        returns,
        agreement: returns > 0 ? explained / returns : null,
        flagged: flag !== undefined,
        mount: m && m.converged ? { dx: m.dx, dy: m.dy, dyawDeg: deg(m.dyaw), sigmaYawDeg: deg(m.sigma.dyaw) } : null,
      });
    }
  }
  return rows;
}

/** Everything after the input checks: the pipeline on a fresh in-memory database. Returns the exit code. */
async function analyze(args: Args, mapFiles: MapFiles, survey: Survey, io: AnalyzeIo): Promise<number> {
  // The start of the day after the last scan day: every scan's day is complete, as at the nightly run.
  const now = DateTime.fromMillis(survey.lastMs, { zone: args.timezone }).startOf('day').plus({ days: 1 }).toJSDate();
  const dataSource = await openDatabase({ database: ':memory:' });
  try {
    // The test settings are exactly what this needs: in-memory database, no demo data, no mail, silent logs.
    const { services } = createApp({ config: testConfig(), dataSource, log: pino({ level: 'silent' }) });
    const { admin, site } = await setUpSite(dataSource, services, args, survey);
    const version = await installMap(services, admin, site, args, mapFiles);
    io.out(
      `Map ${args.map} (${version.sourceFileName}): ${fmt(version.width)} × ${fmt(version.height)} cells at ${version.resolution} m/cell ` +
        `(${version.widthM} m × ${version.heightM} m), origin (${version.origin.x}, ${version.origin.y}) m, yaw ${version.origin.yaw} rad; ` +
        `${fmt(version.cells.occupied)} occupied, ${fmt(version.cells.free)} free, ${fmt(version.cells.unknown)} unknown cells.`,
    );
    io.out(`Robots from the scan logs: ${[...survey.robots].map(([r, s]) => `${r} (${[...s].join(', ')})`).join(', ')}.`);

    for (const file of args.scans) {
      const { counted: fresh, figures } = await services.ingest.countLines(site, fileLines(file), file, now);
      for (const l of describeFile(file, figures, fresh)) io.out(l);
    }

    const [run] = await services.jobRuns.detect('manual', site.id, now);
    if (run.status !== 'succeeded') {
      io.err(`Change detection failed: ${run.error ?? 'no reason was recorded'}.`);
      return EXIT_FAILED;
    }
    const figures = run.figures as unknown as DetectionFigures;
    const days = completeDays(site.timezone, now, siteSettings(site).detectionWindowDays);
    io.out('');
    io.out(`Detection window: ${days[0]} … ${days[days.length - 1]} (${counted(days.length, 'day')}, ${site.timezone}), ${counted(figures.days, 'day')} with evidence.`);
    if (figures.skipped) io.out(`  ${figures.skipped}`);

    const series = await services.health.dailySeries(site, now, days.length);
    const returns = series.reduce((a, d) => a + d.returns, 0);
    const explained = series.reduce((a, d) => a + d.explained, 0);
    const ratio = returns > 0 ? explained / returns : null;
    io.out(`Agreement (robots without a scanner check advised): ${fmt(explained)} of ${counted(returns, 'return')} explained, ${pct(ratio)}.`);

    const zones = await allZones(services, admin, site.id);
    io.out('');
    io.out(zones.length === 0 ? 'Zones: none found.' : `Zones (${zones.length}, highest severity first):`);
    if (zones.length > 0) {
      io.out(
        table(
          ['zone', 'kind', 'persistence', 'area', 'centroid (m)', 'days flagged', 'hit rate (interval)'],
          zones.map((z) => [
            z.label,
            z.kind,
            z.persistence,
            `${z.areaM2.toFixed(2)} m²`,
            `(${z.centroid[0].toFixed(2)}, ${z.centroid[1].toFixed(2)})`,
            `${z.daysFlagged} of ${z.daysObserved} observed`,
            `${z.meanHitRate.toFixed(3)} (${z.hitRateInterval[0].toFixed(3)}–${z.hitRateInterval[1].toFixed(3)})`,
          ]),
        ).join('\n'),
      );
    }

    const robots = await robotRows(dataSource, services, site, version.id, days);
    io.out('');
    io.out('Robots over the window (every robot, flagged ones included):');
    io.out(table(['robot', 'scanner', 'returns', 'agreement', 'flagged', 'mount estimate'], robots.map((r) => [r.robot, r.scanner, fmt(r.returns), pct(r.agreement), r.flagged ? 'scanner check advised' : 'no', r.flagged ? describeMount(r.mount) : '—'])).join('\n'));
    for (const f of (await services.scannerCheck.flagsOf(site.id)).filter((x) => x.status === 'active')) {
      const robot = await dataSource.getRepository(Robot).findOneByOrFail({ id: f.robotId });
      io.out(`  ${robot.name} (${f.scanner}): ${mountSentence(f)}`);
    }

    if (args.json !== null) {
      const doc: AnalysisJson = {
        map: { width: version.width, height: version.height, resolution: version.resolution, origin: [version.origin.x, version.origin.y, version.origin.yaw] },
        agreement: { returns, explained, ratio },
        zones: await Promise.all(zones.map(async (z) => zoneRow(z, args.cells ? await services.detection.zoneCells(admin, site.id, z.id) : null, version.width))),
        robots,
      };
      try {
        await writeFile(args.json, JSON.stringify(doc, null, 2) + '\n');
      } catch (e) {
        throw new InputError(`Cannot write ${args.json}: ${(e as Error).message}.`);
      }
      io.out('');
      io.out(`Wrote ${args.json}${args.cells ? ' (with zone cells)' : ''}.`);
    }
    return 0;
  } finally {
    await dataSource.destroy();
  }
}

function zoneRow(z: ZoneView, cells: Int32Array | null, width: number): ZoneRow {
  const row: ZoneRow = { kind: z.kind, persistence: z.persistence, areaM2: z.areaM2, cellCount: z.cellCount, bbox: z.bbox, centroid: z.centroid, outline: z.outline, meanHitRate: z.meanHitRate, observations: z.observations };
  // Cell index = j·width + i, with j counted up from the map's bottom row.
  if (cells) row.cells = Array.from(cells, (c): [number, number] => [c % width, Math.floor(c / width)]);
  return row;
}

/**
 * Runs `analyze`: checks the arguments and reads every scan log once (robots, scanners, last
 * day), then runs the server's pipeline on a throwaway in-memory database and prints the
 * summary (and writes --json). Returns the exit code: 0, 2 on bad input, 1 when detection failed.
 */
export async function runAnalyze(argv: string[], io: AnalyzeIo = { out: (l) => console.log(l), err: (l) => console.error(l) }): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    io.out(USAGE);
    return 0;
  }
  try {
    const args = parseArgs(argv);
    if (args.json !== null) {
      const folder = dirname(resolve(args.json));
      const isFolder = await stat(folder).then((s) => s.isDirectory(), () => false);
      if (!isFolder) throw new InputError(`Cannot write ${args.json}: the folder ${folder} does not exist.`);
    }
    const mapFiles = await readMapFiles(args.map);
    const survey = await surveyLogs(args.scans);
    if (survey.valid === 0) {
      const why = survey.firstRejects.length ? `\n${survey.firstRejects.map((r) => `  ${r}`).join('\n')}` : '';
      throw new InputError(survey.lines === 0 ? 'The scan logs hold no scan lines.' : `None of the ${counted(survey.lines, 'line')} in the scan logs is a valid scan; nothing was analysed.${why}`);
    }
    for (const key of args.mounts.keys()) {
      const cut = key.indexOf(':');
      const [robot, scanner] = [key.slice(0, cut), key.slice(cut + 1)];
      if (!survey.robots.get(robot)?.has(scanner)) throw new UsageError(`--mount names ${key}, but no valid scan in the logs comes from that robot and scanner.`);
    }
    return await analyze(args, mapFiles, survey, io);
  } catch (e) {
    if (e instanceof InputError) {
      io.err(e.message);
      if (e instanceof UsageError) io.err(USAGE);
      return EXIT_BAD_INPUT;
    }
    throw e;
  }
}
