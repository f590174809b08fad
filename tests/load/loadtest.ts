/**
 * Load test (`npm run loadtest`): builds and starts the server as `npm start` does, on a fresh data
 * directory with the demo seed (or uses the server at LOADTEST_URL), waits for the demo evidence and
 * the startup detection, signs in once per user, then runs three bounded phases with autocannon:
 * (a) the dashboard's read routes, (b) scan batches from simulated robots, each with its own token,
 * (c) both together. Prints one table row per phase and route group (requests/s, p50, p99, errors,
 * non-2xx, timeouts) and counts "database is locked" / SQLITE_BUSY in the server's output.
 * It prints figures and asserts nothing; the exit code is non-zero only when the test cannot run.
 *
 * Environment: LOADTEST_URL (reuse a running server; its demo accounts must exist), LOADTEST_SECONDS
 * (per phase, default 15), LOADTEST_CONNECTIONS (read connections, default 20), LOADTEST_ROBOTS
 * (default 20), LOADTEST_BATCH_SCANS (scans per batch, default 10), LOADTEST_ROBOT_RATE (batches per
 * second per robot in phase c, default 0.1), LOADTEST_SKIP_BUILD=1 (start the existing build),
 * LOADTEST_JSON (write the figures to this file too).
 */
import autocannon, { type AutocannonRequest, type AutocannonResult } from 'autocannon';
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomInt } from 'node:crypto';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { DateTime } from 'luxon';
import { TILE_STYLE } from '../../shared/render/palette.js';
import { tileCount, tilePyramid } from '../../shared/render/tiles.js';
import { createScenario } from '../../shared/sim/scenario.js';
import { DEMO_ACCOUNTS, SITES as DEMO_SITES } from '../../server/services/demo-seed.service.js';
import { waitForDetection } from '../e2e/helpers.mjs';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

function fail(message: string): never {
  console.error(message);
  process.exit(2);
}

function intSetting(name: string, fallback: number, min: number, max: number): number {
  const text = process.env[name];
  if (text === undefined || text === '') return fallback;
  const value = Number(text);
  if (!Number.isInteger(value) || value < min || value > max) fail(`${name} must be a whole number from ${min} to ${max}; got "${text}".`);
  return value;
}

function rateSetting(name: string, fallback: number): number {
  const text = process.env[name];
  if (text === undefined || text === '') return fallback;
  const value = Number(text);
  if (!Number.isFinite(value) || value <= 0 || value > 100) fail(`${name} must be a number above 0 and at most 100 (batches per second per robot); got "${text}".`);
  return value;
}

const settings = {
  url: process.env.LOADTEST_URL?.replace(/\/$/, '') || null,
  seconds: intSetting('LOADTEST_SECONDS', 15, 3, 600),
  connections: intSetting('LOADTEST_CONNECTIONS', 20, 6, 200),
  robots: intSetting('LOADTEST_ROBOTS', 20, 1, 100),
  batchScans: intSetting('LOADTEST_BATCH_SCANS', 10, 1, 200),
  robotRate: rateSetting('LOADTEST_ROBOT_RATE', 0.1),
  skipBuild: process.env.LOADTEST_SKIP_BUILD === '1',
  json: process.env.LOADTEST_JSON || null,
};

// ---------------------------------------------------------------------------------------------
// The server under test

interface ServerUnderTest {
  baseUrl: string;
  /** Everything the server printed (stdout and stderr), when we started it. */
  output: string[] | null;
  stop(): Promise<void>;
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      probe.close(() => resolve(port));
    });
  });
}

