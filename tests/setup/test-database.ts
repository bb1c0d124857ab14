import { randomBytes } from 'node:crypto';
import pg from 'pg';
import type { Sequelize } from 'sequelize';
import { inject } from 'vitest';
import { openDatabase } from '../../server/db/sequelize';
import { copySqliteDatabase, SQLITE_TEMPLATE_KEY } from './demo-database';

/**
 * Which database the API tests run on: SQLite in memory (project "node"), or PostgreSQL (project "api-pg", run
 * by `npm run test:pg` inside scripts/with-postgres.sh, which sets DATABASE_URL).
 */
export const testDialect: 'sqlite' | 'postgres' = process.env.CRISTAE_TEST_DATABASE === 'postgres' ? 'postgres' : 'sqlite';

function serverUrl(): URL {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('CRISTAE_TEST_DATABASE=postgres needs DATABASE_URL: run it through scripts/with-postgres.sh');
  return new URL(url);
}

/** Runs one statement on the server's own database (CREATE/DROP DATABASE cannot run inside a transaction). */
async function onServer(sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: serverUrl().toString() });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

export type TestDatabase = { sequelize: Sequelize; url: string; drop: () => Promise<void> };

/** Made once per run by tests/setup/postgres-template.ts: migrated and seeded as makeTestApp() does it. */
export const TEMPLATE_DATABASE = 'cristae_template';

/**
 * A PostgreSQL database of its own (dropped by `drop`): `name`, or a unique one for this test file; empty, or a
 * copy of `template`.
 */
export async function createPostgresDatabase(
  name = `cristae_t_${process.pid}_${randomBytes(4).toString('hex')}`,
  template?: string,
): Promise<{ url: string; drop: () => Promise<void> }> {
  await onServer(`CREATE DATABASE "${name}"${template ? ` TEMPLATE "${template}"` : ''}`);
  const url = serverUrl();
  url.pathname = `/${name}`;
  return { url: url.toString(), drop: () => onServer(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`) };
}

/**
 * A fresh database of the dialect under test, one per test file: an in-memory SQLite, or a database of its own
 * on the PostgreSQL server; with `seeded`, a copy of the run's migrated and seeded template
 * (tests/setup/sqlite-template.ts, tests/setup/postgres-template.ts), else empty. A SQLite run without the
 * template (a configuration without that global set-up) starts empty and makeTestApp() seeds it in place.
 */
export async function openTestDatabase(opts: { seeded?: boolean } = {}): Promise<TestDatabase> {
  if (testDialect === 'sqlite') {
    const sequelize = await openDatabase(':memory:');
    const template = opts.seeded ? inject(SQLITE_TEMPLATE_KEY) : undefined;
    if (template) await copySqliteDatabase(sequelize, template, 'from-file');
    return { sequelize, url: ':memory:', drop: () => sequelize.close() };
  }
  const db = await createPostgresDatabase(undefined, opts.seeded ? TEMPLATE_DATABASE : undefined);
  const sequelize = await openDatabase(db.url);
  return {
    sequelize,
    url: db.url,
    drop: async () => {
      await sequelize.close();
      await db.drop();
    },
  };
}
