// Browser tests of the built app: builds, starts the real server on a fresh data directory and a
// free port, drives Debian's chromium through playwright-core, prints one line per test and a
// "N passed, M failed" summary, and exits non-zero on any failure. Never skips silently.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..');
const chromiumPath = '/usr/bin/chromium';
const screenshotDir = path.join(here, 'screenshots');

function fail(message) {
  console.error(message);
  process.exit(1);
}

function ensureChromium() {
  if (existsSync(chromiumPath)) return;
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  const hasApt = spawnSync('sh', ['-c', 'command -v apt-get'], { stdio: 'ignore' }).status === 0;
  if (!isRoot || !hasApt) {
    fail(`Chromium is missing at ${chromiumPath}; the browser tests need it. Install it with:\n  sudo apt-get update && sudo apt-get install -y chromium`);
  }
  console.log("Installing Debian's chromium for the browser tests (apt-get install -y chromium)…");
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  if (spawnSync('apt-get', ['update'], { stdio: 'inherit', env }).status !== 0) fail('apt-get update failed; run: apt-get update && apt-get install -y chromium');
  if (spawnSync('apt-get', ['install', '-y', 'chromium'], { stdio: 'inherit', env }).status !== 0 || !existsSync(chromiumPath)) {
    fail('Installing chromium failed; run: apt-get install -y chromium');
  }
}

// What `npm run build` does, but the web part goes to this run's own folder: the server reads the
// pages from disk at every request, so a run beside this one rebuilding dist/web would change them
// under it. The server code (dist/node) is read once at start.
function build(webDir) {
  console.log('Building the app (vite build into this run\'s folder, tsc -p tsconfig.build.json)…');
  const bin = (name) => path.join(root, 'node_modules', '.bin', name);
  const web = spawnSync(bin('vite'), ['build', '--outDir', webDir, '--emptyOutDir'], { cwd: root, stdio: 'inherit' });
  if (web.status !== 0) {
    rmSync(webDir, { recursive: true, force: true });
    fail('The web build failed, so the browser tests cannot run.');
  }
  const server = spawnSync(bin('tsc'), ['-p', 'tsconfig.build.json'], { cwd: root, stdio: 'inherit' });
  if (server.status !== 0) {
    rmSync(webDir, { recursive: true, force: true });
    fail('The server build failed, so the browser tests cannot run.');
  }
}

function freePort() {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address();
      probe.close(() => resolve(port));
    });
  });
}

// Its own capture port, so that runs side by side never deliver into each other's outbox; and never
// a real SMTP host from the caller's environment, so the tests' mail stays in the built-in capture.
function testEnv(port, smtpPort, dataDir, webDir) {
  const env = { ...process.env, DRIFTLINE_DATA_DIR: dataDir, DRIFTLINE_WEB_DIR: webDir, PORT: String(port), DRIFTLINE_SMTP_PORT: String(smtpPort), HOST: '127.0.0.1', NODE_ENV: 'production', LOG_LEVEL: 'warn' };
  delete env.DRIFTLINE_SMTP_HOST;
  return env;
}

function startServer(port, smtpPort, dataDir, webDir) {
  const entry = path.join(root, 'dist', 'node', 'server', 'index.js');
  if (!existsSync(entry)) throw new Error(`The build did not produce ${path.relative(root, entry)}.`);
  // Detached: the server leads its own process group, so everything it starts is stopped with it.
  const child = spawn(process.execPath, [entry], {
    cwd: root,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: testEnv(port, smtpPort, dataDir, webDir),
  });
  const output = [];
  child.stdout.on('data', (chunk) => output.push(chunk.toString()));
  child.stderr.on('data', (chunk) => output.push(chunk.toString()));
  return { child, output };
}

async function stopServer(server) {
  if (!server || server.child.exitCode !== null) return;
  const exited = new Promise((resolve) => server.child.once('exit', resolve));
  try {
    process.kill(-server.child.pid, 'SIGTERM');
  } catch {
    return;
  }
  const timeout = new Promise((resolve) => setTimeout(() => resolve('timeout'), 5000));
  if ((await Promise.race([exited, timeout])) === 'timeout') {
    try {
      process.kill(-server.child.pid, 'SIGKILL');
    } catch {
      // Already gone.
    }
  }
}