async function startServer(): Promise<ServerUnderTest> {
  if (settings.url) return { baseUrl: settings.url, output: null, stop: async () => {} };
  if (!settings.skipBuild) {
    console.log('Building the app (npm run build)…');
    if (spawnSync('npm', ['run', 'build'], { cwd: root, stdio: 'inherit' }).status !== 0) fail('The build failed, so the load test cannot run.');
  }
  const entry = path.join(root, 'dist', 'node', 'server', 'index.js');
  if (!existsSync(entry)) fail(`There is no build at ${path.relative(root, entry)}; run without LOADTEST_SKIP_BUILD.`);
  const dataDir = mkdtempSync(path.join(tmpdir(), 'driftline-load-'));
  const port = await freePort();
  // Detached: the server leads its own process group, so stopping it stops everything it started.
  const child: ChildProcess = spawn(process.execPath, [entry], {
    cwd: root,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, DRIFTLINE_DATA_DIR: dataDir, PORT: String(port), HOST: '127.0.0.1', NODE_ENV: 'production', LOG_LEVEL: 'warn', DRIFTLINE_SMTP_PORT: String(await freePort()) },
  });
  const output: string[] = [];
  child.stdout!.on('data', (chunk: Buffer) => output.push(chunk.toString()));
  child.stderr!.on('data', (chunk: Buffer) => output.push(chunk.toString()));
  const stop = async () => {
    if (child.exitCode === null) {
      const exited = new Promise((resolve) => child.once('exit', resolve));
      try {
        process.kill(-child.pid!, 'SIGTERM');
      } catch {
        // Already gone.
      }
      const late = await Promise.race([exited.then(() => false), new Promise((resolve) => setTimeout(() => resolve(true), 8000))]);
      if (late) {
        try {
          process.kill(-child.pid!, 'SIGKILL');
        } catch {
          // Already gone.
        }
      }
    }
    rmSync(dataDir, { recursive: true, force: true });
  };
  const baseUrl = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 120_000;
  for (;;) {
    if (child.exitCode !== null) {
      await stop();
      fail(`The server stopped before it was ready:\n${output.join('')}`);
    }
    if (Date.now() > deadline) {
      await stop();
      fail(`The server did not answer GET /api/health within 120 s:\n${output.join('')}`);
    }
    const ok = await fetch(`${baseUrl}/api/health`).then((r) => r.ok, () => false);
    if (ok) break;
    await sleep(250);
  }
  console.log(`Server started at ${baseUrl} on the fresh data directory ${dataDir}.`);
  return { baseUrl, output, stop };
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

// ---------------------------------------------------------------------------------------------
// A small JSON client with a session cookie

interface Session {
  email: string;
  cookie: string;
}

async function call<T>(baseUrl: string, method: string, url: string, options: { cookie?: string; body?: unknown; timeoutMs?: number } = {}): Promise<T> {
  const response = await fetch(`${baseUrl}${url}`, {
    method,
    headers: {
      ...(options.cookie ? { cookie: options.cookie } : {}),
      ...(options.body !== undefined ? { 'content-type': 'application/json' } : {}),
      // The server refuses unsafe requests that do not come from its own pages.
      ...(method !== 'GET' ? { origin: baseUrl, 'sec-fetch-site': 'same-origin' } : {}),
    },
    body: options.body === undefined ? undefined : JSON.stringify(options.body),
    signal: AbortSignal.timeout(options.timeoutMs ?? 30_000),
  });
  const text = await response.text();
  if (!response.ok) throw new Error(`${method} ${url} answered ${response.status}: ${text.slice(0, 300)}`);
  return (text ? JSON.parse(text) : undefined) as T;
}

/** Signs in once (the sign-in rate limit stays as it is: the cookie is reused for every request). */
async function signIn(baseUrl: string, email: string): Promise<Session> {
  const account = DEMO_ACCOUNTS.find((a) => a.email === email);
  if (!account) fail(`${email} is not a demo account.`);
  const response = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: baseUrl, 'sec-fetch-site': 'same-origin' },
    body: JSON.stringify({ email, password: account.password }),
  });
  if (!response.ok) fail(`Signing in as ${email} answered ${response.status}: ${(await response.text()).slice(0, 300)}`);
  const cookie = response.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
  return { email, cookie };
}

interface SiteRow {
  id: string;
  name: string;
  timezone: string;
}

