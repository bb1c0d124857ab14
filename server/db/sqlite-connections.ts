import type { Sequelize } from 'sequelize';

/** What this module uses of a node-sqlite3 Database. */
type SqliteConnection = {
  uuid?: string;
  filename?: string;
  run: (sql: string, callback: (err: Error | null) => void) => void;
  all: (sql: string, ...rest: unknown[]) => unknown;
  exec?: (sql: string, ...rest: unknown[]) => unknown;
  close: (callback?: (err: Error | null) => void) => void;
};
type ConnectionManager = {
  connections: Record<string, SqliteConnection>;
  getConnection: (options?: { uuid?: string; type?: string }) => Promise<SqliteConnection>;
  releaseConnection: (connection: SqliteConnection, force?: boolean) => unknown;
};

/**
 * Settings every connection to a SQLite file gets (each is per connection, not per file):
 * - busy_timeout: a connection that finds the file locked waits up to 5 s instead of failing at once;
 * - synchronous = NORMAL: under WAL, a commit is durable against a crash of the process (the WAL is written
 *   before the commit returns) and the file cannot be corrupted; only a power cut or kernel crash can lose
 *   the last commits before a checkpoint. FULL would fsync the WAL on every commit.
 * - mmap_size = 1 GiB: the file is read through a memory map (the operating system's page cache, shared by every
 *   connection) instead of one read() call per 4 KiB page into a page cache of 2 MiB per connection. A pass over
 *   a large table (a cohort of 100,000 members) took twice as long in those calls as in SQLite itself.
 */
export const SQLITE_CONNECTION_PRAGMAS = ['PRAGMA busy_timeout = 5000', 'PRAGMA synchronous = NORMAL', 'PRAGMA mmap_size = 1073741824'];
const MAX_IDLE = 4;
/** Connections for reads outside a transaction, each running one statement at a time. */
const READERS = 4;

const run = (connection: SqliteConnection, sql: string) =>
  new Promise<void>((resolve, reject) => connection.run(sql, (err) => (err ? reject(err) : resolve())));

