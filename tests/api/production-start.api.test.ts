import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openSqliteFile } from '../../server/ops/sqlite-file';
import { freePort } from '../setup/free-port';
import { runTs, startServerProcess, tempDataDir, type ServerProcess } from '../setup/server-process';

// The real server as a laboratory's IT would start it: `node --import tsx server/index.ts` with its environment.
const SECRET = 'f3Kq9-production-secret-for-tests-only-7Yx2';
const ADMIN = { email: 'it.desk@fernhollow.test', password: 'a sentence for the first admin' };
const PUBLIC_ORIGIN = 'https://cristae.fernhollow.test';

const dirs: string[] = [];
const servers: ServerProcess[] = [];
afterAll(async () => {
  for (const s of servers) await s.stop();
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
});
function freshDb(): string {
  const dir = tempDataDir();
  dirs.push(dir);
  return path.join(dir, 'cristae.sqlite');
}

async function startProduction(dbPath: string, env: Record<string, string>): Promise<{ code: number | null; stderr: string }> {
  return runTs('server/index.ts', [], { NODE_ENV: 'production', DATABASE_PATH: dbPath, PORT: String(await freePort()), ...env });
}

async function tableCounts(dbPath: string, tables: string[]): Promise<Record<string, number>> {
  const db = await openSqliteFile(dbPath, { readOnly: true });
  try {
    const out: Record<string, number> = {};
    for (const t of tables) out[t] = (await db.all<{ n: number }>(`SELECT COUNT(*) AS n FROM "${t}"`))[0]!.n;
    return out;
  } finally {
    await db.close();
  }
}

describe('production start-up refuses an unsafe environment', () => {
  it.each([
    ['is missing', {}, /SESSION_SECRET: required in production/],
    ['is the development value', { SESSION_SECRET: 'cristae-local-session-secret-change-me' }, /SESSION_SECRET: is the public development value/],
    ['is shorter than 32 characters', { SESSION_SECRET: 'only-twenty-chars-xx' }, /SESSION_SECRET: must be at least 32 characters in production \(it has 20\)/],
  ])('when SESSION_SECRET %s, then the server exits non-zero naming it and writes no database', async (_what, env, message) => {
    const dbPath = freshDb();
    const result = await startProduction(dbPath, env);
    expect(result.code).not.toBe(0);
    expect(result.code).not.toBeNull();
    expect(result.stderr).toMatch(message);
    expect(fs.existsSync(dbPath)).toBe(false);
  }, 60_000);

  it('when several settings are wrong, then each gets its own line naming its variable', async () => {
    const result = await startProduction(freshDb(), {
      SESSION_SECRET: SECRET,
      TRUST_PROXY: 'the-proxy',
      BOOTSTRAP_ADMIN_EMAIL: ADMIN.email,
      SEED_DEMO: '1',
    });
    expect(result.code).toBe(1);
    const problems = result.stderr.split('\n').filter((l) => l.startsWith('  - '));
    expect(problems).toHaveLength(3);
    expect(problems.map((l) => l.slice(4).split(':')[0]).sort()).toEqual(['BOOTSTRAP_ADMIN_PASSWORD', 'DEMO_PASSWORD', 'TRUST_PROXY']);
  }, 60_000);

  it('when the bootstrap password breaks the password rule (12 characters at least), then it exits naming it', async () => {
    const result = await startProduction(freshDb(), { SESSION_SECRET: SECRET, BOOTSTRAP_ADMIN_EMAIL: ADMIN.email, BOOTSTRAP_ADMIN_PASSWORD: 'elevenchars' });
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/BOOTSTRAP_ADMIN_PASSWORD: Use at least 12 characters/);
  }, 60_000);
});

