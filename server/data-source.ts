import 'reflect-metadata';
import { DataSource } from 'typeorm';
import { entities } from './entities/index.js';
import { migrations } from './migrations/index.js';
import { installTransactionLock } from './transaction-lock.js';

/** Options for the one DataSource of a process. */
export interface DataSourceOptions {
  /** SQLite file path, or ':memory:'. */
  database: string;
  /** Only tests may synchronize; everything else runs the migrations. */
  synchronize?: boolean;
}

/** Creates (does not initialize) the DataSource over better-sqlite3 with WAL, a busy timeout and foreign keys. */
export function createDataSource({ database, synchronize = false }: DataSourceOptions): DataSource {
  return new DataSource({
    type: 'better-sqlite3',
    database,
    entities,
    migrations,
    synchronize,
    migrationsRun: false,
    enableWAL: database !== ':memory:',
    // Writers queue for up to 5 s instead of failing with "database is locked".
    timeout: 5000,
    prepareDatabase: (db: { pragma(s: string): unknown }) => {
      db.pragma('busy_timeout = 5000');
      db.pragma('synchronous = NORMAL');
    },
  });
}

/** Initializes the DataSource and brings the schema up to date with the migrations. */
export async function openDatabase(options: DataSourceOptions): Promise<DataSource> {
  const dataSource = createDataSource(options);
  await dataSource.initialize();
  if (!options.synchronize) await dataSource.runMigrations({ transaction: 'each' });
  installTransactionLock(dataSource);
  return dataSource;
}

// For the TypeORM CLI (migration:generate / migration:run): `-d server/data-source.ts`.
export default createDataSource({ database: process.env.DRIFTLINE_DB ?? './data/driftline.sqlite' });