const TABLE_INFO = /^PRAGMA table_info\(`([^`]+)`\)$/;
const SCHEMA_CHANGE = /^\s*(CREATE|ALTER|DROP)\s/i;
const cached = Symbol('table-info cache');
type TableInfoCache = Map<string, unknown[]>;

/**
 * Before every model SELECT, Sequelize's sqlite dialect asks `PRAGMA table_info` of the table (to parse dates and
 * booleans), and keeps the answer for that one query only: a second round trip through the thread pool per read,
 * inside a write transaction too. The answer changes only when the schema does, so it is kept per database here and
 * forgotten whenever any connection runs CREATE, ALTER or DROP (migrations).
 */
function cacheTableInfo(connection: SqliteConnection, cache: TableInfoCache): SqliteConnection {
  const c = connection as SqliteConnection & { [cached]?: true };
  if (c[cached]) return connection;
  c[cached] = true;
  const all = connection.all.bind(connection);
  connection.all = (sql: string, ...rest: unknown[]) => {
    const table = TABLE_INFO.exec(sql)?.[1];
    const callback = rest[rest.length - 1] as (err: Error | null, rows?: unknown[]) => void;
    if (table === undefined || typeof callback !== 'function') {
      if (SCHEMA_CHANGE.test(sql)) cache.clear();
      return all(sql, ...rest);
    }
    const known = cache.get(table);
    if (known) {
      process.nextTick(() => callback(null, known));
      return connection;
    }
    return all(sql, ...rest.slice(0, -1), (err: Error | null, rows?: unknown[]) => {
      if (!err && rows && rows.length > 0) cache.set(table, rows);
      callback(err, rows);
    });
  };
  for (const method of ['run', 'exec'] as const) {
    const original = connection[method]?.bind(connection) as ((sql: string, ...rest: unknown[]) => unknown) | undefined;
    if (!original) continue;
    (connection as unknown as Record<string, unknown>)[method] = (sql: string, ...rest: unknown[]) => {
      if (SCHEMA_CHANGE.test(sql)) cache.clear();
      return original(sql, ...rest);
    };
  }
  return connection;
}

type Callback = (this: unknown, err: Error | null, ...results: unknown[]) => void;
type Statement = {
  run: (params: unknown, callback: Callback) => unknown;
  all: (params: unknown, callback: Callback) => unknown;
  finalize: (callback?: () => void) => unknown;
};
type Preparable = { prepare: (sql: string, callback: (this: Statement, err: Error | null) => void) => Statement };
const prepared = Symbol('prepared statements');
/** Statements kept per connection; the least recently used is finalized when a new one would pass this. */
const KEPT_STATEMENTS = 64;
/**
 * Every statement but a schema change or PRAGMA (run once) and RETURNING (which `run` would leave mid-way). A text seen
 * once costs what it did before: prepared, run, finalized (when it leaves the list instead of at once).
 */
const KEEPABLE = (sql: string) => !SCHEMA_CHANGE.test(sql) && !/^\s*PRAGMA\b/i.test(sql) && !/\bRETURNING\b/i.test(sql);

/**
 * node-sqlite3's Database#run and #all prepare a new statement for every call, run it and finalize it: two trips
 * through the thread pool and back to the event loop, and a finalize on the main thread that takes the
 * connection's mutex. Sequelize's INSERT and UPDATE statements (values bound as $1, $2, …), BEGIN/COMMIT and many
 * SELECTs (a case list page, a user by id) repeat the same SQL text, so each connection keeps its last statements
 * prepared and runs them again with new values: one trip.
 * Safe because each connection runs one statement at a time (a transaction's, or a reader's), a statement kept
 * here has run to its end (run and all step to SQLITE_DONE; RETURNING, which would leave it mid-way, is not kept)
 * and is reset when it is bound again, and SQLite re-prepares a kept statement by itself after a schema change.
 * A connection's kept statements are finalized before it closes (SQLite will not close with any left open).
 */
function keepPreparedStatements(connection: SqliteConnection): SqliteConnection {
  const c = connection as SqliteConnection & Preparable & { [prepared]?: Map<string, Statement> };
  if (c[prepared]) return connection;
  const kept = new Map<string, Statement>();
  c[prepared] = kept;
  for (const method of ['run', 'all'] as const) {
    const original = connection[method].bind(connection) as (sql: string, ...rest: unknown[]) => unknown;
    (connection as unknown as Record<string, unknown>)[method] = (sql: string, ...rest: unknown[]) => {
      const callback = rest[rest.length - 1];
      if (rest.length !== 2 || typeof callback !== 'function') return original(sql, ...rest);
      const params = rest[0];
      // A text in the list passed KEEPABLE when it was prepared: look it up before testing the text again.
      const statement = kept.get(sql);
      if (!statement && !KEEPABLE(sql)) return original(sql, ...rest);
      if (statement) {
        kept.delete(sql);
        kept.set(sql, statement);
        statement[method](params, callback as Callback);
        return connection;
      }
      const fresh = c.prepare(sql, function (err) {
        if (err) return (callback as Callback).call(this, err);
        if (kept.has(sql)) {
          // Another call prepared the same text meanwhile (the shared connection can run two at once): use once.
          fresh[method](params, callback as Callback);
          fresh.finalize();
          return;
        }
        kept.set(sql, fresh);
        if (kept.size > KEPT_STATEMENTS) {
          const [oldest, stale] = kept.entries().next().value as [string, Statement];
          kept.delete(oldest);
          stale.finalize();
        }
        fresh[method](params, callback as Callback);
      });
      return connection;
    };
  }
  const close = connection.close.bind(connection);
  connection.close = (callback) => {
    for (const statement of kept.values()) statement.finalize();
    kept.clear();
    close(callback);
  };
  return connection;
}

/**
 * Keeps every connection the manager hands out answering `PRAGMA table_info` from one cache per database, and
 * keeping its repeated statements prepared.
 */
function installTableInfoCache(manager: ConnectionManager): void {
  const cache: TableInfoCache = new Map();
  const open = manager.getConnection.bind(manager);
  manager.getConnection = async (options) => cacheTableInfo(keepPreparedStatements(await open(options)), cache);
}

/**
 * Sequelize's sqlite dialect opens a new connection for every transaction and closes it at the end, so each
 * write paid for opening the file and reading its schema again. Here a transaction's connection goes back to a
 * small idle list when the transaction ends and the next transaction takes it (one transaction per connection
 * at a time, as before), and every connection opened gets SQLITE_CONNECTION_PRAGMAS.
 * Reads outside a transaction all went through one shared connection, whose mutex made them wait for each
 * other on the thread pool (and made a writer's statements wait for a free thread): SELECTs now take one of up to
 * READERS connections of their own. Under WAL each read sees every transaction committed before it started, as before.
 * A file database only; an in-memory database keeps its one shared connection.
 */
export async function tuneSqliteConnections(sequelize: Sequelize): Promise<void> {
  if (sequelize.getDialect() !== 'sqlite') return;
  const manager = sequelize.connectionManager as unknown as ConnectionManager;
  installTableInfoCache(manager);
  if ((sequelize as unknown as { options: { storage?: string } }).options.storage === ':memory:') return;
  const open = manager.getConnection.bind(manager);
  const release = manager.releaseConnection.bind(manager);
  const idle: SqliteConnection[] = [];
  const withPragmas = async (connection: Promise<SqliteConnection>) => {
    const c = await connection;
    for (const pragma of SQLITE_CONNECTION_PRAGMAS) await run(c, pragma);
    return c;
  };
  // Reader connections are lent out one statement at a time: node-sqlite3 finalizes each statement on the main
  // thread, which must take the connection's mutex, so a second statement running on the same connection in the
  // thread pool stalled the whole event loop until it finished (13% of the main thread under 20 writers and 20
  // readers). A SELECT that finds every reader busy waits for the first one back.
  const readers = new WeakSet<SqliteConnection>();
  const freeReaders: SqliteConnection[] = [];
  const waitingForReader: ((connection: SqliteConnection) => void)[] = [];
  let readersOpened = 0;
  const takeReader = async (options: { uuid?: string; type?: string }): Promise<SqliteConnection> => {
    const free = freeReaders.pop();
    if (free) return free;
    if (readersOpened >= READERS) return new Promise((resolve) => waitingForReader.push(resolve));
    const i = readersOpened++;
    try {
      const connection = await withPragmas(open({ ...options, uuid: `read-${i}` }));
      readers.add(connection);
      return connection;
    } catch (err) {
      readersOpened--;
      throw err;
    }
  };
  manager.getConnection = async (options) => {
    const uuid = options?.uuid;
    if (!uuid && options?.type === 'SELECT') return takeReader(options);
    if (uuid && uuid !== 'default' && !manager.connections[uuid]) {
      const reused = idle.pop();
      if (reused) {
        manager.connections[uuid] = reused;
        return reused;
      }
      return withPragmas(open(options));
    }
    return open(options);
  };
  manager.releaseConnection = (connection, force) => {
    if (readers.has(connection) && !force) {
      const next = waitingForReader.shift();
      if (next) next(connection);
      else freeReaders.push(connection);
      return;
    }
    if (!force && connection.uuid && connection.uuid !== 'default' && connection.filename !== ':memory:' && idle.length < MAX_IDLE) {
      delete manager.connections[connection.uuid];
      idle.push(connection);
      return;
    }
    return release(connection, force);
  };
  // The shared connection for queries outside a transaction.
  for (const pragma of SQLITE_CONNECTION_PRAGMAS) await sequelize.query(pragma);
  // Closed one at a time, and every one of them: SQLite copies the WAL into the database file and deletes it when
  // the last connection closes, but connections closed at once could each see another still open, and the WAL was
  // left behind, the file alone missing every write since the last checkpoint (6 clean closes in 150, measured).
  // A stopped server now leaves one complete file. A close that fails (a statement left unfinalized) is an error.
  const close = sequelize.close.bind(sequelize);
  sequelize.close = async () => {
    freeReaders.splice(0);
    const open = [...idle.splice(0), ...Object.values(manager.connections)];
    for (const key of Object.keys(manager.connections)) delete manager.connections[key];
    const failures: unknown[] = [];
    for (const c of open) await new Promise<void>((resolve) => c.close((err) => (err && failures.push(err), resolve())));
    await close();
    if (failures.length > 0) throw failures[0];
  };
}
