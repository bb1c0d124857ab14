import path from 'node:path';
import fs from 'node:fs';
import pg from 'pg';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SHARED_SESSION_CACHE_MS } from '../../server/auth/session-cache';
import { demoAccounts } from '../../server/db/seed/demo';
import { knownMigrationNames } from '../../server/db/migrate';
import { startServerProcess, tempDataDir, type ServerProcess } from '../setup/server-process';
import { createPostgresDatabase, TEMPLATE_DATABASE, testDialect } from '../setup/test-database';

/*
 * Two application servers on one PostgreSQL database, as a laboratory running two servers would have them: started
 * at the same moment on an empty database, each with the smallest pool the configuration allows
 * (DATABASE_POOL_MAX=2).
 * - The start-up steps (migrations, default definitions, demo seed) run once, one server after the other, and both
 *   servers then serve. With the start-up lock held on a pooled connection, a pool of two left the seed's write one
 *   connection and no second one to read with: the server waited 60 s and exited (server/db/sequelize.ts).
 * - What one server does to an account or a session reaches the other at once: each keeps copies of sessions and
 *   accounts in memory (server/auth/session-cache.ts, users.repository.ts) and drops them when another server says
 *   so through PostgreSQL's LISTEN/NOTIFY (server/db/forget-everywhere.ts). A deactivated account had kept working
 *   on the other server for up to 30 s; with copies that expire after SHARED_SESSION_CACHE_MS alone, up to 5 s.
 */

const DEMO_PASSWORD = 'two-servers-pass';
const emailOf = (role: string) => demoAccounts.find((a) => a.role === role)!.email;
let servers: ServerProcess[] = [];
let databaseUrl = '';
let drop: (() => Promise<void>) | undefined;
const dirs: string[] = [];

beforeAll(async () => {
  if (testDialect !== 'postgres') return;
  const db = await createPostgresDatabase();
  databaseUrl = db.url;
  drop = db.drop;
  const env = { DATABASE_URL: db.url, DATABASE_POOL_MAX: '2', NODE_ENV: 'development', DEMO_PASSWORD };
  servers = await Promise.all(
    [0, 1].map(() => {
      const dir = tempDataDir();
      dirs.push(dir);
      return startServerProcess({ ...env, FILES_PATH: path.join(dir, 'files') }, path.join(dir, 'unused.sqlite'));
    }),
  );
}, 240_000);

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

/** A signed-in agent on one server; its cookie also opens the other server's door (the sessions are shared). */
async function signIn(server: ServerProcess, email: string): Promise<{ agent: ReturnType<typeof request.agent>; cookie: string }> {
  const agent = request.agent(server.origin);
  agent.set('Origin', server.origin);
  const res = await agent.post('/api/auth/login').send({ email, password: DEMO_PASSWORD });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return { agent, cookie: String(res.headers['set-cookie']).split(';')[0]! };
}

/** Asks `server` for the signed-in user with `cookie` until it answers 401; the milliseconds that took. */
async function msUntilSignedOut(server: ServerProcess, cookie: string, limitMs: number): Promise<number> {
  const started = Date.now();
  for (;;) {
    const status = (await request(server.origin).get('/api/auth/me').set('Cookie', cookie)).status;
    if (status === 401) return Date.now() - started;
    expect(status).toBe(200);
    if (Date.now() - started > limitMs) return Infinity;
    await new Promise((r) => setTimeout(r, 200));
  }
}

// Well under the copies' own lifetime (5 s), so only a notice can meet it; room for a loaded test machine.
const PROPAGATION_LIMIT_MS = 2_000;

describe.runIf(testDialect === 'postgres')('two servers on one PostgreSQL database, pool of 2 each', () => {
  it('when both started at once on an empty database, then both serve, every migration is recorded once and the demo laboratory is seeded once', async () => {
    for (const s of servers) expect((await fetch(`${s.origin}/api/health`)).status).toBe(200);
    const seeded = await counts(databaseUrl);
    expect(seeded.SequelizeMeta).toBe(knownMigrationNames().length);
    // The run's template database was migrated and seeded once, by the same code (tests/setup/postgres-template.ts).
    const template = new URL(databaseUrl);
    template.pathname = `/${TEMPLATE_DATABASE}`;
    expect(seeded).toEqual(await counts(template.toString()));
    expect(seeded.cases).toBeGreaterThan(0);
  });

  it('when a session is signed out on one server, then the other refuses its cookie at once (well within the copies’ 5 s)', async () => {
    const [a, b] = servers as [ServerProcess, ServerProcess];
    const { agent, cookie } = await signIn(a, emailOf('director'));
    expect((await request(b.origin).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200); // b now holds a copy
    expect((await agent.post('/api/auth/logout')).status).toBeLessThan(300);
    expect(await msUntilSignedOut(b, cookie, 40_000)).toBeLessThanOrEqual(PROPAGATION_LIMIT_MS);
  }, 60_000);

  it('when the other server loses its listening connection, then it listens again and a sign-out still reaches it at once', async () => {
    expect(SHARED_SESSION_CACHE_MS).toBeGreaterThan(PROPAGATION_LIMIT_MS);
    const [a, b] = servers as [ServerProcess, ServerProcess];
    const db = new pg.Client({ connectionString: databaseUrl });
    await db.connect();
    try {
      const listening = `SELECT pid FROM pg_stat_activity WHERE datname = current_database() AND query ILIKE 'LISTEN %'`;
      expect((await db.query(listening)).rowCount).toBe(2);
      await db.query(`SELECT pg_terminate_backend(pid) FROM (${listening}) l`);
      // Each server opens its listening connection again after 1 s.
      for (const deadline = Date.now() + 15_000; (await db.query(listening)).rowCount !== 2; ) {
        if (Date.now() > deadline) throw new Error('the servers did not listen again');
        await new Promise((r) => setTimeout(r, 200));
      }
    } finally {
      await db.end();
    }
    const { agent, cookie } = await signIn(a, emailOf('clinician'));
    expect((await request(b.origin).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200);
    expect((await agent.post('/api/auth/logout')).status).toBeLessThan(300);
    expect(await msUntilSignedOut(b, cookie, 40_000)).toBeLessThanOrEqual(PROPAGATION_LIMIT_MS);
  }, 60_000);

  it('when an administrator deactivates an account on one server, then its session ends on the other at once', async () => {
    const [a, b] = servers as [ServerProcess, ServerProcess];
    const { cookie } = await signIn(b, emailOf('technologist'));
    expect((await request(b.origin).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200); // b now holds a copy
    const { agent: admin } = await signIn(a, emailOf('admin'));
    const users = ((await admin.get('/api/users')).body as { items: { id: number; email: string; version: number }[] }).items;
    const technologist = users.find((u) => u.email === emailOf('technologist'))!;
    const res = await admin.patch(`/api/users/${technologist.id}`).send({ active: false, version: technologist.version });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(await msUntilSignedOut(b, cookie, 40_000)).toBeLessThanOrEqual(PROPAGATION_LIMIT_MS);
  }, 60_000);
});
