import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import type { Database, Statement } from 'better-sqlite3';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listRoutes } from '../../server/routes/index.js';
import { apiCases, logCases, mapCases, type BadCase, type CorpusContext, type Family } from './helpers/bad-input-corpus.js';
import { roomMap, scanLine } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

// A generated corpus of malformed maps, scan logs and API requests (tests/api/helpers/bad-input-corpus.ts).
// Every case must get a 4xx whose JSON body carries a readable sentence (no stack, no SQL, no
// error class names), the server must still answer /api/health after it, and the database must be
// unchanged: the rows of every table, by count and by a SHA-256 over their contents, and the
// upload folder, compared before and after each case.
//
// Left out of the comparison, and why: robot_tokens.last_used_at. A robot's token is checked
// before its batch is read, and "last used" records that the robot called, which is true of a
// refused batch too (the admin page shows it; it is not part of what the batch would store).
//
// Scan logs: a robot batch or an uploaded file whose every line is bad is refused up front with
// 422 and the reasons; a log with some good lines is counted and reports its bad lines (README
// "Batch policy"), so it is not a bad-input case and is not in the corpus.

const EXCLUDED_COLUMNS: Record<string, string[]> = { robot_tokens: ['last_used_at'] };

interface Snapshot {
  tables: Record<string, { rows: number; sha256: string }>;
  uploads: string[];
}

// Prepared once per table: preparing ~30 statements per snapshot cost more than reading the rows.
const statements = new WeakMap<Database, Map<string, Statement>>();
function rowsOf(raw: Database, name: string): Statement {
  let byTable = statements.get(raw);
  if (!byTable) statements.set(raw, (byTable = new Map()));
  let stmt = byTable.get(name);
  if (!stmt) {
    const columns = (raw.prepare(`PRAGMA table_info("${name}")`).all() as Array<{ name: string }>).map((c) => c.name).filter((c) => !EXCLUDED_COLUMNS[name]?.includes(c));
    stmt = raw.prepare(`SELECT ${columns.map((c) => `"${c}"`).join(', ')} FROM "${name}" ORDER BY rowid`).raw(true);
    byTable.set(name, stmt);
  }
  return stmt;
}

