import path from 'node:path';
import fs from 'node:fs';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { knownMigrationNames } from '../../server/db/migrate';
import { startServerProcess, tempDataDir, type ServerProcess } from '../setup/server-process';
import { createPostgresDatabase, TEMPLATE_DATABASE, testDialect } from '../setup/test-database';

/*
 * Two application servers started at the same moment on one empty PostgreSQL database, each with the smallest pool
 * the configuration allows (DATABASE_POOL_MAX=2), as a laboratory running two servers would start them after an
 * upgrade. The start-up steps (migrations, default definitions, demo seed) must run once, one server after the
 * other, and both servers must then serve. With the start-up lock held on a pooled connection, a pool of two left
 * the seed's write one connection and no second one to read with: the server waited 60 s and exited
 * (server/db/sequelize.ts, withStartupLock).
 */

const servers: ServerProcess[] = [];
let drop: (() => Promise<void>) | undefined;
const dirs: string[] = [];

afterAll(async () => {
  await Promise.all(servers.map((s) => s.stop()));
  await drop?.();
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
}, 60_000);

async function counts(url: string): Promise<Record<string, number>> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const out: Record<string, number> = {};
    for (const table of ['SequelizeMeta', 'users', 'patients', 'cases', 'specimens', 'assay_definitions', 'reports']) {
      out[table] = Number((await client.query<{ n: string }>(`SELECT COUNT(*) AS n FROM "${table}"`)).rows[0]!.n);
    }
    return out;
  } finally {
    await client.end();
  }
}

describe.runIf(testDialect === 'postgres')('two servers starting together on one empty PostgreSQL database, pool of 2 each', () => {
  it('when both start at once, then both serve, every migration is recorded once and the demo laboratory is seeded once', async () => {
    const db = await createPostgresDatabase();
    drop = db.drop;
    const env = { DATABASE_URL: db.url, DATABASE_POOL_MAX: '2', NODE_ENV: 'development', DEMO_PASSWORD: 'startup-lock-pass' };
    const started = await Promise.all(
      [0, 1].map(() => {
        const dir = tempDataDir();
        dirs.push(dir);
        return startServerProcess({ ...env, FILES_PATH: path.join(dir, 'files') }, path.join(dir, 'unused.sqlite'));
      }),
    );
    servers.push(...started);
    for (const s of started) expect((await fetch(`${s.origin}/api/health`)).status).toBe(200);

    const seeded = await counts(db.url);
    expect(seeded.SequelizeMeta).toBe(knownMigrationNames().length);
    // The run's template database was migrated and seeded once, by the same code (tests/setup/postgres-template.ts).
    const template = new URL(db.url);
    template.pathname = `/${TEMPLATE_DATABASE}`;
    expect(seeded).toEqual(await counts(template.toString()));
    expect(seeded.cases).toBeGreaterThan(0);
  }, 240_000);
});
