import 'reflect-metadata';
import { mkdirSync } from 'node:fs';
import type { Server } from 'node:http';
import pino from 'pino';
import { scheduleJobs } from '../jobs/index.js';
import { createApp } from './app.js';
import { loadConfig } from './config.js';
import { openDatabase } from './data-source.js';
import { startMailCapture, type MailCapture } from './mail/capture.js';
import { smtpTransport } from './mail/transport.js';
import { DEMO_DAYS, demoEvidencePending, seedDemoAccounts, seedDemoEvidence, seedDemoRemap } from './services/demo-seed.service.js';
import { removeLeftoverUploads } from './services/upload-scratch.js';

// Entry point: config → data source → app → listen; graceful stop on SIGTERM/SIGINT.
async function main() {
  const config = loadConfig();
  const log = pino({ level: config.logLevel, ...(config.env === 'development' ? { transport: { target: 'pino-pretty' } } : {}) });
  mkdirSync(config.dataDir, { recursive: true });
  const dataSource = await openDatabase({ database: config.databasePath });
  const { app, services } = createApp({ config, dataSource, log });
  await services.ingest.failInterrupted();
  const leftUploads = await removeLeftoverUploads(config.dataDir);
  if (leftUploads > 0) log.info({ files: leftUploads }, 'removed the files of uploads a stopped server left behind');
  await services.jobRuns.failInterrupted();
  if (config.seedDemo) await seedDemoAccounts(dataSource, log);
  // No SMTP host configured: mail goes to the built-in capture server and shows in the admin outbox.
  // A port already taken (another Driftline on this machine) must not stop the app nor hand our mail to
  // the other one's capture: fall back to a free port and send there.
  const capture: MailCapture | null =
    config.smtp.host === null
      ? await startMailCapture(dataSource, config.smtp.port, log).catch((err) => {
          log.warn({ err, port: config.smtp.port }, 'the mail capture port is taken; capturing on a free port instead');
          return startMailCapture(dataSource, 0, log);
        })
      : null;
  if (capture && capture.port !== config.smtp.port) services.mail.useTransport(smtpTransport({ ...config.smtp, port: capture.port }));
  const server: Server = app.listen(config.port, config.host, () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.port;
    log.info({ dataDir: config.dataDir }, `Driftline listening on http://${config.host}:${port}`);
    // Plain line too, for people and scripts reading the console.
    console.log(`Driftline listening on http://${config.host}:${port}`);
  });

  // The demo's weeks of simulated scans take a while to count: serve meanwhile, report progress
  // on /api/health, and pick up where a restart left off.
  if (config.seedDemo && config.seedDemoEvidence && (await demoEvidencePending(dataSource))) {
    log.info('loading the demo scenario’s maps and simulated scans in the background');
    seedDemoEvidence(dataSource, services, log, new Date(), DEMO_DAYS, services.demoSeed)
      // The demo should open with zones and flags, not wait for the first night.
      .then(() => services.jobRuns.detect('startup'))
      .then(() => seedDemoRemap(dataSource, services, log))
      .catch((err) => {
        services.demoSeed.state = 'failed';
        log.error({ err }, 'the demo evidence could not be loaded');
      });
  }
  const jobs = scheduleJobs({ services, dataSource, log });

  // Idle keep-alive connections stay open longer than a load balancer's (common practice: above its
  // 60 s), so a client never reuses a connection the server is closing at that moment.
  server.keepAliveTimeout = 65_000;
  server.headersTimeout = 66_000;

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info({ signal }, 'stopping');
    const force = setTimeout(() => process.exit(1), 10_000).unref();
    server.close(async () => {
      await jobs.stop();
      await capture?.close();
      await dataSource.destroy();
      clearTimeout(force);
      process.exit(0);
    });
    server.closeIdleConnections();
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
