import { spawn, type ChildProcess } from 'node:child_process';
import { closeSync, openSync, readFileSync } from 'node:fs';
import { mkdir } from 'node:fs/promises';
import { request } from 'node:http';
import net from 'node:net';
import path from 'node:path';
import { build } from 'esbuild';

/** A free TCP port on 127.0.0.1 (the OS picks it; another process may take it before we do). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
    s.on('error', reject);
  });
}

/**
 * Bundles server/index.ts into one ES module at `<outDir>/server/index.mjs` (packages stay
 * external, so node_modules is resolved from the checkout; server/ one level below the output
 * folder keeps app.ts's package.json lookup working). Returns the file's path.
 */
export async function bundleServer(outDir: string): Promise<string> {
  // One file loads in about a second, where tsx transforms every module on each start; a test
  // that restarts the server dozens of times spends that difference every time.
  const outfile = path.join(outDir, 'server', 'index.mjs');
  await mkdir(path.dirname(outfile), { recursive: true });
  await build({ entryPoints: ['server/index.ts'], bundle: true, platform: 'node', format: 'esm', packages: 'external', target: 'node20', outfile, logLevel: 'warning', tsconfig: 'tsconfig.json' });
  return outfile;
}

/** One answer of the server, its body parsed as JSON when it is JSON. */
export interface HttpAnswer {
  status: number;
  body: unknown;
}

/**
 * Sends one request on a connection of its own (no keep-alive pool, so a connection to a killed
 * server is never reused); rejects when the connection fails or breaks before the whole answer.
 * `onStatus` hears the status line as soon as it arrives, before the body.
 */
export function httpRequest(url: string, options: { method?: string; headers?: Record<string, string>; body?: string | Buffer; onStatus?: (status: number) => void } = {}): Promise<HttpAnswer> {
  return new Promise((resolve, reject) => {
    const req = request(url, { method: options.method ?? 'GET', headers: options.headers, agent: false }, (res) => {
      options.onStatus?.(res.statusCode ?? 0);
      const parts: Buffer[] = [];
      res.on('data', (c: Buffer) => parts.push(c));
      res.on('error', reject);
      res.on('aborted', () => reject(new Error('the answer was cut off')));
      res.on('end', () => {
        if (!res.complete) return reject(new Error('the answer was cut off'));
        const text = Buffer.concat(parts).toString('utf8');
        let body: unknown = text;
        if ((res.headers['content-type'] ?? '').includes('json')) {
          try {
            body = JSON.parse(text);
          } catch {
            return reject(new Error(`the answer is not the JSON it says it is: ${text.slice(0, 200)}`));
          }
        }
        resolve({ status: res.statusCode ?? 0, body });
      });
    });
    req.on('error', reject);
    req.end(options.body);
  });
}

/** Settings of a real server process on its own data directory and port. */
export interface ServerProcessOptions {
  /** Node arguments that start the server, e.g. [bundle] or ['--import', 'tsx', 'server/index.ts']. */
  args: string[];
  dataDir: string;
  port: number;
  smtpPort: number;
  /** stdout and stderr of every start are appended here. */
  logFile: string;
  /** Extra environment (defaults: production, demo accounts without demo evidence, log level warn). */
  env?: Record<string, string>;
}

/**
 * A Driftline server run as a child process, started, killed (SIGKILL) and started again on the
 * same data directory and port, as an operator's supervisor would.
 */
export class ServerProcess {
  private child: ChildProcess | null = null;
  private exited: Promise<void> = Promise.resolve();

  constructor(private readonly options: ServerProcessOptions) {}

  /** http://127.0.0.1:<port> */
  get baseUrl(): string {
    return `http://127.0.0.1:${this.options.port}`;
  }

  /** True while a started process has not exited. */
  get running(): boolean {
    return this.child !== null;
  }

  /** Starts the process without waiting for it to answer. */
  spawn(): void {
    if (this.child) throw new Error('the server is already running');
    const o = this.options;
    const log = openSync(o.logFile, 'a');
    const child = spawn(process.execPath, o.args, {
      env: { ...process.env, NODE_ENV: 'production', DRIFTLINE_DATA_DIR: o.dataDir, PORT: String(o.port), HOST: '127.0.0.1', DRIFTLINE_SMTP_PORT: String(o.smtpPort), DRIFTLINE_SEED_DEMO: 'true', DRIFTLINE_DEMO_EVIDENCE: 'false', LOG_LEVEL: 'warn', ...o.env },
      stdio: ['ignore', log, log],
    });
    closeSync(log);
    this.child = child;
    this.exited = new Promise((resolve) => child.once('exit', () => resolve()));
    void this.exited.then(() => {
      if (this.child === child) this.child = null;
    });
  }

  /** Polls GET /api/health until it answers 200; false when the process exits first or `give up` says so. Throws after timeoutMs. */
  async waitHealthy(timeoutMs = 60_000, giveUp: () => boolean = () => false): Promise<boolean> {
    const until = Date.now() + timeoutMs;
    while (Date.now() < until) {
      if (!this.child || giveUp()) return false;
      const ok = await httpRequest(`${this.baseUrl}/api/health`).then((a) => a.status === 200, () => false);
      if (ok) return true;
      await new Promise((r) => setTimeout(r, 20));
    }
    throw new Error(`The server did not answer GET /api/health within ${timeoutMs / 1000} s; its log ends:\n${this.logTail()}`);
  }

  /** Starts the process and waits until it is healthy; returns the milliseconds that took. */
  async start(): Promise<number> {
    const t0 = performance.now();
    this.spawn();
    if (!(await this.waitHealthy())) throw new Error(`The server stopped while starting; its log ends:\n${this.logTail()}`);
    return performance.now() - t0;
  }

  /** Kills the process with SIGKILL (no chance to clean up) and waits until it is gone. */
  async kill(): Promise<void> {
    await this.signal('SIGKILL');
  }

  /** Asks the process to stop (SIGTERM) and waits until it is gone. */
  async stop(): Promise<void> {
    await this.signal('SIGTERM');
  }

  private async signal(sig: NodeJS.Signals) {
    const child = this.child;
    if (!child) return;
    child.kill(sig);
    await this.exited;
  }

  /** The last lines of the log file. */
  logTail(lines = 40): string {
    return readFileSync(this.options.logFile, 'utf8').split('\n').slice(-lines).join('\n');
  }
}
