import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { verifyPassword } from '../../server/auth/password';
import { openSqliteFile } from '../../server/ops/sqlite-file';
import { runTs, tempDataDir } from '../setup/server-process';

// `npm run create-admin -- --email ...` as an operator runs it, on a database the server has never opened.
const dir = tempDataDir();
const dbPath = path.join(dir, 'cristae.sqlite');
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const createAdmin = (args: string[], env: Record<string, string> = {}, stdin?: string) =>
  runTs('scripts/create-admin.ts', args, { DATABASE_PATH: dbPath, ...env }, stdin);

async function admins(): Promise<{ email: string; name: string; passwordHash: string }[]> {
  const db = await openSqliteFile(dbPath, { readOnly: true });
  try {
    return await db.all("SELECT email, name, passwordHash FROM users WHERE role = 'admin' ORDER BY id");
  } finally {
    await db.close();
  }
}

describe('npm run create-admin', () => {
  it('when the password is piped on stdin, then the administrator is created on a new database and audited', async () => {
    const result = await createAdmin(['--email', 'Night.Desk@Fernhollow.test', '--name', 'Nell Archer'], {}, 'piped in from a vault\n');
    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    const [account] = await admins();
    expect(account).toMatchObject({ email: 'night.desk@fernhollow.test', name: 'Nell Archer' });
    expect(await verifyPassword('piped in from a vault', account!.passwordHash)).toBe(true);
    const db = await openSqliteFile(dbPath, { readOnly: true });
    const events = await db.all<{ note: string; actorId: number | null }>("SELECT note, actorId FROM audit_events WHERE entity = 'user'");
    await db.close();
    expect(events).toEqual([{ note: 'administrator created by npm run create-admin', actorId: null }]);
  }, 60_000);

  it('when the password is on the command line, then it refuses (exit 2) and creates nothing', async () => {
    const result = await createAdmin(['--email', 'argv@fernhollow.test', '--password', 'visible in ps output'], {}, '');
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(/the password is never taken from the command line/);
    expect(await admins()).toHaveLength(1);
  }, 60_000);

  it.each([
    ['a password shorter than 12 characters', ['--email', 'short@fernhollow.test'], { ADMIN_PASSWORD: 'too short' }, /password: Use at least 12 characters/],
    ['an address that already has an account', ['--email', 'night.desk@fernhollow.test'], { ADMIN_PASSWORD: 'another long password' }, /already exists/],
  ])('when given %s, then it refuses (exit 1) and creates nothing', async (_what, args, env, message) => {
    const result = await createAdmin(args, env);
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(message);
    expect(await admins()).toHaveLength(1);
  }, 60_000);

  it('when ADMIN_PASSWORD is set, then a second administrator can be added (recovery when the only one is lost)', async () => {
    const result = await createAdmin(['--email', 'second@fernhollow.test'], { ADMIN_PASSWORD: 'a recovery passphrase' });
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/administrator second@fernhollow.test created .*; 1 other active administrator/);
    expect((await admins()).map((a) => a.email)).toEqual(['night.desk@fernhollow.test', 'second@fernhollow.test']);
  }, 60_000);
});