/**
 * Waits until the demo is seeded and every site has a succeeded detection run, with the browser
 * tests' own wait (tests/e2e/helpers.mjs), here over fetch with the admin's cookie; returns the sites.
 */
async function waitForDemo(baseUrl: string, admin: Session): Promise<SiteRow[]> {
  const api = {
    get: async (url: string) => {
      const response = await fetch(url, { headers: { cookie: admin.cookie }, signal: AbortSignal.timeout(10_000) });
      const text = await response.text();
      return { ok: () => response.ok, status: () => response.status, json: async () => JSON.parse(text) as unknown };
    },
  };
  return (await waitForDetection(api, baseUrl)) as SiteRow[];
}

// ---------------------------------------------------------------------------------------------
// The dashboard's read routes, as the client asks for them (src/api/*.api.ts and the views)

interface ReadGroup {
  name: string;
  /** Share of the read connections. */
  weight: number;
  requests: AutocannonRequest[];
}

interface VersionRow {
  id: string;
  kind: string;
  status: string;
  width: number;
  height: number;
}

async function readGroups(baseUrl: string, sessions: Session[], adminSites: SiteRow[]): Promise<ReadGroup[]> {
  const get = (session: Session, url: string): AutocannonRequest => ({ method: 'GET', path: url, headers: { cookie: session.cookie, accept: 'application/json' } });
  const fleet: AutocannonRequest[] = [];
  const header: AutocannonRequest[] = [];
  const zones: AutocannonRequest[] = [];
  const layers: AutocannonRequest[] = [];
  const tiles: AutocannonRequest[] = [];
  const tabs: AutocannonRequest[] = [];
  const now = DateTime.utc();
  // The calendar's month view asks for the weeks around the month.
  const from = now.startOf('month').minus({ days: 7 }).toISO();
  const to = now.startOf('month').plus({ days: 42 }).toISO();
  for (const session of sessions) {
    const { sites } = await call<{ sites: SiteRow[] }>(baseUrl, 'GET', '/api/sites', { cookie: session.cookie });
    fleet.push(get(session, '/api/sites'));
    tabs.push(get(session, `/api/remaps?from=${encodeURIComponent(from!)}&to=${encodeURIComponent(to!)}`));
    for (const site of sites) {
      const s = `/api/sites/${site.id}`;
      header.push(get(session, s));
      // The Zones tab (first page of 25) and the map's changes layer (pages of 200), both of the zones still to deal with.
      zones.push(get(session, `${s}/zones?status=active&page=1&pageSize=25`), get(session, `${s}/zones?status=active&page=1&pageSize=200`));
      // The map's agreement heat and traffic layers (7 complete days) and its paths layer (24 hours).
      layers.push(get(session, `${s}/agreement?days=7`), get(session, `${s}/paths?hours=24`));
      tabs.push(get(session, `${s}/map-versions`), get(session, `${s}/remaps?page=1&pageSize=25`), get(session, `${s}/stations`), get(session, `${s}/robots`));
      const { mapVersions } = await call<{ mapVersions: VersionRow[] }>(baseUrl, 'GET', `${s}/map-versions`, { cookie: session.cookie });
      const active = mapVersions.find((v) => v.kind === 'floor' && v.status === 'active');
      if (!active) continue;
      // The map opens on the whole floor: the first zoom levels' tiles, as Leaflet asks for them.
      const pyramid = tilePyramid(active);
      for (let z = pyramid.minZoom; z <= Math.min(pyramid.maxZoom, pyramid.minZoom + 2); z++) {
        const { columns, rows } = tileCount(active, z);
        for (let y = 0; y < rows; y++) for (let x = 0; x < columns; x++) tiles.push(get(session, `${s}/map-versions/${active.id}/tiles/${z}/${x}/${y}.png?style=${TILE_STYLE}`));
      }
    }
  }
  if (adminSites.length === 0) fail('The server has no sites to read.');
  return [
    { name: 'fleet overview (sites with health)', weight: 4, requests: fleet },
    { name: 'site header (site with health)', weight: 3, requests: header },
    { name: 'zones (tab and map layer)', weight: 3, requests: zones },
    { name: 'agreement blocks and paths', weight: 3, requests: layers },
    { name: 'map tiles', weight: 3, requests: tiles },
    { name: 'site tabs (versions, remaps, stations, robots, calendar)', weight: 4, requests: tabs },
  ];
}

