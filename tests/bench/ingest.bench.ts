import { spawn, spawnSync } from 'node:child_process';
import { createWriteStream, openAsBlob } from 'node:fs';
import { mkdtemp, readFile, rm, stat } from 'node:fs/promises';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { createGzip } from 'node:zlib';
import Database from 'better-sqlite3';
import { gridToImage } from '../../shared/grid/image-to-grid.js';
import { formatMapMetadata } from '../../shared/grid/map-metadata.js';
import { encodePgm } from '../../shared/grid/pgm.js';
import { createScenario } from '../../shared/sim/scenario.js';

// End-to-end ingest through the HTTP API of a real server process (compiled first with
// tsconfig.build.json and started as `npm start` runs it, on a fresh data directory): robot batches, a large uploaded log (peak RSS of the server), and the
// evidence store's bytes per map cell per day. BENCH_LOG_MB sets the uploaded log's
// uncompressed size (default 256; the README also quotes a 1024 MB run).

const fmt = (n: number) => Math.round(n).toLocaleString('en-US');
const LOG_MB = Number(process.env.BENCH_LOG_MB ?? 256);
// The bench reads loosely typed JSON answers of our own API.
const json = async (res: Response | Promise<Response>): Promise<any> => (await res).json();

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });
}

/** Peak resident set (VmHWM) of a process, in MB. */
async function peakRssMb(pid: number): Promise<number> {
  const status = await readFile(`/proc/${pid}/status`, 'utf8');
  return Number(/VmHWM:\s+(\d+)/.exec(status)![1]) / 1024;
}

