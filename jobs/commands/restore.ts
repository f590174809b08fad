import path from 'node:path';
import { loadConfig } from '../../server/config.js';
import { RestoreRefused, restoreDatabase } from '../../server/services/backup-restore.js';

const USAGE = `Usage: npm run restore -- FILE

Restores the backup FILE (e.g. data/backups/driftline-20261202T024500Z.sqlite) as the database of the
data directory (DRIFTLINE_DATA_DIR, default ./data). Stop the server first: the restore refuses while a
server holds the database. The current database is kept beside it as
driftline.sqlite.before-restore-<stamp>; migrations the backup lacks run when the server next starts.
`;

const mb = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(1)} MB`;

/** `restore FILE`: checks and restores a backup; 0 when restored, 1 when refused (with the reason), 2 on bad usage. */
export async function runRestore(argv: string[], env: NodeJS.ProcessEnv = process.env): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    process.stdout.write(USAGE);
    return 0;
  }
  if (argv.length !== 1 || argv[0].startsWith('-')) {
    process.stderr.write(`restore: name exactly one backup file.\n\n${USAGE}`);
    return 2;
  }
  // The restore signs nothing: a stand-in secret keeps loadConfig from writing secret.key into the data directory.
  const config = loadConfig({ ...env, DRIFTLINE_SESSION_SECRET: env.DRIFTLINE_SESSION_SECRET ?? 'restore-signs-nothing-'.padEnd(32, '-') });
  // npm runs scripts from the package folder; a relative FILE means the folder the command was typed in.
  const file = path.resolve(env.INIT_CWD ?? process.cwd(), argv[0]);
  const started = performance.now();
  try {
    const result = restoreDatabase({ file, databasePath: config.databasePath });
    const ms = Math.round(performance.now() - started);
    const lines = [
      `Restored ${result.file} (${mb(result.bytes)}, integrity check ok, ${result.migrationsInBackup} migrations) into ${result.databasePath} in ${ms} ms.`,
      result.kept.length > 0 ? `The database it replaced is kept as ${result.kept.join(', ')}.` : 'There was no database to replace.',
      result.pending.length > 0
        ? `${result.pending.length} migration(s) will run when the server next starts: ${result.pending.join(', ')}.`
        : 'The backup has every migration of this version; start the server.',
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
    return 0;
  } catch (err) {
    if (err instanceof RestoreRefused) {
      process.stderr.write(`restore: ${err.message}\nNothing was changed.\n`);
      return 1;
    }
    throw err;
  }
}