// ---------------------------------------------------------------------------------------------
// Simulated robots: each with its own token, posting the simulator's scans of its building

interface LoadRobot {
  site: string;
  name: string;
  token: string;
  /** Batches: each line split into its time (ms) and the rest of the JSON after the "t" field. */
  batches: Array<Array<{ t: number; rest: string }>>;
}

interface RobotRow {
  id: string;
  name: string;
}

/** Robots per demo site: the demo's own fleet first, then more in the same buildings, round robin, until `total`. */
function robotCounts(total: number): number[] {
  const fleets = DEMO_SITES.map((s) => (typeof s.sim.robots === 'number' ? s.sim.robots : (s.sim.robots?.length ?? 3)));
  const counts = fleets.map(() => 0);
  for (let placed = 0, round = 0; placed < total; round++) {
    const demoLeft = fleets.some((f) => f > round);
    for (let k = 0; k < fleets.length && placed < total; k++) {
      if (demoLeft && fleets[k] <= round) continue;
      counts[k]++;
      placed++;
    }
  }
  return counts;
}

async function setUpRobots(baseUrl: string, admin: Session, sites: SiteRow[]): Promise<LoadRobot[]> {
  const counts = robotCounts(settings.robots);
  const robots: LoadRobot[] = [];
  const started = Date.now();
  const label = `load test ${new Date().toISOString().slice(0, 19)}`;
  for (let k = 0; k < DEMO_SITES.length; k++) {
    if (counts[k] === 0) continue;
    const demo = DEMO_SITES[k];
    const site = sites.find((s) => s.name === demo.name);
    if (!site) fail(`The demo site ${demo.name} is missing on the server.`);
    // Yesterday (site-local) is complete, so every scan lies in the past, and it counts in the figures the dashboards show.
    const yesterday = DateTime.now().setZone(site.timezone).minus({ days: 1 }).toISODate()!;
    const scenario = createScenario({ ...demo.sim, robots: counts[k], days: 1, startDate: yesterday, siteTimezone: site.timezone, beamStep: 1, scansPerRobotPerDay: Math.max(240, settings.batchScans * 12) });
    const byRobot = new Map<string, Array<{ t: number; rest: string }>>();
    for (const scan of scenario.scansForDay(0)) {
      const line = JSON.stringify(scan);
      const list = byRobot.get(scan.robot) ?? [];
      // The line starts with {"t":"…", so a later cycle can move the time and keep the rest.
      list.push({ t: Date.parse(scan.t), rest: line.slice(line.indexOf('",') + 2) });
      byRobot.set(scan.robot, list);
    }
    const { robots: registered } = await call<{ robots: RobotRow[] }>(baseUrl, 'GET', `/api/sites/${site.id}/robots`, { cookie: admin.cookie });
    for (const r of scenario.truth.robots) {
      let robot = registered.find((x) => x.name === r.name);
      if (!robot) {
        const body = { name: r.name, model: 'Simulated lifter (load test)', mounts: r.mounts.map(({ name, x, y, yaw }) => ({ name, x, y, yaw })) };
        robot = (await call<{ robot: RobotRow }>(baseUrl, 'POST', `/api/sites/${site.id}/robots`, { cookie: admin.cookie, body })).robot;
      }
      const { secret } = await call<{ secret: string }>(baseUrl, 'POST', `/api/sites/${site.id}/robots/${robot.id}/tokens`, { cookie: admin.cookie, body: { label } });
      const lines = byRobot.get(r.name) ?? [];
      const batches: LoadRobot['batches'] = [];
      for (let q = 0; q + settings.batchScans <= lines.length; q += settings.batchScans) batches.push(lines.slice(q, q + settings.batchScans));
      robots.push({ site: site.name, name: r.name, token: secret, batches });
    }
  }
  const perSite = DEMO_SITES.map((s, k) => `${s.name} ${counts[k]}`).join(', ');
  console.log(`Simulated ${robots.length} robots (${perSite}), ${robots[0]?.batches.length ?? 0} batches of ${settings.batchScans} full scans each, in ${((Date.now() - started) / 1000).toFixed(1)} s.`);
  return robots;
}

