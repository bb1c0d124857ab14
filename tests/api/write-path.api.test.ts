import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import express from 'express';
import request from 'supertest';
import { QueryTypes, type Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { preparedRead } from '../../server/db/prepared-read';
import { openDatabase } from '../../server/db/sequelize';
import { writeTransaction, writesInFlight } from '../../server/db/write-transaction';
import { limitReadsWhileWriting } from '../../server/lib/read-gate';
import { openTestDatabase, testDialect } from '../setup/test-database';

/*
 * The write path's promises, checked on a database with a second connection (a SQLite file, or PostgreSQL), so
 * "committed" means what another reader sees:
 * - writes fired at once behave as if each had committed alone, in the order they were sent (serial order);
 * - a failing write is refused with its own error, stores nothing, and takes no other write down with it;
 * - no write is answered before another connection can see it (answered = durable and visible).
 * Serialisability and atomicity are the textbook transaction properties (ISO/IEC 9075 isolation level
 * SERIALIZABLE; any database text) [common practice].
 */

let sequelize: Sequelize;
let close: () => Promise<void>;
/** pg's warnings seen while this file runs (server/db/postgres-connections.ts). */
const pgWarnings: string[] = [];
process.on('warning', (w) => {
  if (/pg@9|client\.query\(\)/.test(w.message)) pgWarnings.push(w.message);
});
beforeAll(async () => {
  if (testDialect === 'sqlite') {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-write-path-'));
    sequelize = await openDatabase(path.join(dir, 'w.sqlite'));
    close = async () => {
      await sequelize.close();
      fs.rmSync(dir, { recursive: true, force: true });
    };
  } else {
    const db = await openTestDatabase();
    sequelize = db.sequelize;
    close = db.drop;
  }
  await sequelize.query('CREATE TABLE wp_counter (id INTEGER PRIMARY KEY, n INTEGER NOT NULL)');
  await sequelize.query('CREATE TABLE wp_rows (k VARCHAR(40) PRIMARY KEY, seen INTEGER)');
});
afterAll(() => close());
beforeEach(async () => {
  await sequelize.query('DELETE FROM wp_counter');
  await sequelize.query('DELETE FROM wp_rows');
  await sequelize.query('INSERT INTO wp_counter (id, n) VALUES (1, 0)');
});

const counter = async (): Promise<number> =>
  (await sequelize.query<{ n: number }>('SELECT n FROM wp_counter WHERE id = 1', { type: QueryTypes.SELECT }))[0]!.n;
const keys = async (): Promise<string[]> =>
  (await sequelize.query<{ k: string }>('SELECT k FROM wp_rows ORDER BY k', { type: QueryTypes.SELECT })).map((r) => r.k);

/** Read the counter, then write it back plus one: lost updates show when two writes overlap. */
const increment = (key: string) =>
  writeTransaction(sequelize, async (transaction) => {
    const [row] = await sequelize.query<{ n: number }>('SELECT n FROM wp_counter WHERE id = 1', { type: QueryTypes.SELECT, transaction });
    await sequelize.query('UPDATE wp_counter SET n = :n WHERE id = 1', { replacements: { n: row!.n + 1 }, transaction });
    await sequelize.query('INSERT INTO wp_rows (k, seen) VALUES (:key, :seen)', { replacements: { key, seen: row!.n }, transaction });
    return row!.n;
  });

describe('writes fired at once', () => {
  it('when 40 read-then-write transactions are sent together, then none is lost and each saw exactly the ones sent before it', async () => {
    const seen = await Promise.all(Array.from({ length: 40 }, (_, i) => increment(`k${String(i).padStart(2, '0')}`)));
    expect(await counter()).toBe(40);
    expect(seen).toEqual(Array.from({ length: 40 }, (_, i) => i));
  });

  it('when one write of many fails after writing, then it is refused with its own error, none of its rows stays, and every other write is stored', async () => {
    const results = await Promise.allSettled(
      Array.from({ length: 12 }, (_, i) =>
        i === 6
          ? writeTransaction(sequelize, async (transaction) => {
              await sequelize.query("INSERT INTO wp_rows (k, seen) VALUES ('doomed', -1)", { transaction });
              throw new Error('refused by the sixth write itself');
            })
          : increment(`k${String(i).padStart(2, '0')}`),
      ),
    );
    expect(results.map((r) => r.status)).toEqual(Array.from({ length: 12 }, (_, i) => (i === 6 ? 'rejected' : 'fulfilled')));
    expect((results[6] as PromiseRejectedResult).reason).toEqual(new Error('refused by the sixth write itself'));
    expect(await keys()).not.toContain('doomed');
    expect(await counter()).toBe(11);
    // The writes after the failing one still saw every write before them (serial order kept through the retry).
    expect(results.filter((r) => r.status === 'fulfilled').map((r) => (r as PromiseFulfilledResult<number>).value)).toEqual(
      Array.from({ length: 11 }, (_, i) => i),
    );
  });

  it('when a write collides with one sent just before it (same key), then the first is stored and the second gets the database error', async () => {
    const insert = (seen: number) =>
      writeTransaction(sequelize, (transaction) =>
        sequelize.query('INSERT INTO wp_rows (k, seen) VALUES (:k, :seen)', { replacements: { k: 'same', seen }, transaction }),
      );
    const results = await Promise.allSettled([increment('a'), insert(1), insert(2), increment('b')]);
    expect(results.map((r) => r.status)).toEqual(['fulfilled', 'fulfilled', 'rejected', 'fulfilled']);
    expect(String((results[2] as PromiseRejectedResult).reason)).toMatch(/unique|constraint/i);
    expect(await keys()).toEqual(['a', 'b', 'same']);
    expect((await sequelize.query<{ seen: number }>("SELECT seen FROM wp_rows WHERE k = 'same'", { type: QueryTypes.SELECT }))[0]!.seen).toBe(1);
  });
});

describe('answered only once committed', () => {
  it('when writes are held open behind a slow one, then every write already answered is visible to another connection and no unanswered one is', async () => {
    let enteredSlow!: () => void;
    const slowEntered = new Promise<void>((r) => (enteredSlow = r));
    let letSlowFinish!: () => void;
    const slowMayFinish = new Promise<void>((r) => (letSlowFinish = r));
    const answered = new Set<string>();
    const sent = Array.from({ length: 15 }, (_, i) => `k${String(i).padStart(2, '0')}`);
    const all = sent.map((key, i) =>
      (i === 9
        ? writeTransaction(sequelize, async (transaction) => {
            await sequelize.query('INSERT INTO wp_rows (k, seen) VALUES (:key, 0)', { replacements: { key }, transaction });
            enteredSlow();
            await slowMayFinish;
          })
        : increment(key)
      ).then(() => answered.add(key)),
    );
    await slowEntered;
    // The slow write holds its transaction open: nothing can commit until it is let go, so this picture is still.
    const visible = await keys();
    const answeredNow = [...answered].sort();
    expect(visible).toEqual(answeredNow);
    expect(answeredNow).not.toContain('k09');
    expect(writesInFlight()).toBeGreaterThan(0);
    letSlowFinish();
    await Promise.all(all);
    expect(await keys()).toEqual(sent);
    expect(writesInFlight()).toBe(0);
  });
});

describe.runIf(testDialect === 'sqlite')('reads outside a transaction on a SQLite file (server/db/sqlite-connections.ts)', () => {
  type Conn = { all: (...args: unknown[]) => unknown };
  /** Wraps every connection's all() while the test runs, counting the statements in flight on each at once. */
  function watchConnections() {
    const manager = sequelize.connectionManager as unknown as { getConnection: (o?: object) => Promise<Conn> };
    const original = manager.getConnection;
    const inFlight = new Map<Conn, number>();
    const most = new Map<Conn, number>();
    const wrapped = new WeakSet<Conn>();
    manager.getConnection = async (options?: object) => {
      const connection = await original.call(manager, options);
      if (!wrapped.has(connection)) {
        wrapped.add(connection);
        const all = connection.all.bind(connection);
        connection.all = (...args: unknown[]) => {
          const callback = args.pop() as (...r: unknown[]) => void;
          inFlight.set(connection, (inFlight.get(connection) ?? 0) + 1);
          most.set(connection, Math.max(most.get(connection) ?? 0, inFlight.get(connection)!));
          return all(...args, (...r: unknown[]) => {
            inFlight.set(connection, inFlight.get(connection)! - 1);
            callback(...r);
          });
        };
      }
      return connection;
    };
    return { most, restore: () => (manager.getConnection = original) };
  }

  it('when 30 SELECTs are sent at once, then each reader connection runs one at a time, every answer is right, and none sees a write not yet committed', async () => {
    await sequelize.query("INSERT INTO wp_rows (k, seen) VALUES ('committed', 1)");
    const watch = watchConnections();
    let letWriteFinish!: () => void;
    const writeMayFinish = new Promise<void>((r) => (letWriteFinish = r));
    let enteredWrite!: () => void;
    const writeEntered = new Promise<void>((r) => (enteredWrite = r));
    try {
      // A write holds its transaction open with a row in it while the reads run.
      const write = writeTransaction(sequelize, async (transaction) => {
        await sequelize.query("INSERT INTO wp_rows (k, seen) VALUES ('uncommitted', 2)", { transaction });
        enteredWrite();
        await writeMayFinish;
      });
      await writeEntered;
      const answers = await Promise.all(
        Array.from({ length: 30 }, (_, i) =>
          sequelize.query<{ k: string; n: number }>('SELECT k, :i AS n FROM wp_rows ORDER BY k', { replacements: { i }, type: QueryTypes.SELECT }),
        ),
      );
      answers.forEach((rows, i) => expect(rows).toEqual([{ k: 'committed', n: i }]));
      letWriteFinish();
      await write;
      expect(await keys()).toEqual(['committed', 'uncommitted']);
      expect([...watch.most.values()].every((n) => n === 1)).toBe(true);
      expect(watch.most.size).toBeGreaterThan(1);
    } finally {
      watch.restore();
      letWriteFinish();
    }
  });
});

describe.runIf(testDialect === 'sqlite')('statements kept prepared on a SQLite connection (server/db/sqlite-connections.ts)', () => {
  /*
   * What is checked is what SQLite documents for a prepared statement run again [confirmed, sqlite.org/c3ref/stmt.html
   * and c3ref/reset.html: reset and re-bind to run a statement with new values; c3ref/prepare.html: a statement is
   * re-prepared by itself after a schema change; c3ref/close.html: a connection with statements not finalized does not
   * close]: each run gets its own values and its own change count, an error leaves the statement usable, a schema
   * change does not break it, and the database closes cleanly (its -wal file is removed at the last close).
   */
  const insert = 'INSERT INTO kept (k, n) VALUES ($1, $2)';
  let db: Sequelize;
  let dir: string;
  let prepared: string[] = [];
  beforeEach(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-kept-'));
    db = await openDatabase(path.join(dir, 'k.sqlite'));
    await db.query('CREATE TABLE kept (k VARCHAR(20) PRIMARY KEY, n INTEGER NOT NULL)');
    prepared = [];
    const manager = db.connectionManager as unknown as { getConnection: (o?: object) => Promise<{ prepare: (...a: unknown[]) => unknown }> };
    const open = manager.getConnection.bind(manager);
    manager.getConnection = async (options?: object) => {
      const connection = await open(options);
      const prepare = connection.prepare;
      if (!(prepare as { counted?: true }).counted) {
        connection.prepare = Object.assign((...a: unknown[]) => (prepared.push(String(a[0])), prepare.apply(connection, a)), { counted: true as const });
      }
      return connection;
    };
  });

  it('when 40 writes run the same INSERT text with new values, then each row holds its own values, the text is prepared once, and the database closes cleanly', async () => {
    await Promise.all(
      Array.from({ length: 40 }, (_, i) =>
        writeTransaction(db, (transaction) => db.query(insert, { bind: [`row-${i}`, i * i], type: QueryTypes.INSERT, transaction })),
      ),
    );
    const rows = await db.query<{ k: string; n: number }>('SELECT k, n FROM kept ORDER BY n', { type: QueryTypes.SELECT });
    expect(rows).toEqual(Array.from({ length: 40 }, (_, i) => ({ k: `row-${i}`, n: i * i })));
    // Once per connection that ran it: the writes went through one or two transaction connections, not 40 times.
    const inserts = prepared.filter((sql) => sql === insert).length;
    expect(inserts).toBeGreaterThanOrEqual(1);
    expect(inserts).toBeLessThanOrEqual(2);
    await db.close();
    expect(fs.existsSync(path.join(dir, 'k.sqlite-wal'))).toBe(false);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when the same SELECT text is read before and after a write commits, then the second answer sees the write (a kept SELECT holds no old snapshot)', async () => {
    const count = async () => (await db.query<{ n: number }>('SELECT COUNT(*) AS n FROM kept', { type: QueryTypes.SELECT }))[0]!.n;
    const seen: number[] = [];
    for (let i = 0; i < 3; i++) {
      seen.push(...(await Promise.all([count(), count(), count(), count()])));
      await writeTransaction(db, (transaction) => db.query(insert, { bind: [`k${i}`, i], type: QueryTypes.INSERT, transaction }));
    }
    seen.push(await count());
    expect(seen).toEqual([0, 0, 0, 0, 1, 1, 1, 1, 2, 2, 2, 2, 3]);
    expect(prepared.filter((sql) => sql.startsWith('SELECT COUNT(*)')).length).toBeLessThanOrEqual(4); // once per reader
    await db.close();
    expect(fs.existsSync(path.join(dir, 'k.sqlite-wal'))).toBe(false);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when a database that several connections used is closed, 60 times over, then every time the WAL is gone and the file alone holds every write', async () => {
    // SQLite moves the WAL into the database file when the last connection closes [sqlite.org/wal.html, from memory].
    // Closed at once, connections could each see another still open: the WAL stayed, and the file alone lacked the
    // writes (6 of 150 closes before server/db/sqlite-connections.ts closed them one at a time).
    await db.close();
    const missing: string[] = [];
    for (let round = 0; round < 60; round++) {
      const file = path.join(dir, `r${round}.sqlite`);
      const used = await openDatabase(file);
      await used.query('CREATE TABLE kept (k VARCHAR(20) PRIMARY KEY, n INTEGER NOT NULL)');
      const count = async () => (await used.query<{ n: number }>('SELECT COUNT(*) AS n FROM kept', { type: QueryTypes.SELECT }))[0]!.n;
      for (let i = 0; i < 3; i++) {
        await Promise.all([count(), count(), count(), count()]); // several reader connections open
        await writeTransaction(used, (transaction) => used.query(insert, { bind: [`k${i}`, i], type: QueryTypes.INSERT, transaction }));
      }
      await used.close();
      if (fs.existsSync(`${file}-wal`)) missing.push(`round ${round}: ${file}-wal left`);
      // The file on its own, as a copy taken after a stop would be.
      const alone = path.join(dir, `alone-${round}.sqlite`);
      fs.copyFileSync(file, alone);
      const check = await openDatabase(alone);
      const rows = await check.query<{ n: number }>('SELECT COUNT(*) AS n FROM kept', { type: QueryTypes.SELECT }).catch((err: Error) => [{ n: err.message }]);
      await check.close();
      if (rows[0]!.n !== 3) missing.push(`round ${round}: the file alone gave ${rows[0]!.n}`);
    }
    expect(missing).toEqual([]);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when a kept UPDATE runs with different values, then each run reports its own count of changed rows', async () => {
    await writeTransaction(db, async (transaction) => {
      for (const [k, n] of [['a', 1], ['b', 1], ['c', 2]] as const) await db.query(insert, { bind: [k, n], type: QueryTypes.INSERT, transaction });
    });
    const update = (n: number) =>
      writeTransaction(db, (transaction) => db.query('UPDATE kept SET n = n + 10 WHERE n = $1', { bind: [n], type: QueryTypes.BULKUPDATE, transaction }));
    expect([await update(1), await update(2), await update(99)]).toEqual([2, 1, 0]);
    await db.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when a kept INSERT breaks the primary key, then that write alone is refused with the unique-constraint error and the same text then works again', async () => {
    await writeTransaction(db, (transaction) => db.query(insert, { bind: ['dup', 1], type: QueryTypes.INSERT, transaction }));
    const again = writeTransaction(db, (transaction) => db.query(insert, { bind: ['dup', 2], type: QueryTypes.INSERT, transaction }));
    await expect(again).rejects.toMatchObject({ name: 'SequelizeUniqueConstraintError' });
    await writeTransaction(db, (transaction) => db.query(insert, { bind: ['fresh', 3], type: QueryTypes.INSERT, transaction }));
    expect(await db.query('SELECT k, n FROM kept ORDER BY k', { type: QueryTypes.SELECT })).toEqual([
      { k: 'dup', n: 1 },
      { k: 'fresh', n: 3 },
    ]);
    await db.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when the table is dropped and made again with another column order, then the kept INSERT text writes into the new table correctly', async () => {
    await writeTransaction(db, (transaction) => db.query(insert, { bind: ['before', 1], type: QueryTypes.INSERT, transaction }));
    await db.query('DROP TABLE kept');
    await db.query('CREATE TABLE kept (extra TEXT DEFAULT \'x\', n INTEGER NOT NULL, k VARCHAR(20) PRIMARY KEY)');
    await writeTransaction(db, (transaction) => db.query(insert, { bind: ['after', 2], type: QueryTypes.INSERT, transaction }));
    expect(await db.query('SELECT extra, n, k FROM kept', { type: QueryTypes.SELECT })).toEqual([{ extra: 'x', n: 2, k: 'after' }]);
    await db.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });
});