function snapshot(raw: Database, uploadsDir: string): Snapshot {
  const names = (raw.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name").all() as Array<{ name: string }>).map((r) => r.name);
  const tables: Snapshot['tables'] = {};
  for (const name of names) {
    const hash = createHash('sha256');
    let rows = 0;
    for (const row of rowsOf(raw, name).iterate() as Iterable<unknown[]>) {
      rows++;
      for (const v of row) {
        if (Buffer.isBuffer(v)) hash.update('b').update(v);
        else hash.update(JSON.stringify(v) ?? 'null');
        hash.update('\u0001');
      }
      hash.update('\u0002');
    }
    tables[name] = { rows, sha256: hash.digest('hex') };
  }
  let uploads: string[] = [];
  try {
    uploads = readdirSync(uploadsDir).sort();
  } catch {
    // No upload has been received yet: the folder does not exist.
  }
  return { tables, uploads };
}

function differences(a: Snapshot, b: Snapshot): string[] {
  const out: string[] = [];
  for (const name of new Set([...Object.keys(a.tables), ...Object.keys(b.tables)])) {
    const x = a.tables[name];
    const y = b.tables[name];
    if (!x || !y) out.push(`table ${name} ${x ? 'vanished' : 'appeared'}`);
    else if (x.rows !== y.rows) out.push(`${name}: ${x.rows} → ${y.rows} rows`);
    else if (x.sha256 !== y.sha256) out.push(`${name}: rows changed`);
  }
  if (a.uploads.join('/') !== b.uploads.join('/')) out.push(`uploads folder: [${a.uploads.join(', ')}] → [${b.uploads.join(', ')}]`);
  return out;
}

// The message must read as a sentence and show nothing of the server's insides.
const LEAKS = /TypeError|ReferenceError|RangeError|SyntaxError|SQLITE_|QueryFailed|\bat [\w.<>]+ \(|\.(ts|js):\d+|node_modules|\[object Object\]/;
function unreadable(body: unknown): string | null {
  const message = (body as { error?: { message?: unknown } } | null)?.error?.message;
  if (typeof message !== 'string') return `no error message in ${JSON.stringify(body)?.slice(0, 200)}`;
  if (message.length < 15 || !/^["“(A-Z]/.test(message) || !/[.!?]$/.test(message)) return `not a sentence: "${message.slice(0, 200)}"`;
  if (/\bundefined\b|\bNaN\b/.test(message)) return `message shows a missing value: "${message.slice(0, 200)}"`;
  if (LEAKS.test(JSON.stringify(body))) return `the body shows server internals: ${JSON.stringify(body).slice(0, 300)}`;
  return null;
}

describe('bad-input corpus', () => {
  let t: TestApp;
  let server: Server;
  let base: string;
  let cookie: string;
  let robotSecret: string;
  let raw: Database;
  let uploadsDir: string;
  let dataDir: string;
  let ctx: CorpusContext;
  const tally: Record<Family, { tried: number; passed: number; ms: number }> = { maps: { tried: 0, passed: 0, ms: 0 }, logs: { tried: 0, passed: 0, ms: 0 }, api: { tried: 0, passed: 0, ms: 0 } };
  const statuses = new Map<number, number>();
  let snapMs = 0;
  const slowest: Array<{ label: string; ms: number }> = [];

  beforeAll(async () => {
    dataDir = mkdtempSync(path.join(os.tmpdir(), 'driftline-corpus-'));
    uploadsDir = path.join(dataDir, 'uploads');
    t = await createTestApp({ config: { dataDir } });
    const ids = await demoIds(t.dataSource);
    const { pgm, yaml } = roomMap();
    const map = await t.services.mapVersions.upload(ids.admin, ids.ambergateSite, { kind: 'floor', label: 'corpus room', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } });
    await t.services.mapVersions.activate(ids.admin, ids.ambergateSite, map.id);
    robotSecret = (await t.services.robots.createToken(ids.admin, ids.ambergateSite, ids.ambergateRobot, 'corpus')).secret;
    cookie = await signIn(t.app, 'iris.admin@kestrelway.example', 'demo-admin-2026');
    raw = (t.dataSource.driver as unknown as { databaseConnection: Database }).databaseConnection;
    // One real server for the whole corpus: "still up" means this same process keeps answering.
    server = createServer(t.app);
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    ctx = { siteId: ids.ambergateSite, siteWithoutMapId: ids.corvaneSite, organizationId: ids.ambergate, robotId: ids.ambergateRobot, userId: ids.priya, mapVersionId: map.id, routes: listRoutes(t.routes) };
  });

  afterAll(async () => {
    const total = Object.values(tally).reduce((s, f) => ({ tried: s.tried + f.tried, passed: s.passed + f.passed, ms: s.ms + f.ms }), { tried: 0, passed: 0, ms: 0 });
    console.log(`bad-input corpus: ${total.tried} cases tried, ${total.passed} passed (maps ${tally.maps.passed}/${tally.maps.tried}, logs ${tally.logs.passed}/${tally.logs.tried}, api ${tally.api.passed}/${tally.api.tried}) in ${(total.ms / 1000).toFixed(1)} s (maps ${(tally.maps.ms / 1000).toFixed(1)} s, logs ${(tally.logs.ms / 1000).toFixed(1)} s, api ${(tally.api.ms / 1000).toFixed(1)} s)`);
    console.log(`bad-input corpus: snapshots took ${Math.round(snapMs)} ms`);
    console.log(`bad-input corpus slowest cases: ${slowest.sort((a, b) => b.ms - a.ms).slice(0, 8).map((s) => `${s.label} ${Math.round(s.ms)} ms`).join('; ')}`);
    console.log(`bad-input corpus statuses: ${[...statuses.entries()].sort((a, b) => a[0] - b[0]).map(([s, n]) => `${s} × ${n}`).join(', ')}`);
    await new Promise((resolve) => server?.close(resolve));
    await Promise.all([...(t?.services.ingest.pending ?? [])]);
    await t?.close();
    rmSync(dataDir, { recursive: true, force: true });
  });

  function send(c: BadCase) {
    let req = request(base)[c.method](c.path);
    if (c.auth === 'admin') req = req.set('Cookie', cookie);
    if (c.auth === 'robot') req = req.set('Authorization', `Bearer ${robotSecret}`);
    for (const [k, v] of Object.entries(c.headers ?? {})) req = req.set(k, v);
    if (c.files || c.fields) {
      for (const f of c.files ?? []) req = req.attach(f.field, f.content, f.name);
      for (const [k, v] of Object.entries(c.fields ?? {})) req = req.field(k, v);
      return req;
    }
    // As is: superagent would otherwise serialize a Buffer sent as JSON into {"type":"Buffer",...}.
    if (c.raw) return req.set('Content-Type', c.raw.type).serialize((b: unknown) => b as string).send(c.raw.body);
    if (c.json !== undefined) return req.send(c.json as object);
    return req;
  }

  /** Sends one case and returns what was wrong with the answer, or null. */
  async function check(c: BadCase, before: Snapshot): Promise<{ problem: string | null; after: Snapshot }> {
    let problem: string | null = null;
    try {
      const res = await send(c);
      statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
      if (res.status < 400 || res.status > 499) problem = `answered ${res.status}: ${JSON.stringify(res.body).slice(0, 300)}`;
      else problem = unreadable(res.body);
    } catch (e) {
      problem = `the request failed: ${(e as Error).message}`;
    }
    // Uploads are read in the background; a refused one must have started nothing.
    await Promise.all([...t.services.ingest.pending]);
    const health = await request(base).get('/api/health').catch((e: Error) => ({ status: 0, body: e.message }));
    if (health.status !== 200) problem = `${problem ? `${problem}; ` : ''}then /api/health answered ${health.status}`;
    const snapStarted = performance.now();
    const after = snapshot(raw, uploadsDir);
    snapMs += performance.now() - snapStarted;
    const changed = differences(before, after);
    if (changed.length) problem = `${problem ? `${problem}; ` : ''}stored data changed: ${changed.join(', ')}`;
    return { problem, after };
  }

  async function run(family: Family, cases: BadCase[]) {
    const started = performance.now();
    const failures: string[] = [];
    let before = snapshot(raw, uploadsDir);
    const seen = new Set<string>();
    for (const c of cases) {
      expect(seen.has(c.label), `duplicate case label ${c.label}`).toBe(false);
      seen.add(c.label);
      const caseStarted = performance.now();
      const { problem, after } = await check(c, before);
      slowest.push({ label: c.label, ms: performance.now() - caseStarted });
      tally[family].tried++;
      if (problem) failures.push(`${c.label}: ${problem}`);
      else tally[family].passed++;
      before = after;
    }
    tally[family].ms = performance.now() - started;
    return failures;
  }

  it('when malformed maps are uploaded (PGM, YAML, forms), then each gets a 4xx sentence and nothing is stored', { timeout: 60_000 }, async () => {
    const cases = mapCases(ctx);
    expect(cases.length).toBeGreaterThanOrEqual(150);
    expect(await run('maps', cases)).toEqual([]);
  });

  it('when malformed scan logs are posted or uploaded (bad lines, gzip damage, bombs), then each gets a 4xx sentence and nothing is stored', { timeout: 60_000 }, async () => {
    const cases = logCases(ctx);
    expect(cases.length).toBeGreaterThanOrEqual(150);
    expect(await run('logs', cases)).toEqual([]);
  });

  it('when every route gets bad ids, bodies and queries, then each gets a 4xx sentence and nothing changes', { timeout: 60_000 }, async () => {
    const { cases, untouched, stale } = apiCases(ctx);
    expect(stale, 'routes named in the corpus generator but not in the route table').toEqual([]);
    // Routes with no parameter, body or validated query take no input a client could get wrong;
    // the robots' two routes take their bodies as logs (the logs family). A new route that lands
    // here either belongs in this list or needs its cases in tests/api/helpers/bad-input-corpus.ts.
    expect(untouched.sort()).toEqual(['GET /api/auth/me', 'GET /api/health', 'GET /api/invitations', 'GET /api/organizations', 'GET /api/sites', 'GET /api/users', 'POST /api/auth/sign-out', 'POST /api/ingest/docking', 'POST /api/ingest/scans'].sort());
    expect(cases.length).toBeGreaterThanOrEqual(300);
    console.log(`bad-input corpus: api cases for ${ctx.routes.length - untouched.length} of ${ctx.routes.length} routes (${untouched.length} take no input a client could get wrong, or are the robots' log routes)`);
    expect(await run('api', cases)).toEqual([]);
  });

  // Not a corpus case: such a log is accepted (its first megabyte is good) and fails while it is read.
  it('when a line far past the first megabyte of an uploaded log is longer than 1 MB, then the batch fails with a readable reason and counts nothing', async () => {
    const good = Array.from({ length: 6000 }, () => scanLine({ t: '2026-11-07T10:00:00Z' })).join('\n');
    const log = Buffer.from(`${good}\n${'a'.repeat(1_500_000)}\n${scanLine({})}\n`);
    const before = snapshot(raw, uploadsDir);
    const res = await request(base).post(`/api/sites/${ctx.siteId}/scan-batches`).set('Cookie', cookie).attach('log', log, 'long-line.jsonl');
    expect(res.status).toBe(202);
    await Promise.all([...t.services.ingest.pending]);
    const batch = (await request(base).get(`/api/sites/${ctx.siteId}/scan-batches/${res.body.batch.id}`).set('Cookie', cookie)).body.batch;
    expect(batch.status).toBe('failed');
    expect(batch.error).toBe('Line 6,001 of the log is longer than 1 MB, far more than any scan; nothing was stored.');
    // Only the failed batch's own row is new.
    expect(differences(before, snapshot(raw, uploadsDir))).toEqual(['scan_batches: 0 → 1 rows']);
  });

  it('when the corpus has run, then at least 500 cases were tried and every one passed', () => {
    const tried = tally.maps.tried + tally.logs.tried + tally.api.tried;
    const passed = tally.maps.passed + tally.logs.passed + tally.api.passed;
    expect(tried).toBeGreaterThanOrEqual(500);
    expect(passed).toBe(tried);
  });
});
