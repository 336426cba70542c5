import { AsyncLocalStorage } from 'node:async_hooks';
import type { DataSource } from 'typeorm';

/**
 * One transaction at a time on SQLite. TypeORM's better-sqlite3 driver has one connection and one query
 * runner for the whole app, so transactions that overlapped in time (two ingest jobs, a `save` during a
 * batch change) shared it: the second became a savepoint of the first, or both sent BEGIN and the
 * loser's ROLLBACK undid the winner's work while the winner went on in autocommit and then failed to
 * commit. Now a transaction waits for its turn while another is open. One started inside an open
 * transaction's callback (the same async context) nests in it as before.
 *
 * Plain statements outside any transaction are not held back: on one connection they join whatever
 * transaction is open at that moment, as they always did.
 */
export function serialiseSqliteTransactions(dataSource: DataSource): void {
  const runner = dataSource.createQueryRunner(); // the driver's one shared runner
  const manager = dataSource.manager;
  const context = new AsyncLocalStorage<symbol>();
  /** The transaction (by its callback's async context) that has the turn, if started by a callback. */
  let holder: symbol | null = null;
  let tail: Promise<void> = Promise.resolve();
  /** Hands the turn on when a transaction started on the runner itself (`save`'s own) ends. */
  let endRunnerTurn: (() => void) | null = null;

  const takeTurn = async (): Promise<() => void> => {
    let release!: () => void;
    const previous = tail;
    tail = new Promise<void>((resolve) => (release = resolve));
    await previous;
    return release;
  };
  const insideHolder = () => holder !== null && context.getStore() === holder;
  const handOnRunnerTurn = () => {
    const release = endRunnerTurn;
    endRunnerTurn = null;
    release?.();
  };

  const transaction = manager.transaction.bind(manager) as (...args: unknown[]) => Promise<unknown>;
  (manager as { transaction: unknown }).transaction = async (...args: unknown[]) => {
    if (insideHolder()) return transaction(...args);
    const release = await takeTurn();
    const token = Symbol('transaction');
    holder = token;
    try {
      return await context.run(token, () => transaction(...args));
    } finally {
      holder = null;
      release();
    }
  };

  const start = runner.startTransaction.bind(runner);
  const commit = runner.commitTransaction.bind(runner);
  const rollback = runner.rollbackTransaction.bind(runner);
  runner.startTransaction = async (isolationLevel) => {
    if (insideHolder()) return start(isolationLevel);
    endRunnerTurn = await takeTurn();
    try {
      await start(isolationLevel);
    } catch (err) {
      handOnRunnerTurn();
      throw err;
    }
  };
  runner.commitTransaction = async () => {
    try {
      await commit();
    } finally {
      if (!runner.isTransactionActive) handOnRunnerTurn();
    }
  };
  runner.rollbackTransaction = async () => {
    try {
      await rollback();
    } finally {
      if (!insideHolder()) handOnRunnerTurn();
    }
  };
}