/** The body of a robot's n-th batch: the pool cycles, moved on by a millisecond per cycle so that no batch repeats another's content. */
function batchBody(robot: LoadRobot, n: number, salt: number): string {
  const batch = robot.batches[n % robot.batches.length];
  const shift = salt + Math.floor(n / robot.batches.length);
  return batch.map((l) => `{"t":"${new Date(l.t + shift).toISOString()}",${l.rest}`).join('\n') + '\n';
}

// ---------------------------------------------------------------------------------------------
// Phases and figures

interface Tally {
  latencies: number[];
  errors: number;
  timeouts: number;
  non2xx: number;
  statuses: Map<number, number>;
  seconds: number;
  /** Ingest only: batches counted (201) and answered as already received (200). */
  counted: number;
  replays: number;
}

const newTally = (): Tally => ({ latencies: [], errors: 0, timeouts: 0, non2xx: 0, statuses: new Map(), seconds: 0, counted: 0, replays: 0 });

function run(options: Parameters<typeof autocannon>[0], tally: Tally): Promise<AutocannonResult> {
  return new Promise((resolve, reject) => {
    const instance = autocannon(options, (error, result) => {
      if (error) return reject(error);
      tally.errors += result.errors;
      tally.timeouts += result.timeouts;
      tally.non2xx += result.non2xx;
      tally.seconds = Math.max(tally.seconds, result.duration);
      resolve(result);
    });
    instance.on('response', (_client, status, _bytes, ms) => {
      tally.latencies.push(ms);
      tally.statuses.set(status, (tally.statuses.get(status) ?? 0) + 1);
    });
  });
}

function readRuns(groups: ReadGroup[], baseUrl: string, tallies: Map<string, Tally>): Promise<unknown>[] {
  const totalWeight = groups.reduce((a, g) => a + g.weight, 0);
  return groups.map((g) => {
    const tally = newTally();
    tallies.set(g.name, tally);
    const connections = Math.max(1, Math.round((settings.connections * g.weight) / totalWeight));
    // Each connection starts at another place in the list, so that all sites are asked for at once.
    return run({ url: baseUrl, connections, duration: settings.seconds, timeout: 10, requests: g.requests }, tally);
  });
}

function ingestRequest(pick: () => LoadRobot, tally: Tally, counters: Map<LoadRobot, number>, salt: number): AutocannonRequest {
  return {
    method: 'POST',
    path: '/api/ingest/scans',
    setupRequest: (req) => {
      const robot = pick();
      const n = counters.get(robot) ?? 0;
      counters.set(robot, n + 1);
      return {
        ...req,
        headers: { authorization: `Bearer ${robot.token}`, 'content-type': 'application/x-ndjson', 'idempotency-key': `load-${salt}-${robot.site.replace(/\W+/g, '-')}-${robot.name}-${n}` },
        body: batchBody(robot, n, salt),
      };
    },
    onResponse: (status) => {
      if (status === 201) tally.counted++;
      else if (status === 200) tally.replays++;
    },
  };
}

/**
 * Flat out (no rate): one connection per robot, each posting its next batch once the last one was
 * answered. Paced: the robots in turn at `rate` batches per second each, over one connection per
 * robot at most (autocannon paces whole requests per second, so the fleet is paced as one).
 */
