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
 * The in-process group commit below serves both databases, so waiting writers do not each hold a pooled
 * connection, and a group takes the advisory lock once.
 */
const WRITE_LOCK = 0x63726973; // any fixed key; "cris"

let waitingOrRunning = 0;
/** Write transactions queued or running in this process (server/lib/read-gate.ts gives them precedence). */
export const writesInFlight = (): number => waitingOrRunning;

export async function writeTransaction<T>(sequelize: Sequelize, work: (t: Transaction) => Promise<T>): Promise<T> {
  waitingOrRunning++;
  try {
    return await groupCommit(sequelize, work);
  } finally {
    waitingOrRunning--;
  }
}

/*
 * Group commit (SQLite and PostgreSQL). Writers that arrive while a transaction is open wait; when it ends, every waiting write
 * (up to MAX_GROUP) runs in ONE transaction, one after another in arrival order, and each is answered only after
 * that transaction has committed. Every write still sees the ones before it and nothing else, exactly as if each
 * had committed alone in that order, but the group pays for BEGIN and COMMIT once. Each statement costs a trip
 * through the thread pool and back to Node's busy event loop, so under load those two trips were a third of
 * every registration.
 * When a write in a group fails, the transaction is rolled back whole; the writes before it run again as a group
 * (they succeeded once on the same data), then the failing one alone (so it fails, or not, on its own, with its
 * own error), and the rest wait for the next group. A write's work must therefore be safe to run again after a
 * rollback: every write's effects are inside the transaction (mail goes through the outbox table; caches are
 * updated in afterCommit hooks, which run only after a commit).
 */
const MAX_GROUP = 32;
type Pending = { work: (t: Transaction) => Promise<unknown>; resolve: (v: unknown) => void; reject: (e: unknown) => void };
const waiting = new WeakMap<Sequelize, { queue: Pending[]; draining: boolean }>();

function groupCommit<T>(sequelize: Sequelize, work: (t: Transaction) => Promise<T>): Promise<T> {
  let state = waiting.get(sequelize);
  if (!state) waiting.set(sequelize, (state = { queue: [], draining: false }));
  const s = state;
  const result = new Promise<T>((resolve, reject) => s.queue.push({ work, resolve: resolve as (v: unknown) => void, reject }));
  if (!s.draining) void drain(sequelize, s);
  return result;
}

async function drain(sequelize: Sequelize, s: { queue: Pending[]; draining: boolean }): Promise<void> {
  s.draining = true;
  try {
    while (s.queue.length > 0) await runGroup(sequelize, s.queue.splice(0, MAX_GROUP), s.queue);
  } finally {
    // Synchronously after the last check of the queue: a write queued from here on starts a new drain.
    s.draining = false;
  }
}

/** One write transaction: SQLite's IMMEDIATE (the write lock up front), or PostgreSQL's with the advisory lock. */
const immediate = (sequelize: Sequelize, work: (t: Transaction) => Promise<unknown>) =>
  sequelize.getDialect() === 'postgres'
    ? sequelize.transaction(async (t) => {
        await sequelize.query(`SELECT pg_advisory_xact_lock(${WRITE_LOCK})`, { transaction: t });
        return work(t);
      })
    : sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, work);

async function runGroup(sequelize: Sequelize, group: Pending[], queue: Pending[]): Promise<void> {
  if (group.length === 1) {
    const [only] = group as [Pending];
    await immediate(sequelize, only.work).then(only.resolve, only.reject);
    return;
  }
  const results: unknown[] = [];
  try {
    await immediate(sequelize, async (t) => {
      for (const pending of group) results.push(await pending.work(t));
    });
  } catch {
    // results.length is the index of the write that failed (or the group failed at COMMIT, after all of them).
    const failed = Math.min(results.length, group.length - 1);
    queue.unshift(...group.slice(failed + 1));
    if (failed > 0) await runGroup(sequelize, group.slice(0, failed), queue);
    const culprit = group[failed]!;
    await immediate(sequelize, culprit.work).then(culprit.resolve, culprit.reject);
    return;
  }
  group.forEach((pending, i) => pending.resolve(results[i]));
}

/** Runs inside the caller's transaction when one is given, otherwise in a queued write transaction of its own. */
export async function withWriteTransaction<T>(
  sequelize: Sequelize,
  transaction: Transaction | undefined,
  work: (t: Transaction) => Promise<T>,
): Promise<T> {
  return transaction ? work(transaction) : writeTransaction(sequelize, work);
}