// Throws rather than exiting, so that the caller still stops the server and removes the temporary folders.
async function waitForHealth(baseUrl, server) {
  // Generous: the first start creates the database, runs migrations and hashes the demo passwords, on a shared machine.
  const deadline = Date.now() + 120_000;
  while (Date.now() < deadline) {
    if (server.child.exitCode !== null) throw new Error(`The server stopped before it was ready:\n${server.output.join('')}`);
    try {
      const response = await fetch(`${baseUrl}/api/health`);
      if (response.ok) return;
    } catch {
      // Not listening yet.
    }
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`The server did not answer GET /api/health within 120 s:\n${server.output.join('')}`);
}

// `node tests/e2e/run-e2e.mjs map-diff` runs only the files whose name contains "map-diff"; no argument runs all.
const nameFilter = process.argv[2] ?? '';

async function loadTests() {
  const files = readdirSync(here).filter((f) => f.endsWith('.e2e.mjs') && f.includes(nameFilter)).sort();
  const tests = [];
  for (const file of files) {
    const module = await import(pathToFileURL(path.join(here, file)).href);
    for (const test of module.tests ?? []) tests.push({ ...test, file });
  }
  if (tests.length === 0) throw new Error(`No browser tests found (tests/e2e/*${nameFilter}*.e2e.mjs export \`tests\`).`);
  return tests;
}

async function main() {
  ensureChromium();
  const { chromium } = await import('playwright-core');
  const webDir = mkdtempSync(path.join(tmpdir(), 'driftline-e2e-web-'));
  build(webDir);
  mkdirSync(screenshotDir, { recursive: true });

  const dataDir = mkdtempSync(path.join(tmpdir(), 'driftline-e2e-data-'));
  const profileDir = mkdtempSync(path.join(tmpdir(), 'driftline-e2e-profile-'));
  const port = await freePort();
  let smtpPort = await freePort();
  while (smtpPort === port) smtpPort = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  let server;
  let context;
  let passed = 0;
  let failed = 0;

  const cleanUp = async () => {
    await context?.close().catch(() => {});
    await stopServer(server);
    rmSync(dataDir, { recursive: true, force: true });
    rmSync(profileDir, { recursive: true, force: true });
    rmSync(webDir, { recursive: true, force: true });
  };
  const onSignal = (signal) => {
    void cleanUp().finally(() => process.exit(signal === 'SIGINT' ? 130 : 143));
  };
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);

  try {
    server = startServer(port, smtpPort, dataDir, webDir);
    await waitForHealth(baseUrl, server);
    console.log(`Server ready at ${baseUrl}; running browser tests.`);

    const tests = await loadTests();
    context = await chromium.launchPersistentContext(profileDir, {
      executablePath: chromiumPath,
      headless: true,
      viewport: { width: 1366, height: 860 },
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    // Tests hand each other what they created (e.g. an invitation link), in file order.
    const shared = {};
    for (const test of tests) {
      await context.clearCookies();
      const page = await context.newPage();
      const pageErrors = [];
      page.on('pageerror', (error) => pageErrors.push(error.message));
      const started = Date.now();
      try {
        await test.run({ page, context, baseUrl, shared, screenshot: (name, { fullPage = true } = {}) => page.screenshot({ path: path.join(screenshotDir, name), fullPage, animations: 'disabled' }) });
        if (pageErrors.length > 0) throw new Error(`the page threw: ${pageErrors.join('; ')}`);
        passed++;
        console.log(`  ✓ ${test.name} (${Date.now() - started} ms)`);
      } catch (error) {
        failed++;
        console.log(`  ✗ ${test.name}\n      ${error instanceof Error ? error.message.split('\n').join('\n      ') : String(error)}`);
        await page.screenshot({ path: path.join(screenshotDir, `failed-${test.file.replace(/\.e2e\.mjs$/, '')}-${passed + failed}.png`), fullPage: true }).catch(() => {});
      } finally {
        await page.close().catch(() => {});
      }
    }
  } catch (error) {
    failed++;
    console.log(`  ✗ browser test setup\n      ${error instanceof Error ? error.message : String(error)}`);
  } finally {
    await cleanUp();
  }

  console.log(`${passed} passed, ${failed} failed`);
  process.exit(failed === 0 ? 0 : 1);
}

await main();
