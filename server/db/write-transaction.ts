import { Transaction, type Sequelize } from 'sequelize';

/*
 * Every service write runs through here: one at a time per database handle, each in an IMMEDIATE transaction.
 * Never call it from inside another write transaction (it would wait for itself): pass the open transaction on.
 * - SQLite allows one writer. BEGIN IMMEDIATE takes the write lock up front, so two writers queue on the
 *   busy timeout instead of failing when a read lock cannot be upgraded (a DEFERRED transaction's failure mode).
 * - Sequelize shares a single connection for an in-memory database, where a second BEGIN on the same connection
 *   fails outright; the in-process queue keeps concurrent requests from overlapping there.
 */
/*
 * PostgreSQL has no single writer of its own, and several application processes may share one database. Each
 * write transaction first takes one transaction-scoped advisory lock, so writes stay one at a time across every
 * process, as SQLite's write lock keeps them: the code's read-then-write steps (accession numbers, optimistic
 * versions, "no other open case" checks) see no concurrent writer. The lock ends with the commit or rollback.
 * The in-process queue stays too, so waiting writers do not each hold a pooled connection.
 */
const WRITE_LOCK = 0x63726973; // any fixed key; "cris"

const queues = new WeakMap<Sequelize, Promise<unknown>>();

export async function writeTransaction<T>(sequelize: Sequelize, work: (t: Transaction) => Promise<T>): Promise<T> {
  const previous = queues.get(sequelize) ?? Promise.resolve();
  const run = previous.catch(() => undefined).then(() =>
    sequelize.getDialect() === 'postgres'
      ? sequelize.transaction(async (t) => {
          await sequelize.query(`SELECT pg_advisory_xact_lock(${WRITE_LOCK})`, { transaction: t });
          return work(t);
        })
      : sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, work),
  );
  queues.set(sequelize, run.catch(() => undefined));
  return run;
}

/** Runs inside the caller's transaction when one is given, otherwise in a queued write transaction of its own. */
export async function withWriteTransaction<T>(
  sequelize: Sequelize,
  transaction: Transaction | undefined,
  work: (t: Transaction) => Promise<T>,
): Promise<T> {
  return transaction ? work(transaction) : writeTransaction(sequelize, work);
}