function ingestRuns(robots: LoadRobot[], baseUrl: string, tally: Tally, rate: number | undefined, counters: Map<LoadRobot, number>, salt: number): Promise<unknown>[] {
  if (rate === undefined) {
    return robots.map((robot) => run({ url: baseUrl, connections: 1, duration: settings.seconds, timeout: 30, requests: [ingestRequest(() => robot, tally, counters, salt)] }, tally));
  }
  let turn = 0;
  const next = () => robots[turn++ % robots.length];
  return [run({ url: baseUrl, connections: robots.length, overallRate: Math.max(1, Math.round(robots.length * rate)), duration: settings.seconds, timeout: 30, requests: [ingestRequest(next, tally, counters, salt)] }, tally)];
}

function merge(tallies: Tally[]): Tally {
  const all = newTally();
  for (const t of tallies) {
    for (const l of t.latencies) all.latencies.push(l);
    all.errors += t.errors;
    all.timeouts += t.timeouts;
    all.non2xx += t.non2xx;
    all.seconds = Math.max(all.seconds, t.seconds);
    all.counted += t.counted;
    all.replays += t.replays;
    for (const [s, n] of t.statuses) all.statuses.set(s, (all.statuses.get(s) ?? 0) + n);
  }
  return all;
}

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}

interface Row {
  phase: string;
  group: string;
  requests: number;
  perSecond: number;
  p50: number;
  p99: number;
  errors: number;
  non2xx: number;
  timeouts: number;
  note: string;
}

function row(phase: string, group: string, t: Tally): Row {
  const sorted = [...t.latencies].sort((a, b) => a - b);
  const statuses = [...t.statuses].filter(([s]) => s >= 300).map(([s, n]) => `${n}× ${s}`);
  const ingest = t.counted + t.replays > 0 ? [`${t.counted} batches counted${t.replays ? `, ${t.replays} answered as already received` : ''}`] : [];
  return { phase, group, requests: sorted.length, perSecond: sorted.length / (t.seconds || settings.seconds), p50: percentile(sorted, 50), p99: percentile(sorted, 99), errors: t.errors, non2xx: t.non2xx, timeouts: t.timeouts, note: [...ingest, ...statuses].join('; ') };
}

/** Waits (at most a minute) until the server answers its health check within 100 ms again. */
async function settle(baseUrl: string) {
  const started = Date.now();
  while (Date.now() - started < 60_000) {
    const t = performance.now();
    await fetch(`${baseUrl}/api/health`).then((r) => r.arrayBuffer(), () => null);
    if (performance.now() - t < 100) break;
    await sleep(250);
  }
  console.log(`  the server was answering promptly again after ${((Date.now() - started) / 1000).toFixed(1)} s`);
}

const LOCKED = /database is locked|SQLITE_BUSY/gi;

function lockMentions(output: string[] | null, from: number): number | null {
  if (!output) return null;
  return output.slice(from).join('').match(LOCKED)?.length ?? 0;
}

