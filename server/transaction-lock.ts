import { AsyncLocalStorage } from 'node:async_hooks';
import type { DataSource } from 'typeorm';

// TypeORM's better-sqlite3 driver runs every query, from every request, on one connection, and
// turns a transaction started while another is open into a SAVEPOINT of it. Two requests that
// await inside their transactions would then share one: a rollback of either could undo the
// other's writes. This lock makes a transaction exclusive: queries outside it wait until it
// ends, queries inside it (same async context) pass, and a transaction waits for queries in
// flight to finish before it begins. Turns are taken in order of arrival: a query that arrives
// after a waiting transaction waits for it, so a steady stream of reads cannot keep a write out.

interface LockState {
  /** Queries running outside any transaction. */
  inFlight: number;
  /** Context token of the open transaction, if any. */
  owner: symbol | null;
  /** Resolves when the state may have changed; waiters re-check. */
  waiters: Array<() => void>;
  /** Arrival numbers of the transactions waiting for their turn, oldest first. */
  queued: number[];
  /** The next arrival number. */
  arrivals: number;
}

const context = new AsyncLocalStorage<symbol>();
const states = new WeakMap<DataSource, LockState>();

function wake(state: LockState) {
  const waiters = state.waiters.splice(0);
  for (const w of waiters) w();
}

const changed = (state: LockState) => new Promise<void>((resolve) => state.waiters.push(resolve));

async function acquireExclusive(state: LockState): Promise<symbol> {
  const ticket = state.arrivals++;
  state.queued.push(ticket);
  while (state.owner !== null || state.inFlight > 0 || state.queued[0] !== ticket) await changed(state);
  state.queued.shift();
  const token = Symbol('transaction');
  state.owner = token;
  return token;
}

/** True while a query that arrived as `ticket` must wait: a transaction runs, or one that arrived earlier waits. */
const queryWaits = (state: LockState, ticket: number) => state.owner !== null || (state.queued.length > 0 && state.queued[0] < ticket);

function releaseExclusive(state: LockState) {
  state.owner = null;
  wake(state);
}

/** Patches the DataSource so transactions never interleave with other queries; call once after initialize. */
export function installTransactionLock(dataSource: DataSource): void {
  const state: LockState = { inFlight: 0, owner: null, waiters: [], queued: [], arrivals: 0 };
  states.set(dataSource, state);

  const runner = dataSource.driver.createQueryRunner('master');
  const query = runner.query.bind(runner);
  runner.query = (async (...args: Parameters<typeof query>) => {
    if (state.owner !== null && context.getStore() === state.owner) return query(...args);
    const ticket = state.arrivals++;
    while (queryWaits(state, ticket)) await changed(state);
    state.inFlight++;
    try {
      return await query(...args);
    } finally {
      state.inFlight--;
      if (state.inFlight === 0) wake(state);
    }
  }) as typeof runner.query;

  const transaction = dataSource.transaction.bind(dataSource) as (...a: unknown[]) => Promise<unknown>;
  dataSource.transaction = (async (...args: unknown[]) => {
    const current = context.getStore();
    // A transaction inside one's own transaction is a savepoint of it, as TypeORM intends.
    if (current !== undefined && current === state.owner) return transaction(...args);
    const token = await acquireExclusive(state);
    try {
      return await context.run(token, () => transaction(...args));
    } finally {
      releaseExclusive(state);
    }
  }) as DataSource['transaction'];
}

/** Runs `fn` with the database to itself: for synchronous raw-handle transactions on hot paths. */
export async function exclusive<T>(dataSource: DataSource, fn: () => T): Promise<T> {
  const state = states.get(dataSource);
  if (!state) return fn();
  const token = await acquireExclusive(state);
  try {
    return await context.run(token, fn);
  } finally {
    releaseExclusive(state);
  }
}