describe('production on an empty database behind a TLS proxy', () => {
  it('creates the bootstrap administrator and no demo data; the proxied sign-in sets a Secure cookie that then works', async () => {
    const dbPath = freshDb();
    const env = {
      NODE_ENV: 'production',
      SESSION_SECRET: SECRET,
      TRUST_PROXY: '1',
      APP_ORIGIN: PUBLIC_ORIGIN,
      BOOTSTRAP_ADMIN_EMAIL: ADMIN.email,
      BOOTSTRAP_ADMIN_PASSWORD: ADMIN.password,
    };
    const server = await startServerProcess(env, dbPath);
    servers.push(server);
    // What the TLS terminator forwards: the browser's origin, and that the browser spoke HTTPS.
    const proxied = { Origin: PUBLIC_ORIGIN, 'X-Forwarded-Proto': 'https', 'X-Forwarded-For': '198.51.100.23', 'Content-Type': 'application/json' };

    // Straight to the server over plain HTTP (no X-Forwarded-Proto): the Secure cookie could not be kept, so the
    // sign-in is refused with the reason, not answered 200 with no session.
    const { 'X-Forwarded-Proto': _https, ...plainHttp } = proxied;
    const plain = await fetch(`${server.origin}/api/auth/login`, { method: 'POST', headers: plainHttp, body: JSON.stringify(ADMIN) });
    expect(plain.status).toBe(403);
    expect(plain.headers.getSetCookie()).toEqual([]);
    expect((await plain.json()).error.message).toMatch(/^Signing in needs HTTPS.*TRUST_PROXY/);

    const demo = await fetch(`${server.origin}/api/auth/login`, { method: 'POST', headers: proxied, body: JSON.stringify({ email: 'admin@demo.test', password: 'cristae-demo' }) });
    expect(demo.status).not.toBe(200);

    const login = await fetch(`${server.origin}/api/auth/login`, { method: 'POST', headers: proxied, body: JSON.stringify(ADMIN) });
    expect(login.status).toBe(200);
    const setCookie = login.headers.getSetCookie().find((c) => c.startsWith('cristae.sid='));
    // RFC 6265 §4.1.2.5: the Secure attribute keeps the cookie to HTTPS [confirmed].
    expect(setCookie).toMatch(/;\s*Secure/i);
    expect(setCookie).toMatch(/;\s*HttpOnly/i);

    const me = await fetch(`${server.origin}/api/auth/me`, { headers: { ...proxied, Cookie: setCookie!.split(';')[0]! } });
    expect(me.status).toBe(200);
    expect((await me.json()).user).toMatchObject({ email: ADMIN.email, role: 'admin' });
    expect(await server.stop()).toBe(0);

    expect(await tableCounts(dbPath, ['users', 'patients', 'cases', 'specimens', 'reports', 'reference_intervals'])).toEqual({
      users: 1,
      patients: 0,
      cases: 0,
      specimens: 0,
      reports: 0,
      reference_intervals: 0,
    });
    const db = await openSqliteFile(dbPath, { readOnly: true });
    const [account] = await db.all<{ email: string; role: string; passwordHash: string }>('SELECT email, role, passwordHash FROM users');
    const events = await db.all<{ action: string; entity: string; actorId: number | null; note: string; after: string }>(
      "SELECT action, entity, actorId, note, after FROM audit_events WHERE entity = 'user' AND action = 'create'",
    );
    await db.close();
    expect(account).toMatchObject({ email: ADMIN.email, role: 'admin' });
    expect(account!.passwordHash).not.toContain(ADMIN.password);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ actorId: null, note: expect.stringContaining('BOOTSTRAP_ADMIN_EMAIL') });
    expect(events[0]!.after).not.toContain(ADMIN.password);

    // Once an administrator exists the variables change nothing, even when they name someone else.
    const again = await startServerProcess({ ...env, BOOTSTRAP_ADMIN_EMAIL: 'someone.else@fernhollow.test' }, dbPath);
    servers.push(again);
    expect(await again.stop()).toBe(0);
    expect(await tableCounts(dbPath, ['users'])).toEqual({ users: 1 });
  }, 180_000);
});
