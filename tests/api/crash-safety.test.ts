import { readdirSync, readFileSync, statSync } from 'node:fs';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { inflateRawSync } from 'node:zlib';
import Database from 'better-sqlite3';
import { DateTime } from 'luxon';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeChunkCounters, DEFAULT_CHUNK_SIZE } from '../../shared/evidence/chunks.js';
import { gridToImage } from '../../shared/grid/image-to-grid.js';
import { formatMapMetadata } from '../../shared/grid/map-metadata.js';
import { encodePgm } from '../../shared/grid/pgm.js';
import { createCounters } from '../../shared/scan/accumulate.js';
import { createRng } from '../../shared/sim/random.js';
import { createScenario, type ScanLogLine } from '../../shared/sim/scenario.js';
import { openDatabase } from '../../server/data-source.js';
import { Robot, Site } from '../../server/entities/index.js';
import { decodeCounts, EvidenceStore, SAMPLE_MAX } from '../../server/services/evidence-store.js';
import { bundleServer, freePort, httpRequest, ServerProcess } from './helpers/server-process.js';
import { createTestApp, demoIds } from './helpers/test-app.js';

// The real server as a child process, killed with SIGKILL at random moments while robots post
// scan batches (some at once, some twice) and a recorded log is being read, or just as a batch's
// answer begins (committed, never acknowledged), then started again
// and every unacknowledged batch retried. At the end each batch must be counted exactly once and
// the stored evidence must equal that of one uninterrupted run of the same batches.
//
// CRASH_SEED=<n> repeats a run's random choices (kill delays, which batch goes next); the
// machine's speed still decides what each kill interrupts. CRASH_KILLS sets the number of kills.

const SEED = Number(process.env.CRASH_SEED ?? Math.floor(Math.random() * 2 ** 31));
const KILLS = Number(process.env.CRASH_KILLS ?? 24);
/** Scans per robot batch: 30 scans of 541 beams take the server about 0.1 s, long enough to be cut off. */
const SCANS_PER_BATCH = 30;
/** Robot batches posted at the same time. */
const WORKERS = 3;
/** Which life of the server is killed while it reads the uploaded log (the fourth, or the last of fewer). */
const UPLOAD_LIFE = Math.min(3, KILLS - 1);
const CHUNK_CELLS = DEFAULT_CHUNK_SIZE * DEFAULT_CHUNK_SIZE;
const SITE = 'Fennick Cross DC';
const MAPPER = { email: 'tomas.mapper@kestrelway.example', password: 'demo-mapper-2026' };

interface Batch {
  key: string;
  robot: string;
  body: string;
  /** Figures counted here from the lines, not by the server: scans, beams, returns (DESIGN §4.2: a return is rangeMin ≤ r < rangeMax). */
  scans: number;
  beams: number;
  returns: number;
  /** Server id of the counted batch once an answer said so. */
  ackId: string | null;
  /** Answers "counted" (201) received; more than one is double counting. */
  counted: number;
  /** Posts of this batch cut off by a kill. */
  interrupted: number;
}

/** Figures of scan lines as the design defines them, computed without the server's code. */
function figuresOf(lines: ScanLogLine[]) {
  let beams = 0;
  let returns = 0;
  for (const s of lines) {
    beams += s.ranges.length;
    for (const r of s.ranges) if (r !== null && Number.isFinite(r) && r >= s.rangeMin && r < s.rangeMax) returns++;
  }
  return { scans: lines.length, beams, returns };
}