describe.runIf(testDialect === 'postgres')('reads kept prepared on PostgreSQL (server/db/prepared-read.ts)', () => {
  /*
   * What PostgreSQL documents for a prepared statement [from memory: PostgreSQL 15 manual, PREPARE and the view
   * pg_prepared_statements, whose generic_plans and custom_plans count the statement's runs in this session
   * (PostgreSQL 14 and later); under READ COMMITTED each statement, prepared or not, sees what was committed before
   * it began]: a text is prepared once per connection and then only run, each run with its own values, and an
   * error in one run leaves the pool usable.
   */
  const page = 'SELECT k, seen FROM wp_rows WHERE k LIKE $1 ORDER BY k LIMIT $2';

  it('when one connection runs the same text three times, then PostgreSQL holds it prepared once and counts three runs', async () => {
    const url = ((sequelize as unknown as { config: { host: string; port: number; database: string; username: string } }).config);
    const single = await openDatabase(`postgres://${url.username}@${url.host}:${url.port}/${url.database}`, { poolMax: 1 });
    try {
      for (const limit of [1, 2, 3]) await preparedRead(single, page, ['pr-%', limit]);
      const held = await preparedRead<{ name: string; runs: number }>(
        single,
        'SELECT name, generic_plans + custom_plans AS runs FROM pg_prepared_statements WHERE statement = $1',
        [page],
      );
      expect(held).toHaveLength(1);
      expect(held[0]!.name).toMatch(/^cristae_[0-9a-f]{24}$/);
      expect(Number(held[0]!.runs)).toBe(3);
    } finally {
      await single.close();
    }
  });

  it('when 30 reads of one text run at once with their own values, each answers for its values, and a read after a commit sees it', async () => {
    await sequelize.query("INSERT INTO wp_rows (k, seen) VALUES ('pr-a', 1), ('pr-b', 2), ('pr-c', 3)");
    const answers = await Promise.all(Array.from({ length: 30 }, (_, i) => preparedRead<{ k: string }>(sequelize, page, ['pr-%', (i % 3) + 1])));
    answers.forEach((rows, i) => expect(rows.map((r) => r.k)).toEqual(['pr-a', 'pr-b', 'pr-c'].slice(0, (i % 3) + 1)));
    await writeTransaction(sequelize, (transaction) => sequelize.query("INSERT INTO wp_rows (k, seen) VALUES ('pr-0', 0)", { transaction }));
    const after = await Promise.all(Array.from({ length: 10 }, () => preparedRead<{ k: string }>(sequelize, page, ['pr-%', 1])));
    for (const rows of after) expect(rows).toEqual([{ k: 'pr-0', seen: 0 }]);
  });

  it('when one transaction asks for several reads at once, then each gets its own answer and pg is never handed a query while one runs', async () => {
    // pg 8 queues a query asked for while another runs on the same connection, and warns (once per process) that
    // pg@9 will not [confirmed: node_modules/pg/lib/client.js, queryQueueLengthDeprecationNotice]; the warnings of
    // this whole file are collected from its start (pgWarnings, above).
    const answers = await writeTransaction(sequelize, (transaction) =>
      Promise.all(
        Array.from({ length: 8 }, (_, i) =>
          sequelize.query<{ v: number }>(`SELECT ${i} * 3 AS v, pg_sleep(0.01)`, { type: QueryTypes.SELECT, transaction }),
        ),
      ),
    );
    expect(answers.map((rows) => rows[0]!.v)).toEqual([0, 3, 6, 9, 12, 15, 18, 21]);
    const viaPrepared = await Promise.all([1, 2, 3].map((n) => preparedRead<{ v: number }>(sequelize, 'SELECT $1::int * 5 AS v', [n])));
    expect(viaPrepared.map((rows) => rows[0]!.v)).toEqual([5, 10, 15]);
    await new Promise((r) => setImmediate(r)); // warnings are emitted on the next tick
    expect(pgWarnings).toEqual([]);
  });

  it('when a run fails on the server, then that read rejects with its error and the next reads on the pool still answer', async () => {
    const divide = 'SELECT 12 / $1::int AS q';
    await expect(preparedRead(sequelize, divide, [0])).rejects.toThrow(/division by zero/);
    const again = await Promise.all([4, 3, 2].map((d) => preparedRead<{ q: number }>(sequelize, divide, [d])));
    expect(again.map((rows) => rows[0]!.q)).toEqual([3, 4, 6]);
  });
});

