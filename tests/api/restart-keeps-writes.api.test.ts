import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoAccounts } from '../../server/db/seed/demo';
import { createCase } from '../factories/cases';
import { startServerProcess, tempDataDir, type ServerProcess } from '../setup/server-process';
import { createPostgresDatabase, testDialect } from '../setup/test-database';

/*
 * The deployment contract, on the database under test (SQLite in project "node", PostgreSQL in "api-pg"): the
 * real server started on an empty database migrates it, seeds the invented demo laboratory (outside
 * production), serves the registry, and still has what was written after it is stopped and started again.
 */
const DEMO_PASSWORD = 'restart-demo-pass';
const technologist = demoAccounts.find((a) => a.role === 'technologist')!;

let env: Record<string, string>;
/** The SQLite file: the database under test, or on PostgreSQL a path that must never be created. */
let sqliteFile: string;
let cleanUp: () => Promise<void>;
let server: ServerProcess | null = null;

beforeAll(async () => {
  if (testDialect === 'postgres') {
    const db = await createPostgresDatabase();
    env = { DATABASE_URL: db.url };
    cleanUp = db.drop;
  } else {
    env = {};
    cleanUp = async () => undefined;
  }
  const dir = tempDataDir();
  sqliteFile = path.join(dir, 'cristae.sqlite');
  const dropDatabase = cleanUp;
  cleanUp = async () => {
    await dropDatabase();
    fs.rmSync(dir, { recursive: true, force: true });
  };
  env = { ...env, NODE_ENV: 'development', DEMO_PASSWORD, FILES_PATH: path.join(dir, 'files') };
}, 60_000);
afterAll(async () => {
  await server?.stop();
  await cleanUp?.();
}, 60_000);

async function start(): Promise<{ server: ServerProcess; agent: ReturnType<typeof request.agent> }> {
  server = await startServerProcess(env, sqliteFile);
  const agent = request.agent(server.origin);
  agent.set('Origin', server.origin);
  const login = await agent.post('/api/auth/login').send({ email: technologist.email, password: DEMO_PASSWORD });
  if (login.status !== 200) throw new Error(`sign-in failed: ${login.status} ${JSON.stringify(login.body)}\n${server.output()}`);
  return { server, agent };
}

describe(`the real server on an empty ${testDialect} database, started twice`, () => {
  let written: { id: number; accession: string; patientId: number };
  let casesBefore: number;

  it('when first started, then it migrates, seeds the demo laboratory and serves the registry, and a new case is saved', async () => {
    const first = await start();
    expect(first.server.output()).toMatch(/migrations applied/);
    const list = await first.agent.get('/api/cases?pageSize=200');
    expect(list.status).toBe(200);
    // The demo seed registers cases of invented patients; an empty registry would mean no seed ran.
    expect(list.body.total).toBeGreaterThan(0);
    const created = await createCase(first.agent as never);
    written = { id: created.id, accession: created.accession, patientId: created.patient.id };
    casesBefore = (await first.agent.get('/api/cases?pageSize=200')).body.total;
    expect(casesBefore).toBe(list.body.total + 1);
    expect(await first.server.stop()).toBe(0);
    // On PostgreSQL nothing is written to a SQLite file on the side.
    expect(fs.existsSync(sqliteFile)).toBe(testDialect === 'sqlite');
  }, 120_000);

  it('when started again on the same database, then nothing is migrated or seeded twice and the saved case is there', async () => {
    const second = await start();
    expect(second.server.output()).not.toMatch(/migrations applied/);
    expect(second.server.output()).not.toMatch(/demo data seeded/);
    const list = await second.agent.get('/api/cases?pageSize=200');
    expect(list.body.total).toBe(casesBefore);
    const found = await second.agent.get(`/api/cases/${written.id}`);
    expect(found.status).toBe(200);
    expect(found.body).toMatchObject({ accession: written.accession, patient: { id: written.patientId } });
    const search = await second.agent.get(`/api/cases?q=${encodeURIComponent(written.accession)}`);
    expect(search.body.items.map((c: { id: number }) => c.id)).toEqual([written.id]);
    // The next registration continues the year's accession sequence rather than starting it again.
    const next = await createCase(second.agent as never);
    const seq = (a: string) => Number(a.split('-').at(-1));
    expect(seq(next.accession)).toBe(seq(written.accession) + 1);
  }, 120_000);
});
