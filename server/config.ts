import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { z } from 'zod';

const bool = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

// The only reader of process.env: every setting is validated here, once, with its default.
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('production'),
  HOST: z.string().min(1).default('127.0.0.1'),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  DRIFTLINE_DATA_DIR: z.string().min(1).default('./data'),
  DRIFTLINE_BASE_URL: z.url().optional(),
  DRIFTLINE_SESSION_SECRET: z.string().min(32).optional(),
  DRIFTLINE_SEED_DEMO: bool.default(true),
  DRIFTLINE_DEMO_EVIDENCE: bool.default(true),
  DRIFTLINE_TRUST_PROXY: bool.default(false),
  DRIFTLINE_WEB_DIR: z.string().optional(),
  DRIFTLINE_SMTP_HOST: z.string().optional(),
  DRIFTLINE_SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
  DRIFTLINE_SMTP_SECURE: bool.default(false),
  DRIFTLINE_SMTP_USER: z.string().optional(),
  DRIFTLINE_SMTP_PASSWORD: z.string().optional(),
  DRIFTLINE_MAIL_FROM: z.string().default('Driftline <driftline@localhost>'),
  DRIFTLINE_BACKUP_KEEP: z.coerce.number().int().min(1).max(365).default(7),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
});

/** Validated, typed settings of one server process. */
export interface Config {
  env: 'development' | 'production' | 'test';
  host: string;
  port: number;
  dataDir: string;
  /** SQLite file, or ':memory:' in tests. */
  databasePath: string;
  baseUrl: string;
  secureCookies: boolean;
  /** Secret for signed links (unsubscribe, password reset): from the environment or a file in the data directory. */
  sessionSecret: string;
  seedDemo: boolean;
  /** With seedDemo: also load the demo's simulated maps and weeks of scans (in the background). */
  seedDemoEvidence: boolean;
  trustProxy: boolean;
  webDir: string;
  smtp: { host: string | null; port: number; secure: boolean; user?: string; password?: string; from: string };
  logLevel: string;
  /** Nightly database backups kept in `<dataDir>/backups` (the newest ones; product default 7). */
  backupKeep: number;
  /** Failed sign-in attempts allowed per 15 minutes: per address and per account. */
  signInLimits: { perAddress: number; perAccount: number };
}

/** Reads and validates the environment; throws one readable message listing every bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    throw new Error(`Driftline cannot start, the configuration is invalid:\n${z.prettifyError(parsed.error)}`);
  }
  const e = parsed.data;
  const dataDir = path.resolve(e.DRIFTLINE_DATA_DIR);
  const baseUrl = (e.DRIFTLINE_BASE_URL ?? `http://${e.HOST}:${e.PORT}`).replace(/\/$/, '');
  return {
    env: e.NODE_ENV,
    host: e.HOST,
    port: e.PORT,
    dataDir,
    databasePath: path.join(dataDir, 'driftline.sqlite'),
    baseUrl,
    secureCookies: baseUrl.startsWith('https://'),
    sessionSecret: e.DRIFTLINE_SESSION_SECRET ?? readOrCreateSecret(dataDir),
    seedDemo: e.DRIFTLINE_SEED_DEMO,
    seedDemoEvidence: e.DRIFTLINE_DEMO_EVIDENCE,
    trustProxy: e.DRIFTLINE_TRUST_PROXY,
    webDir: path.resolve(e.DRIFTLINE_WEB_DIR ?? 'dist/web'),
    smtp: {
      host: e.DRIFTLINE_SMTP_HOST ?? null,
      port: e.DRIFTLINE_SMTP_PORT,
      secure: e.DRIFTLINE_SMTP_SECURE,
      user: e.DRIFTLINE_SMTP_USER,
      password: e.DRIFTLINE_SMTP_PASSWORD,
      from: e.DRIFTLINE_MAIL_FROM,
    },
    logLevel: e.LOG_LEVEL,
    backupKeep: e.DRIFTLINE_BACKUP_KEEP,
    signInLimits: { perAddress: 30, perAccount: 8 },
  };
}

/** Settings for tests: in-memory database, no demo seed, silent logs; override what a test needs. */
export function testConfig(overrides: Partial<Config> = {}): Config {
  return {
    env: 'test',
    host: '127.0.0.1',
    port: 0,
    dataDir: path.join(os.tmpdir(), 'driftline-test'),
    databasePath: ':memory:',
    baseUrl: 'http://127.0.0.1:3000',
    secureCookies: false,
    sessionSecret: 'test-secret-test-secret-test-secret-0123',
    seedDemo: false,
    seedDemoEvidence: false,
    trustProxy: false,
    webDir: path.resolve('dist/web'),
    smtp: { host: null, port: 2525, secure: false, from: 'Driftline <driftline@localhost>' },
    logLevel: 'silent',
    backupKeep: 7,
    signInLimits: { perAddress: 1000, perAccount: 1000 },
    ...overrides,
  };
}

// Keeping the secret in the data directory means a restart keeps signed links valid without
// asking the operator to set anything on embedded defaults.
function readOrCreateSecret(dataDir: string): string {
  const file = path.join(dataDir, 'secret.key');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(32).toString('base64url');
  writeFileSync(file, secret + '\n', { mode: 0o600 });
  return secret;
}