describe('reads held back while writes wait (server/lib/read-gate.ts)', () => {
  /** An app whose one GET route waits until the test lets it answer, counting the requests inside it. */
  function slowReadApp(concurrency: number) {
    const state = { arrived: 0, inside: 0, most: 0, done: 0, release: [] as (() => void)[] };
    const app = express();
    app.use((_req, _res, next) => {
      state.arrived++;
      next();
    });
    app.use(limitReadsWhileWriting(concurrency));
    app.get('/r', (_req, res) => {
      state.inside++;
      state.most = Math.max(state.most, state.inside);
      state.release.push(() => {
        state.inside--;
        state.done++;
        res.json({ ok: true });
      });
    });
    app.post('/w', (_req, res) => res.status(201).json({ ok: true }));
    return { app, state };
  }
  const until = async (condition: () => boolean) => {
    while (!condition()) await new Promise((r) => setTimeout(r, 5));
  };

  it('when no write is in flight, then six slow reads are all worked on at once', async () => {
    const { app, state } = slowReadApp(2);
    const server = app.listen(0);
    const url = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
    const reads = Array.from({ length: 6 }, () => fetch(`${url}/r`));
    await until(() => state.inside === 6);
    state.release.splice(0).forEach((f) => f());
    expect((await Promise.all(reads)).map((r) => r.status)).toEqual([200, 200, 200, 200, 200, 200]);
    server.close();
  });

  it('when a write is in flight, then at most two reads are worked on at once, the rest wait their turn, and writes pass', async () => {
    const { app, state } = slowReadApp(2);
    const server = app.listen(0);
    const url = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
    let finishWrite!: () => void;
    const write = writeTransaction(sequelize, () => new Promise<void>((r) => (finishWrite = r)));
    await until(() => finishWrite !== undefined);
    const reads = Array.from({ length: 6 }, () => fetch(`${url}/r`));
    // Every read has reached the gate (a read arriving after the write ends rightly goes straight through).
    await until(() => state.inside === 2 && state.arrived === 6);
    // A POST is not a read: it is not held at the door.
    expect((await request(app).post('/w')).status).toBe(201);
    expect(state.inside).toBe(2);
    finishWrite();
    await write;
    while (state.done < 6) {
      state.release.splice(0).forEach((f) => f());
      await new Promise((r) => setTimeout(r, 5));
    }
    expect((await Promise.all(reads)).map((r) => r.status)).toEqual([200, 200, 200, 200, 200, 200]);
    expect(state.most).toBe(2);
    server.close();
  });
});

