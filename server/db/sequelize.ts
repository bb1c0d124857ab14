import fs from 'node:fs';
import path from 'node:path';
import sqlite3 from 'sqlite3';
import { Sequelize } from 'sequelize';
import { tuneSqliteConnections } from './sqlite-connections';

/**
 * Opens the SQLite database. Sequelize's sqlite dialect turns foreign keys on for every connection it opens;
 * WAL journaling is a property of the file, set once here (an in-memory database has no journal to set).
 */
export async function openDatabase(storage: string): Promise<Sequelize> {
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
    await tuneSqliteConnections(sequelize);
  }
  return sequelize;
}