function printTable(rows: Row[], locks: Array<{ phase: string; count: number | null; serverErrors: number }>) {
  const f = (v: number) => (Number.isFinite(v) ? (v >= 100 ? v.toFixed(0) : v.toFixed(1)) : '–');
  const lines = ['| phase | route group | requests | req/s | p50 ms | p99 ms | errors | non-2xx | timeouts | notes |', '| --- | --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | --- |'];
  for (const r of rows) lines.push(`| ${r.phase} | ${r.group} | ${r.requests} | ${f(r.perSecond)} | ${f(r.p50)} | ${f(r.p99)} | ${r.errors} | ${r.non2xx} | ${r.timeouts} | ${r.note} |`);
  console.log(`\n${lines.join('\n')}\n`);
  for (const l of locks) {
    console.log(`${l.phase}: ${l.count === null ? 'server output not scanned (LOADTEST_URL)' : `${l.count} "database is locked" / SQLITE_BUSY in the server's output`}, ${l.serverErrors} answers of 500 or above.`);
  }
}

async function main() {
  const server = await startServer();
  const stopAndExit = (code: number) => void server.stop().finally(() => process.exit(code));
  process.once('SIGINT', () => stopAndExit(130));
  process.once('SIGTERM', () => stopAndExit(143));
  try {
    const { baseUrl } = server;
    const admin = await signIn(baseUrl, 'iris.admin@kestrelway.example');
    const manager = await signIn(baseUrl, 'nadia.manager@ambergate.example');
    console.log('Waiting for the demo evidence and the startup detection…');
    const sites = await waitForDemo(baseUrl, admin);
    const groups = await readGroups(baseUrl, [admin, manager], sites);
    console.log(`Read routes: ${groups.map((g) => `${g.name} ${g.requests.length}`).join(', ')}.`);
    const robots = await setUpRobots(baseUrl, admin, sites);
    // One untimed pass over every read route, so that the first phase does not measure cold caches.
    for (const g of groups) for (const r of g.requests) await fetch(`${baseUrl}${r.path}`, { headers: r.headers }).then((res) => res.arrayBuffer());

    const salt = randomInt(0, 60_000);
    const counters = new Map<LoadRobot, number>();
    // One robot's batches one after another, nothing else running: the cost of a batch by itself.
    const alone: number[] = [];
    for (let k = 0; k < 5; k++) {
      const robot = robots[k % robots.length];
      const n = counters.get(robot) ?? 0;
      counters.set(robot, n + 1);
      const t = performance.now();
      const res = await fetch(`${baseUrl}/api/ingest/scans`, { method: 'POST', headers: { authorization: `Bearer ${robot.token}`, 'content-type': 'application/x-ndjson', 'idempotency-key': `load-${salt}-alone-${robot.site.replace(/\W+/g, '-')}-${robot.name}-${n}` }, body: batchBody(robot, n, salt) });
      await res.arrayBuffer();
      if (res.status !== 201) fail(`A single batch answered ${res.status}, not 201.`);
      alone.push(performance.now() - t);
    }
    alone.sort((a, b) => a - b);
    console.log(`One batch alone (${settings.batchScans} full scans): median ${alone[2].toFixed(0)} ms of 5 (${alone.map((v) => v.toFixed(0)).join(', ')}).`);
    const rows: Row[] = [];
    const locks: Array<{ phase: string; count: number | null; serverErrors: number }> = [];
    const phase = async (name: string, reads: boolean, ingest: 'none' | 'flat-out' | 'paced') => {
      console.log(`Phase ${name}: ${settings.seconds} s…`);
      const mark = server.output?.length ?? 0;
      const readTallies = new Map<string, Tally>();
      const ingestTally = newTally();
      const runs: Promise<unknown>[] = [];
      if (reads) runs.push(...readRuns(groups, baseUrl, readTallies));
      if (ingest !== 'none') runs.push(...ingestRuns(robots, baseUrl, ingestTally, ingest === 'paced' ? settings.robotRate : undefined, counters, salt));
      await Promise.all(runs);
      for (const [group, t] of readTallies) rows.push(row(name, group, t));
      if (reads) rows.push(row(name, `all dashboard reads (${settings.connections} connections)`, merge([...readTallies.values()])));
      if (ingest !== 'none') rows.push(row(name, `scan batches, ${robots.length} robots${ingest === 'paced' ? ` at ${settings.robotRate}/s each` : ', as fast as answered'}`, ingestTally));
      const all = merge([...readTallies.values(), ingestTally]);
      locks.push({ phase: name, count: lockMentions(server.output, mark), serverErrors: [...all.statuses].filter(([s]) => s >= 500).reduce((a, [, n]) => a + n, 0) });
    };
    await phase('a. reads', true, 'none');
    await phase('b. ingest', false, 'flat-out');
    // Batches still in flight when phase b ended are answered before phase c starts.
    await settle(baseUrl);
    await phase('c. reads + ingest', true, 'paced');
    printTable(rows, locks);
    if (settings.json) writeFileSync(settings.json, JSON.stringify({ settings, rows, locks, at: new Date().toISOString() }, null, 2));
  } catch (error) {
    console.error(error instanceof Error ? error.message : error);
    await server.stop();
    process.exit(1);
  }
  await server.stop();
}

await main();