/** One run of the server between two kills; `killOnCommit`, when set, kills it at the next 201's status line. */
interface Life {
  dying: boolean;
  killOnCommit?: () => void;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
// The test reads loosely typed JSON answers of our own API.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Json = any;

describe('crash safety', () => {
  const cleanup: string[] = [];
  let server: ServerProcess | null = null;
  afterAll(async () => {
    // A failed check must not leave the child running.
    await server?.kill();
    for (const dir of cleanup) await rm(dir, { recursive: true, force: true });
  });

  it(
    'when the server is killed at random moments while batches and a log arrive, then after restarts and retries every batch is counted once and no evidence is lost or damaged',
    async () => {
      if (!Number.isInteger(KILLS) || KILLS < 2) throw new Error(`CRASH_KILLS must be a whole number of 2 or more, not "${process.env.CRASH_KILLS}".`);
      const t0 = performance.now();
      console.log(`crash safety: seed ${SEED} (repeat with CRASH_SEED=${SEED})`);
      const rng = createRng(SEED);
      const phases: string[] = [];
      let phaseStart = performance.now();
      const phase = (name: string) => {
        phases.push(`${name} ${((performance.now() - phaseStart) / 1000).toFixed(1)} s`);
        console.log(`crash safety: ${phases.at(-1)}`);
        phaseStart = performance.now();
      };
      const root = await mkdtemp(path.join(os.tmpdir(), 'driftline-crash-'));
      // Inside the checkout (git ignores .tmp/) so that the bundle finds node_modules.
      await mkdir(path.join(process.cwd(), '.tmp'), { recursive: true });
      const build = await mkdtemp(path.join(process.cwd(), '.tmp', 'crash-build-'));
      cleanup.push(root, build);
      const dataDir = path.join(root, 'data');
      const logFile = path.join(root, 'server.log');
      const entry = await bundleServer(build);
      const srv = new ServerProcess({ args: [entry], dataDir, port: await freePort(), smtpPort: await freePort(), logFile });
      server = srv;
      const base = srv.baseUrl;

      // Arrange: the demo site gets the simulated building's map; each of its robots a token.
      const startupMs: number[] = [];
      startupMs.push(await srv.start());
      const signIn = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(MAPPER) });
      expect(signIn.status).toBe(200);
      const cookie = signIn.headers.get('set-cookie')!.split(';')[0];
      const api = async (p: string, init: RequestInit = {}): Promise<Json> => {
        const res = await fetch(`${base}${p}`, { ...init, headers: { cookie, ...(init.headers as Record<string, string> | undefined) } });
        const body = await res.json();
        if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${p} answered ${res.status}: ${JSON.stringify(body)}`);
        return body;
      };
      const site = ((await api('/api/sites')).sites as Json[]).find((s) => s.name === SITE);
      // Scans of the two days before today (site-local), so that nothing is in the future or past retention.
      const startDate = DateTime.now().setZone('Europe/London').minus({ days: 3 }).toISODate()!;
      const scenario = createScenario({ seed: 7101, robots: 4, days: 2, startDate, siteTimezone: 'Europe/London' });
      const pgm = Buffer.from(encodePgm(gridToImage(scenario.map)));
      const yaml = formatMapMetadata(scenario.metadata);
      const form = new FormData();
      form.append('image', new Blob([pgm]), 'map.pgm');
      form.append('metadata', new Blob([yaml]), 'map.yaml');
      const version = (await api(`/api/sites/${site.id}/map-versions`, { method: 'POST', body: form })).mapVersion;
      await api(`/api/sites/${site.id}/map-versions/${version.id}/activate`, { method: 'POST' });
      const robots = (await api(`/api/sites/${site.id}/robots`)).robots as Json[];
      const tokens = new Map<string, string>();
      for (const r of robots) {
        const { secret } = await api(`/api/sites/${site.id}/robots/${r.id}/tokens`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ label: 'crash test' }) });
        tokens.set(r.name, secret);
      }

      // Day 0 becomes 40 robot batches, day 1 the uploaded log.
      const batches: Batch[] = [];
      for (const day of [0]) {
        const byRobot = new Map<string, ScanLogLine[]>();
        for (const s of scenario.scansForDay(day)) {
          const scan = s as ScanLogLine;
          if (!byRobot.has(scan.robot)) byRobot.set(scan.robot, []);
          byRobot.get(scan.robot)!.push(scan);
        }
        for (const [robot, scans] of [...byRobot].sort(([a], [b]) => a.localeCompare(b))) {
          for (let k = 0; k < scans.length; k += SCANS_PER_BATCH) {
            const part = scans.slice(k, k + SCANS_PER_BATCH);
            batches.push({ key: `crash-${SEED}-${batches.length}`, robot, body: part.map((s) => JSON.stringify(s)).join('\n'), ...figuresOf(part), ackId: null, counted: 0, interrupted: 0 });
          }
        }
      }
      const uploadScans = [...scenario.scansForDay(1)] as ScanLogLine[];
      const uploadLines = uploadScans.map((s) => JSON.stringify(s));
      const uploadFigures = figuresOf(uploadScans);
      const logPath = path.join(root, 'commissioning-drive.jsonl');
      await writeFile(logPath, uploadLines.join('\n') + '\n');

      phase('bundle, first start and site');
      // Act: lives of the server, each ended by SIGKILL at a random moment.
      const violations: string[] = [];
      const pending: Batch[] = [...batches];
      const inFlight = new Map<Batch, number>();
      let interruptedPosts = 0;
      let interruptedReplays = 0;
      let committedUnacknowledged = 0;
      let replays = 0;
      let concurrentCopies = 0;
      let startupKills = 0;
      let midRequestKills = 0;
      let killsAfterCommit = 0;
      let killedUpload: { id: string; statusAtKill: string } | null = null;

      const postBatch = async (b: Batch, kind: 'first' | 'copy' | 'replay', current: Life) => {
        inFlight.set(b, (inFlight.get(b) ?? 0) + 1);
        // The server committed and began to answer when it was killed: the robot never hears the answer.
        let answerLost = false;
        const onStatus = (status: number) => {
          if (status !== 201 || !current.killOnCommit) return;
          const killNow = current.killOnCommit;
          current.killOnCommit = undefined;
          answerLost = true;
          killNow();
        };
        try {
          const answer = await httpRequest(`${base}/api/ingest/scans`, {
            method: 'POST',
            headers: { authorization: `Bearer ${tokens.get(b.robot)}`, 'content-type': 'application/x-ndjson', 'idempotency-key': b.key },
            body: b.body,
            onStatus: kind === 'replay' ? undefined : onStatus,
          });
          if (answerLost) throw new Error('the server was killed as it answered');
          const body = answer.body as Json;
          if (answer.status === 201 && body.status === 'counted') {
            b.counted++;
            if (b.ackId !== null) violations.push(`${b.key} was counted again (${body.batch.id}) after it was acknowledged as ${b.ackId}`);
            b.ackId = body.batch.id;
          } else if (answer.status === 200 && body.status === 'already_received') {
            if (b.ackId === null) {
              // Its first post was cut off after the batch had been committed.
              if (b.interrupted > 0 && b.counted === 0) committedUnacknowledged++;
              b.ackId = body.batch.id;
            } else if (b.ackId !== body.batch.id) {
              violations.push(`${b.key} was answered as batch ${body.batch.id}, earlier as ${b.ackId}`);
            }
          } else {
            violations.push(`${b.key} (${kind}) answered ${answer.status}: ${JSON.stringify(body).slice(0, 300)}`);
            return;
          }
          const got = body.batch;
          if (got.scans !== b.scans || got.beams !== b.beams || got.returns !== b.returns) {
            violations.push(`${b.key} receipt says ${got.scans} scans, ${got.beams} beams, ${got.returns} returns; sent ${b.scans}, ${b.beams}, ${b.returns}`);
          }
        } catch (e) {
          if (!current.dying) {
            violations.push(`${b.key} (${kind}) failed while the server was up: ${(e as Error).message}`);
            return;
          }
          if (kind === 'replay') interruptedReplays++;
          else {
            interruptedPosts++;
            b.interrupted++;
          }
        } finally {
          const n = inFlight.get(b)! - 1;
          if (n === 0) inFlight.delete(b);
          else inFlight.set(b, n);
          if (b.ackId === null && !inFlight.has(b) && !pending.includes(b)) pending.push(b);
        }
      };
      const worker = async (current: Life, stopWhenDone: boolean) => {
        while (!current.dying && violations.length < 20) {
          const acked = batches.filter((b) => b.ackId !== null);
          const r = rng.next();
          if (r < 0.12 && acked.length > 0) {
            replays++;
            await postBatch(acked[rng.int(acked.length)], 'replay', current);
          } else if (r < 0.2 && inFlight.size > 0) {
            // A second copy of a batch that is on its way: the two must count once.
            const flying = [...inFlight.keys()];
            concurrentCopies++;
            await postBatch(flying[rng.int(flying.length)], 'copy', current);
          } else if (pending.length > 0) {
            await postBatch(pending.splice(rng.int(Math.min(pending.length, 4)), 1)[0], 'first', current);
          } else if (stopWhenDone) {
            if (inFlight.size === 0) return;
            await sleep(20);
          } else if (acked.length > 0) {
            replays++;
            await postBatch(acked[rng.int(acked.length)], 'replay', current);
            await sleep(40);
          } else {
            await sleep(20);
          }
        }
      };

      for (let kill = 0; kill < KILLS; kill++) {
        const current: Life = { dying: false };
        if (kill > 1 && kill !== UPLOAD_LIFE && rng.chance(0.12)) {
          // Killed while starting: migrations, marking interrupted uploads, seeding checks.
          const delay = rng.range(0, startupMs[startupMs.length - 1]);
          srv.spawn();
          let healthy = false;
          const watching = srv.waitHealthy(60_000, () => current.dying).then((ok) => (healthy = ok));
          await sleep(delay);
          current.dying = true;
          await srv.kill();
          await watching;
          if (!healthy) startupKills++;
          continue;
        }
        if (!srv.running) startupMs.push(await srv.start());
        let uploadId: string | null = null;
        if (kill === UPLOAD_LIFE) {
          const upload = new FormData();
          upload.append('log', new Blob([readFileSync(logPath)]), path.basename(logPath));
          uploadId = (await api(`/api/sites/${site.id}/scan-batches`, { method: 'POST', body: upload })).batch.id;
        }
        const workers = Array.from({ length: WORKERS }, () => worker(current, false));
        // Short lives: three workers keep the server busy, so most kills land inside a batch. About
        // one life in four instead ends as a batch's answer starts: committed, never acknowledged.
        let killNow = () => {};
        const killRequested = new Promise<void>((resolve) => (killNow = resolve));
        const afterCommit = kill !== UPLOAD_LIFE && pending.length > 0 && rng.chance(0.25);
        if (afterCommit) {
          current.killOnCommit = () => {
            killsAfterCommit++;
            current.dying = true;
            killNow();
          };
        }
        await Promise.race([sleep(afterCommit ? 3000 : kill === UPLOAD_LIFE ? rng.range(150, 700) : rng.range(10, 400)), killRequested]);
        if (uploadId) killedUpload = { id: uploadId, statusAtKill: (await api(`/api/sites/${site.id}/scan-batches/${uploadId}`)).batch.status };
        const inFlightAtKill = [...inFlight.keys()].length;
        current.dying = true;
        await srv.kill();
        await Promise.all(workers);
        if (inFlightAtKill > 0) midRequestKills++;
      }

      phase('kills');
      // Retry until every batch is acknowledged, then upload the log again and replay everything once.
      startupMs.push(await srv.start());
      const final = { dying: false };
      await Promise.all(Array.from({ length: WORKERS }, () => worker(final, true)));
      const killed = killedUpload ? (await api(`/api/sites/${site.id}/scan-batches/${killedUpload.id}`)).batch : null;
      const reupload = new FormData();
      reupload.append('log', new Blob([readFileSync(logPath)]), path.basename(logPath));
      let again = (await api(`/api/sites/${site.id}/scan-batches`, { method: 'POST', body: reupload })).batch;
      while (again.status === 'processing') {
        await sleep(100);
        again = (await api(`/api/sites/${site.id}/scan-batches/${again.id}`)).batch;
      }
      const totalsBefore = await fetchTotals(dataDir);
      for (const b of batches) await postBatch(b, 'replay', final);
      const totalsAfter = await fetchTotals(dataDir);
      const unacknowledged = batches.filter((b) => b.ackId === null).length;
      await srv.kill();
      // One more start: what the kills left on disk must be cleaned up by then.
      startupMs.push(await srv.start());
      await srv.kill();
      phase('retries, upload and replays');
      console.log(
        `crash safety: ${KILLS} kills (${midRequestKills} with batches in flight, ${killsAfterCommit} of them as a 201 began, ${startupKills} while starting; the uploaded log was ${killedUpload?.statusAtKill} at its kill, then ${killed?.status}, sent again: ${again.status}), ` +
          `${batches.length} batches, ${interruptedPosts} posts of ${batches.filter((b) => b.interrupted > 0).length} batches interrupted in flight, ${committedUnacknowledged} of those batches committed before the kill ("already received" on retry), ` +
          `${replays + batches.length} replays (${interruptedReplays} interrupted), ${concurrentCopies} concurrent copies, ${unacknowledged} never acknowledged, ${violations.length} wrong answers`,
      );

      // Assert: the receipts.
      expect(violations).toEqual([]);
      expect(unacknowledged).toBe(0);
      expect(batches.filter((b) => b.counted > 1).map((b) => b.key)).toEqual([]);
      expect(totalsAfter).toEqual(totalsBefore);
      // Cut off while being read: marked failed at the next start, counted once when sent again;
      // finished just before the kill: counted, and the copy sent again adds nothing.
      expect(killed).not.toBeNull();
      expect([killed.status, again.status]).toEqual(killed.status === 'failed' ? ['failed', 'counted'] : ['counted', 'duplicate']);
      if (killed.status === 'failed') expect(killed.error).toMatch(/server stopped while this log was being read/);

      // The database: whole, consistent, and holding each batch once.
      let chunkCount = 0;
      let lost = -1;
      let double = -1;
      const db = await openDatabase({ database: path.join(dataDir, 'driftline.sqlite') });
      try {
        expect(await db.query('PRAGMA integrity_check')).toEqual([{ integrity_check: 'ok' }]);
        expect(await db.query('PRAGMA foreign_key_check')).toEqual([]);
        const rows: Json[] = await db.query("SELECT idempotency_key AS key, status, scans, beams, returns FROM scan_batches WHERE site_id = ? AND source = 'robot'", [site.id]);
        const perKey = new Map<string, number>();
        for (const r of rows) perKey.set(r.key, (perKey.get(r.key) ?? 0) + 1);
        lost = batches.filter((b) => !perKey.has(b.key)).length;
        double = batches.filter((b) => (perKey.get(b.key) ?? 0) > 1).length;
        expect(rows.length).toBe(batches.length);
        const byKey = new Map(rows.map((r) => [r.key, r]));
        for (const b of batches) expect(byKey.get(b.key), b.key).toEqual({ key: b.key, status: 'counted', scans: b.scans, beams: b.beams, returns: b.returns });
        const uploads: Json[] = await db.query("SELECT status, scans, beams, returns FROM scan_batches WHERE site_id = ? AND source = 'upload' ORDER BY received_at", [site.id]);
        expect(uploads.filter((u) => u.status === 'counted')).toEqual([{ status: 'counted', ...uploadFigures }]);
        expect(uploads.filter((u) => u.status === 'processing')).toEqual([]);

        const expected = {
          scans: batches.reduce((a, b) => a + b.scans, 0) + uploadFigures.scans,
          beams: batches.reduce((a, b) => a + b.beams, 0) + uploadFigures.beams,
          returns: batches.reduce((a, b) => a + b.returns, 0) + uploadFigures.returns,
        };
        const [stats]: Json[] = await db.query('SELECT SUM(scans) AS scans, SUM(beams) AS beams, SUM(returns) AS returns, SUM(explained) AS explained, SUM(out_of_map) AS outOfMap FROM daily_stats WHERE site_id = ?', [site.id]);
        const [counted]: Json[] = await db.query("SELECT SUM(explained) AS explained, SUM(out_of_map) AS outOfMap FROM scan_batches WHERE site_id = ? AND status = 'counted'", [site.id]);
        expect(stats).toEqual({ ...expected, ...counted });
        const [hours]: Json[] = await db.query('SELECT SUM(scans) AS scans, SUM(returns) AS returns FROM hourly_traffic WHERE site_id = ?', [site.id]);
        expect(hours).toEqual({ scans: expected.scans, returns: expected.returns });

        // Every chunk decodes with the store's reader; its hits are the returns that ended inside the map.
        const chunks: Json[] = await db.query('SELECT data FROM evidence_chunks WHERE map_version_id = ?', [version.id]);
        chunkCount = chunks.length;
        let hits = 0;
        for (const c of chunks) {
          const decoded = decodeChunkCounters(inflateRawSync(c.data), CHUNK_CELLS);
          for (const h of decoded.hits) hits += h;
        }
        expect(hits).toBe(expected.returns - stats.outOfMap);

        // The same batches counted once each by a server that never stopped: equal to the cell.
        phase('database checks');
        const reference = await referenceRun(batches, uploadLines, scenario, pgm, yaml);
        try {
          const days = (await db.query('SELECT DISTINCT day FROM evidence_chunks WHERE map_version_id = ? ORDER BY day', [version.id])).map((r: Json) => r.day);
          expect(days).toEqual(reference.days);
          const store = new EvidenceStore(db);
          for (const day of days) {
            const here = createCounters(scenario.map);
            store.loadIntoSync(version.id, [day], scenario.map.width, scenario.map.height, here);
            const there = reference.counters.get(day)!;
            expect(Buffer.from(here.hits.buffer).equals(Buffer.from(there.hits.buffer)), `hits on ${day}`).toBe(true);
            expect(Buffer.from(here.passes.buffer).equals(Buffer.from(there.passes.buffer)), `passes on ${day}`).toBe(true);
          }
          expect(await perRobot(db, version.id)).toEqual(reference.perRobot);
          phase('uninterrupted reference run and comparison');
        } finally {
          await reference.close();
        }
      } finally {
        await db.destroy();
      }

      // Nothing left behind on disk, nothing unhandled in the server's log.
      expect(leftovers(dataDir)).toEqual([]);
      const log = readFileSync(logFile, 'utf8').split('\n').filter((l) => l.trim() !== '');
      // pino writes JSON lines (error = 50 and above); anything else that names an error or shows a
      // stack frame came from outside the logger, e.g. an unhandled rejection.
      const bad = log.filter((l) => {
        try {
          return (JSON.parse(l) as { level: number }).level >= 50;
        } catch {
          return /error|unhandled|uncaught|^\s+at /i.test(l);
        }
      });
      expect(bad).toEqual([]);

      const seconds = (performance.now() - t0) / 1000;
      const sorted = [...startupMs].sort((a, b) => a - b);
      console.log(
        `crash safety: ${KILLS} kills, ${batches.length} batches (${batches.reduce((a, b) => a + b.beams, 0).toLocaleString('en-US')} beams) and one log, ${interruptedPosts} posts interrupted in flight, ${lost} lost, ${double} double; ` +
          `integrity_check ok, foreign_key_check empty, ${chunkCount} chunks decoded and equal to an uninterrupted run; ` +
          `start ${Math.round(sorted[Math.floor(sorted.length / 2)])} ms median (${Math.round(sorted[0])}–${Math.round(sorted[sorted.length - 1])}), run ${seconds.toFixed(1)} s (${phases.join(', ')})`,
      );
    },
    // About a minute on an idle two-core machine; far longer when other work shares the cores.
    600_000,
  );
});

/** Sums the replay sweep must leave unchanged, read beside the running server (WAL lets a reader in). */
async function fetchTotals(dataDir: string) {
  const db = new Database(path.join(dataDir, 'driftline.sqlite'), { readonly: true });
  try {
    return {
      batches: db.prepare('SELECT COUNT(*) AS n FROM scan_batches').get(),
      stats: db.prepare('SELECT SUM(scans) AS scans, SUM(beams) AS beams, SUM(returns) AS returns, SUM(explained) AS explained FROM daily_stats').get(),
      chunks: db.prepare('SELECT COUNT(*) AS n, SUM(LENGTH(data)) AS bytes FROM evidence_chunks').get(),
      trails: db.prepare('SELECT COUNT(*) AS n FROM pose_trails').get(),
      samples: db.prepare('SELECT SUM(count) AS n FROM scan_samples').get(),
    };
  } finally {
    db.close();
  }
}

/** Per robot (by name), scanner and day: daily figures, agreement blocks, trail points and kept samples. */
async function perRobot(db: import('typeorm').DataSource, mapVersionId: string) {
  const names = new Map<string, string>((await db.getRepository(Robot).find()).map((r) => [r.id, r.name]));
  const stats: Json[] = await db.query('SELECT robot_id, scanner, day, scans, beams, returns, explained, out_of_map FROM daily_stats WHERE map_version_id = ?', [mapVersionId]);
  const blocks: Json[] = await db.query('SELECT robot_id, day, block_cells, data FROM agreement_blocks WHERE map_version_id = ?', [mapVersionId]);
  const trails: Json[] = await db.query('SELECT robot_id, day, COUNT(*) AS rows, SUM(count) AS points FROM pose_trails WHERE map_version_id = ? GROUP BY robot_id, day', [mapVersionId]);
  const samples: Json[] = await db.query('SELECT robot_id, scanner, day, count, data FROM scan_samples WHERE map_version_id = ?', [mapVersionId]);
  const out: Record<string, unknown> = {};
  for (const s of stats) out[`stat ${names.get(s.robot_id)} ${s.scanner} ${s.day}`] = [s.scans, s.beams, s.returns, s.explained, s.out_of_map];
  for (const b of blocks) {
    const counts = decodeCounts(b.data);
    out[`blocks ${names.get(b.robot_id)} ${b.day}`] = [b.block_cells, Buffer.from(counts.buffer).toString('base64')];
  }
  for (const t of trails) out[`trail ${names.get(t.robot_id)} ${t.day}`] = [t.rows, t.points];
  for (const s of samples) {
    // Which scans a sample keeps depends on the order batches arrived; how many it keeps does not.
    const lines = inflateRawSync(s.data).toString('utf8').split('\n');
    const readable = lines.every((l) => (JSON.parse(l) as { robot: string }).robot === names.get(s.robot_id));
    out[`sample ${names.get(s.robot_id)} ${s.scanner} ${s.day}`] = [s.count, lines.length, readable, s.count <= SAMPLE_MAX];
  }
  return out;
}

/** Counts the same batches and log once each in a fresh in-memory app that never stops. */
async function referenceRun(batches: Batch[], uploadLines: string[], scenario: ReturnType<typeof createScenario>, pgm: Buffer, yaml: string) {
  const t = await createTestApp();
  const ids = await demoIds(t.dataSource);
  const site = await t.dataSource.getRepository(Site).findOneByOrFail({ id: ids.ambergateSite });
  const version = await t.services.mapVersions.upload(ids.admin, site.id, { kind: 'floor', label: 'reference', image: { originalname: 'map.pgm', buffer: pgm }, metadataFile: { originalname: 'map.yaml', buffer: Buffer.from(yaml) } });
  await t.services.mapVersions.activate(ids.admin, site.id, version.id);
  const robots = new Map((await t.dataSource.getRepository(Robot).findBy({ siteId: site.id })).map((r) => [r.name, r]));
  for (const b of batches) await t.services.ingest.ingestRobotBatch(robots.get(b.robot)!, Buffer.from(b.body), b.key);
  await t.services.ingest.countLines(site, uploadLines, 'commissioning-drive.jsonl');
  const days = (await t.dataSource.query('SELECT DISTINCT day FROM evidence_chunks WHERE map_version_id = ? ORDER BY day', [version.id])).map((r: Json) => r.day as string);
  const store = new EvidenceStore(t.dataSource);
  const counters = new Map<string, ReturnType<typeof createCounters>>();
  for (const day of days) {
    const c = createCounters(scenario.map);
    store.loadIntoSync(version.id, [day], scenario.map.width, scenario.map.height, c);
    counters.set(day, c);
  }
  return { days, counters, perRobot: await perRobot(t.dataSource, version.id), close: () => t.close() };
}

/** Files in the data directory other than the database, its WAL files and the secret (recursively). */
function leftovers(dataDir: string): string[] {
  const keep = new Set(['driftline.sqlite', 'driftline.sqlite-wal', 'driftline.sqlite-shm', 'secret.key']);
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const full = path.join(dir, name);
      if (statSync(full).isDirectory()) walk(full);
      else if (!(dir === dataDir && keep.has(name))) out.push(path.relative(dataDir, full));
    }
  };
  walk(dataDir);
  return out;
}