/** Prints robot-batch throughput, large-upload throughput with the server's peak RSS, and evidence bytes per cell per day. */
export async function run(): Promise<void> {
  const dataDir = await mkdtemp(path.join(os.tmpdir(), 'driftline-bench-'));
  const port = await freePort();
  const build = spawnSync('npx', ['tsc', '-p', 'tsconfig.build.json'], { stdio: 'inherit' });
  if (build.status !== 0) throw new Error('The server did not compile; the ingest bench needs dist/node.');
  const server = spawn(process.execPath, ['dist/node/server/index.js'], {
    env: { ...process.env, DRIFTLINE_DATA_DIR: dataDir, PORT: String(port), DRIFTLINE_DEMO_EVIDENCE: 'false', LOG_LEVEL: 'error', NODE_ENV: 'production' },
    stdio: ['ignore', 'ignore', 'inherit'],
    detached: true,
  });
  server.on('exit', (code, signal) => {
    if (code !== 0 && signal !== 'SIGTERM') console.error(`the server stopped during the bench: exit code ${code}, signal ${signal}`);
  });
  const base = `http://127.0.0.1:${port}`;
  try {
    for (let k = 0; k < 200; k++) {
      if (await fetch(`${base}/api/health`).then((r) => r.ok, () => false)) break;
      await new Promise((r) => setTimeout(r, 250));
    }
    const signIn = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'tomas.mapper@kestrelway.example', password: 'demo-mapper-2026' }) });
    const cookie = signIn.headers.get('set-cookie')!.split(';')[0];
    const sites = (await json(fetch(`${base}/api/sites`, { headers: { cookie } }))).sites as Array<{ id: string; name: string }>;
    const site = sites.find((s) => s.name === 'Fennick Cross DC')!;

    // The same simulated building the demo seed uses for this site, at full scanner resolution.
    const scenario = createScenario({ seed: 7101, robots: 4, days: 40, startDate: '2026-09-01', siteTimezone: 'Europe/London' });
    const form = new FormData();
    form.append('image', new Blob([encodePgm(gridToImage(scenario.map))]), 'map.pgm');
    form.append('metadata', new Blob([formatMapMetadata(scenario.metadata)]), 'map.yaml');
    const version = (await json(fetch(`${base}/api/sites/${site.id}/map-versions`, { method: 'POST', body: form, headers: { cookie } }))).mapVersion;
    await fetch(`${base}/api/sites/${site.id}/map-versions/${version.id}/activate`, { method: 'POST', headers: { cookie } });
    const robots = (await json(fetch(`${base}/api/sites/${site.id}/robots`, { headers: { cookie } }))).robots as Array<{ id: string; name: string }>;
    const amr = robots.find((r) => r.name === 'AMR-01')!;
    const { secret } = await json(fetch(`${base}/api/sites/${site.id}/robots/${amr.id}/tokens`, { method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: JSON.stringify({ label: 'bench' }) }));
    console.log(`map ${version.width} × ${version.height} cells at ${version.resolution} m; scanner 541 beams, 270°`);

    // 1. Robot batches: one robot's day in batches of 60 scans, posted one after another.
    const lines = [...scenario.scansForDay(0)].filter((s) => s.robot === 'AMR-01').map((s) => JSON.stringify(s));
    let beams = 0;
    const t0 = performance.now();
    for (let k = 0; k < lines.length; k += 60) {
      const batch = lines.slice(k, k + 60).join('\n');
      const res = await fetch(`${base}/api/ingest/scans`, { method: 'POST', headers: { authorization: `Bearer ${secret}`, 'content-type': 'application/x-ndjson', 'idempotency-key': `bench-${k}` }, body: batch });
      const body = await json(res);
      if (res.status !== 201) throw new Error(`batch answered ${res.status}: ${JSON.stringify(body)}`);
      beams += body.batch.beams;
    }
    const robotSeconds = (performance.now() - t0) / 1000;
    console.log(`robot batches: ${fmt(lines.length)} scans, ${fmt(beams)} beams in ${robotSeconds.toFixed(2)} s → ${fmt(beams / robotSeconds)} beams/s (HTTP, JSON, tracing, store)`);

    // 2. A large recorded log, gzip, uploaded and processed while the server's peak RSS is read.
    const logPath = path.join(dataDir, 'bench-log.jsonl.gz');
    const gz = createGzip({ level: 1 });
    const out = gz.pipe(createWriteStream(logPath));
    let written = 0;
    let scans = 0;
    // Days 1…39 of the scenario, over again when the log is to be longer than 39 days.
    for (let k = 0; written < LOG_MB * 1024 * 1024; k++) {
      for (const s of scenario.scansForDay(1 + (k % 39))) {
        const line = JSON.stringify(s) + '\n';
        written += line.length;
        scans++;
        if (!gz.write(line)) await new Promise<void>((r) => gz.once('drain', () => r()));
        if (written >= LOG_MB * 1024 * 1024) break;
      }
    }
    gz.end();
    await new Promise<void>((r) => out.on('finish', () => r()));
    const gzBytes = (await stat(logPath)).size;
    const before = await peakRssMb(server.pid!);
    const upload = new FormData();
    upload.append('log', await openAsBlob(logPath), 'bench-log.jsonl.gz');
    const t1 = performance.now();
    let batch = (await json(fetch(`${base}/api/sites/${site.id}/scan-batches`, { method: 'POST', body: upload, headers: { cookie } }))).batch;
    while (batch.status === 'processing') {
      await new Promise((r) => setTimeout(r, 500));
      batch = (await json(fetch(`${base}/api/sites/${site.id}/scan-batches/${batch.id}`, { headers: { cookie } }))).batch;
    }
    const uploadSeconds = (performance.now() - t1) / 1000;
    const peak = await peakRssMb(server.pid!);
    console.log(
      `uploaded log: ${fmt(written / 1024 / 1024)} MB of JSON Lines (${fmt(gzBytes / 1024 / 1024)} MB gzip), ${fmt(scans)} scans, ${fmt(batch.beams)} beams, status ${batch.status}, ` +
        `${uploadSeconds.toFixed(1)} s → ${fmt(batch.beams / uploadSeconds)} beams/s, ${(written / 1024 / 1024 / uploadSeconds).toFixed(1)} MB/s; server peak RSS ${fmt(before)} MB before, ${fmt(peak)} MB after`,
    );

    // 3. Evidence store size per map cell and day.
    const db = new Database(path.join(dataDir, 'driftline.sqlite'), { readonly: true });
    const ev = db.prepare('SELECT COUNT(DISTINCT day) AS days, SUM(LENGTH(data)) AS bytes, COUNT(*) AS chunks FROM evidence_chunks WHERE map_version_id = ?').get(version.id) as { days: number; bytes: number; chunks: number };
    db.close();
    const cells = version.width * version.height;
    console.log(`evidence: ${fmt(ev.chunks)} chunks over ${ev.days} days, ${fmt(ev.bytes / 1024)} KB → ${(ev.bytes / cells / ev.days).toFixed(3)} bytes per map cell per day`);
  } finally {
    try {
      process.kill(-server.pid!, 'SIGTERM');
    } catch {
      // already gone
    }
    await new Promise((r) => setTimeout(r, 500));
    await rm(dataDir, { recursive: true, force: true });
  }
}
