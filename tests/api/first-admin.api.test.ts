import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { countActiveAdministrators, createAdministrator, ensureFirstAdministrator } from '../../server/ops/first-admin';
import { countRows, makeTestApp, ORIGIN, type TestApp } from '../setup/test-app';
import request from 'supertest';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const spec = { email: 'First.Admin@Fernhollow.test', password: 'the first administrator', name: 'Wren Aldous' };

describe('first administrator', () => {
  it('when an active administrator exists, then the start-up variables create nothing', async () => {
    const before = await countRows(t.sequelize, 'users');
    expect(await ensureFirstAdministrator(t.sequelize, spec)).toBeNull();
    expect(await countRows(t.sequelize, 'users')).toBe(before);
  });

  it('when no administrator is active, then one is created, audited without the password, and can sign in', async () => {
    await t.sequelize.query("UPDATE users SET active = false WHERE role = 'admin'");
    expect(await countActiveAdministrators()).toBe(0);
    const created = await ensureFirstAdministrator(t.sequelize, spec);
    expect(created).toMatchObject({ email: 'first.admin@fernhollow.test', role: 'admin', active: true, name: 'Wren Aldous' });
    const [events] = await t.sequelize.query(
      `SELECT "actorId", note, "after" FROM audit_events WHERE entity = 'user' AND "entityId" = '${created!.id}' AND action = 'create'`,
    );
    expect(events).toEqual([{ actorId: null, note: 'administrator created by BOOTSTRAP_ADMIN_EMAIL at start-up', after: expect.any(String) }]);
    expect((events as { after: string }[])[0]!.after).not.toContain(spec.password);

    const login = await request(t.app).post('/api/auth/login').set('Origin', ORIGIN).send({ email: spec.email, password: spec.password });
    expect(login.status).toBe(200);
    expect(login.body.user).toMatchObject({ role: 'admin' });
    // Idempotent: the next start finds it.
    expect(await ensureFirstAdministrator(t.sequelize, { ...spec, email: 'another@fernhollow.test' })).toBeNull();
  });

  it('when the e-mail address already belongs to someone, then 409-style refusal and no account changes role', async () => {
    const users = await countRows(t.sequelize, 'users');
    const audit = await countRows(t.sequelize, 'audit_events');
    await expect(createAdministrator(t.sequelize, { ...spec, email: 'technologist@demo.test' }, 'npm run create-admin')).rejects.toMatchObject({
      code: 'CONFLICT',
    });
    const [rows] = await t.sequelize.query("SELECT role FROM users WHERE email = 'technologist@demo.test'");
    expect(rows).toEqual([{ role: 'technologist' }]);
    expect(await countRows(t.sequelize, 'users')).toBe(users);
    expect(await countRows(t.sequelize, 'audit_events')).toBe(audit);
  });

  it('when two creations race for the same address, then exactly one account exists', async () => {
    const racer = { ...spec, email: 'race@fernhollow.test' };
    const results = await Promise.allSettled([1, 2, 3].map(() => createAdministrator(t.sequelize, racer, 'npm run create-admin')));
    expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
    const [rows] = await t.sequelize.query("SELECT COUNT(*) AS n FROM users WHERE email = 'race@fernhollow.test'");
    expect(rows).toEqual([{ n: 1 }]);
  });
});
