import fs from 'node:fs';
import path from 'node:path';
import type pg from 'pg';
import sqlite3 from 'sqlite3';
import { Sequelize } from 'sequelize';
import { DEFAULT_POOL_MAX } from '../config';
import { tunePostgresConnections } from './postgres-connections';
import { tuneSqliteConnections } from './sqlite-connections';

/** A PostgreSQL connection URL (DATABASE_URL) rather than a SQLite file path. */
export const isPostgresUrl = (location: string): boolean => /^postgres(ql)?:\/\//i.test(location);

/**
 * Opens the database: a PostgreSQL server when `location` is a postgres:// URL, otherwise a SQLite file (or
 * ':memory:'). Both dialects get the same migrations; see README ("Databases").
 */
export async function openDatabase(location: string, opts: { poolMax?: number } = {}): Promise<Sequelize> {
  return isPostgresUrl(location) ? openPostgres(location, opts.poolMax ?? DEFAULT_POOL_MAX) : openSqlite(location);
}

/**
 * SQLite: Sequelize's sqlite dialect turns foreign keys on for every connection it opens; WAL journaling is a
 * property of the file, set once here (an in-memory database has no journal to set).
 */
async function openSqlite(storage: string): Promise<Sequelize> {
  const inMemory = storage === ':memory:';
  if (!inMemory) fs.mkdirSync(path.dirname(path.resolve(storage)), { recursive: true });
  const sequelize = new Sequelize({
    dialect: 'sqlite',
    dialectModule: sqlite3,
    storage,
    logging: false,
    retry: { match: [/SQLITE_BUSY/], max: 8 },
    define: { freezeTableName: true },
  });
  await sequelize.authenticate();
  await sequelize.query('PRAGMA foreign_keys = ON');
  if (!inMemory) {
    await sequelize.query('PRAGMA journal_mode = WAL');
    await sequelize.query('PRAGMA busy_timeout = 5000');
  }
  await tuneSqliteConnections(sequelize);
  return sequelize;
}

/**
 * COUNT(*) and SUM() of integers are bigint on PostgreSQL, which pg hands over as strings; SQLite answers
 * numbers. Every count this application makes fits a double exactly, so bigints are read as numbers (a value
 * beyond 2^53 is refused rather than rounded).
 */
function readBigintsAsNumbers(types: typeof pg.types): void {
  types.setTypeParser(types.builtins.INT8, (text: string) => {
    const n = Number(text);
    if (!Number.isSafeInteger(n)) throw new RangeError(`bigint ${text} does not fit a JavaScript number`);
    return n;
  });
}

/** PostgreSQL through `pg` (loaded only here: a SQLite start need not load it). Every connection works in UTC, like the SQLite dates. */
async function openPostgres(url: string, poolMax: number): Promise<Sequelize> {
  const { default: pg } = await import('pg');
  readBigintsAsNumbers(pg.types);
  const sequelize = new Sequelize(url, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: false,
    timezone: '+00:00',
    pool: { max: poolMax, min: 0, idle: 10_000, acquire: 60_000 },
    define: { freezeTableName: true },
  });
  tunePostgresConnections(sequelize);
  await sequelize.authenticate();
  return sequelize;
}

export const isPostgres = (sequelize: Sequelize): boolean => sequelize.getDialect() === 'postgres';

const STARTUP_LOCK = 0x63727374; // "crst": any fixed key, other than the write lock's

/**
 * Runs the start-up steps (migrations, default definitions, demo seed, first administrator) one process at a
 * time: on PostgreSQL several application servers may start together on one database, and two of them must not
 * both migrate or both seed it. The lock is a session-level advisory lock on a connection of its own, outside the
 * pool, so `work` has every pooled connection: held on a pooled connection, it left a pool of two with one, and
 * the seed's write (one connection) waited for ever for a second one to read with. Ending that connection
 * releases the lock, also when `work` fails. SQLite's single file has one server (backup and restore refuse a
 * running one).
 */
export async function withStartupLock<T>(sequelize: Sequelize, work: () => Promise<T>): Promise<T> {
  if (!isPostgres(sequelize)) return work();
  const own = await openOwnConnection(sequelize);
  try {
    await own.client.query(`SELECT pg_advisory_lock(${STARTUP_LOCK})`);
    return await work();
  } finally {
    await own.close();
  }
}

/**
 * PostgreSQL: a connection outside the pool (for a session-level lock, or for LISTEN), opened the way the pool
 * opens its own, so the URL's options (socket, SSL) apply alike. Closing it ends its session and what it held.
 */
export type OwnConnection = { client: pg.Client; close: () => Promise<void> };
export async function openOwnConnection(sequelize: Sequelize): Promise<OwnConnection> {
  const manager = sequelize.connectionManager as unknown as {
    connect(config: unknown): Promise<pg.Client>;
    disconnect(connection: pg.Client): Promise<void>;
  };
  const client = await manager.connect(sequelize.config);
  return { client, close: () => manager.disconnect(client) };
}