describe('stack traces of queries (patches/sequelize+6.37.8.patch)', () => {
  /** A query of a table that does not exist, from a function whose name the error's stack should carry. */
  async function askForMissingTable(): Promise<unknown> {
    return await sequelize.query('SELECT n FROM wp_no_such_table', { type: QueryTypes.SELECT });
  }

  it('formats no stack for a query that succeeds; a failing query still carries the stack of where it was sent', async () => {
    // V8 formats an Error's stack when `.stack` is first read, through Error.prepareStackTrace when one is set
    // (V8 stack trace API, https://v8.dev/docs/stack-trace-api). Sequelize's sqlite dialect read it for every
    // query; formatting it was about 4% of the server's CPU under load (docs/performance.md).
    const original = Error.prepareStackTrace;
    let formatted = 0;
    Error.prepareStackTrace = (error: Error, frames: NodeJS.CallSite[]) => {
      formatted += 1;
      return [String(error), ...frames.map((f) => `    at ${String(f)}`)].join('\n');
    };
    try {
      for (let i = 0; i < 20; i++) expect(await counter()).toBe(0);
      await increment('a');
      expect(formatted).toBe(0);
      const error = (await askForMissingTable().catch((e: unknown) => e)) as Error;
      expect(error.message).toMatch(/wp_no_such_table/);
      expect(error.stack).toContain('askForMissingTable');
      expect(formatted).toBeGreaterThan(0);
    } finally {
      Error.prepareStackTrace = original;
    }
  });
});
