import 'reflect-metadata';
import pino from 'pino';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import { createApp, type AppBundle } from '../../../server/app.js';
import { testConfig, type Config } from '../../../server/config.js';
import { openDatabase } from '../../../server/data-source.js';
import { Organization, Robot, Site, User } from '../../../server/entities/index.js';
import { DEMO_ACCOUNTS, seedDemoAccounts } from '../../../server/services/demo-seed.service.js';

/** A fresh app over a fresh in-memory database that ran every migration. */
export interface TestApp extends AppBundle {
  dataSource: DataSource;
  config: Config;
  close(): Promise<void>;
}

/** Creates the app on an empty in-memory SQLite database; seeds the demo accounts and sites (no evidence) unless told not to. */
export async function createTestApp({ seed = true, config = {} as Partial<Config> } = {}): Promise<TestApp> {
  const cfg = testConfig(config);
  const dataSource = await openDatabase({ database: ':memory:' });
  const log = pino({ level: 'silent' });
  if (seed) await seedDemoAccounts(dataSource, log);
  const bundle = createApp({ config: cfg, dataSource, log });
  return { ...bundle, dataSource, config: cfg, close: () => dataSource.destroy() };
}

/** The demo account of a role (for site_manager: Ambergate's unless `corvane`). */
export function demoAccount(role: string, corvane = false) {
  const account = DEMO_ACCOUNTS.find((a) => a.role === role && (role !== 'site_manager' || a.org.startsWith(corvane ? 'Corvane' : 'Ambergate')));
  if (!account) throw new Error(`no demo account for ${role}`);
  return account;
}

/** Signs in and returns the session cookie header value. */
export async function signIn(app: AppBundle['app'], email: string, password: string): Promise<string> {
  const res = await request(app).post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} answered ${res.status}: ${JSON.stringify(res.body)}`);
  const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('driftline_session='));
  return cookie!.split(';')[0];
}

/** Ids of demo rows that tests address. */
export async function demoIds(db: DataSource) {
  const org = async (name: string) => (await db.getRepository(Organization).findOneByOrFail({ name })).id;
  const ambergate = await org('Ambergate Provisions');
  const corvane = await org('Corvane Parts & Supply');
  const ambergateSite = await db.getRepository(Site).findOneByOrFail({ name: 'Fennick Cross DC' });
  const corvaneSite = await db.getRepository(Site).findOneByOrFail({ name: 'Lowen Harbour Hub' });
  const ambergateRobot = await db.getRepository(Robot).findOneByOrFail({ siteId: ambergateSite.id, name: 'AMR-01' });
  const corvaneRobot = await db.getRepository(Robot).findOneByOrFail({ siteId: corvaneSite.id, name: 'AMR-01' });
  const priya = await db.getRepository(User).findOneByOrFail({ email: 'priya.manager@corvane.example' });
  const iris = await db.getRepository(User).findOneByOrFail({ email: 'iris.admin@kestrelway.example' });
  const admin = { id: iris.id, email: iris.email, name: iris.name, role: iris.role, organizationId: iris.organizationId };
  return { admin, ambergate, corvane, ambergateSite: ambergateSite.id, corvaneSite: corvaneSite.id, ambergateRobot: ambergateRobot.id, corvaneRobot: corvaneRobot.id, priya: priya.id };
}
