import { mkdtempSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pino from 'pino';
import { createApp } from '../../server/app.js';
import { testConfig } from '../../server/config.js';
import { openDatabase } from '../../server/data-source.js';
import { restoreDatabase } from '../../server/services/backup-restore.js';
import { DEMO_DAYS, seedDemoAccounts, seedDemoEvidence } from '../../server/services/demo-seed.service.js';

// Backup and restore of the demo database: seeds the full demo (accounts, five sites' maps and
// DEMO_DAYS days of simulated scans, as `npm start` does on first start) into a fresh data
// directory, then times online backups (idle, and while rows are being written), the restore into
// another directory, and prints the sizes. BENCH_BACKUP_DAYS shortens the demo for a quick look.

const mb = (bytes: number) => (bytes / 1024 / 1024).toFixed(1);
const DAYS = Number(process.env.BENCH_BACKUP_DAYS ?? DEMO_DAYS);

/** Prints the demo database's size, backup time and size (idle and under writes), the longest event-loop stall during a backup, and restore time. */
export async function run(): Promise<void> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'driftline-bench-backup-'));
  const restoreDir = mkdtempSync(path.join(os.tmpdir(), 'driftline-bench-restore-'));
  const log = pino({ level: 'silent' });
  try {
    const databasePath = path.join(dir, 'driftline.sqlite');
    const dataSource = await openDatabase({ database: databasePath });
    await seedDemoAccounts(dataSource, log);
    const { services } = createApp({ config: testConfig({ dataDir: dir, databasePath }), dataSource, log });
    const seedStarted = performance.now();
    await seedDemoEvidence(dataSource, services, log, new Date(), DAYS);
    await services.jobRuns.detect('startup');
    console.log(`demo seeded (${DAYS} days, 5 sites) in ${((performance.now() - seedStarted) / 1000).toFixed(0)} s`);
    // Fold the write-ahead log into the file so that its size is the database's.
    await dataSource.query('PRAGMA wal_checkpoint(TRUNCATE)');
    console.log(`database file: ${mb(statSync(databasePath).size)} MB`);

    for (let k = 1; k <= 3; k++) {
      const f = await services.backups.create(new Date(Date.UTC(2026, 11, k, 2, 45)));
      console.log(`backup ${k} (idle): ${f.durationMs} ms for ${mb(f.bytes)} MB (${f.pages} pages, integrity check included)`);
    }

    // Under writes: a writer inserting rows and a timer measuring how long the event loop is held.
    let stop = false;
    let writes = 0;
    let worstStallMs = 0;
    let last = performance.now();
    const probe = setInterval(() => {
      const now = performance.now();
      worstStallMs = Math.max(worstStallMs, now - last - 5);
      last = now;
    }, 5);
    const writer = (async () => {
      while (!stop) {
        await dataSource.query(`INSERT INTO audit_events (at, action, target_type, summary) VALUES (datetime('now'), 'bench.write', 'bench', 'row written during a backup')`);
        writes++;
        await new Promise((r) => setImmediate(r));
      }
    })();
    const busy = await services.backups.create(new Date(Date.UTC(2026, 11, 4, 2, 45)));
    stop = true;
    await writer;
    clearInterval(probe);
    console.log(`backup under writes: ${busy.durationMs} ms for ${mb(busy.bytes)} MB; ${writes} rows written meanwhile; longest event-loop stall ${worstStallMs.toFixed(0)} ms`);
    await dataSource.destroy();

    const file = path.join(services.backups.directory, busy.file);
    const started = performance.now();
    const restored = restoreDatabase({ file, databasePath: path.join(restoreDir, 'driftline.sqlite') });
    console.log(`restore into a fresh data directory: ${(performance.now() - started).toFixed(0)} ms for ${mb(restored.bytes)} MB (checks and copy)`);
    const again = performance.now();
    const over = restoreDatabase({ file, databasePath: path.join(restoreDir, 'driftline.sqlite') });
    console.log(`restore over an existing database: ${(performance.now() - again).toFixed(0)} ms (kept ${over.kept.map((k) => path.basename(k)).join(', ')})`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
    rmSync(restoreDir, { recursive: true, force: true });
  }
}
