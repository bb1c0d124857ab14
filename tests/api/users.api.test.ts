import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
let admin: Awaited<ReturnType<TestApp['signedIn']>>;
beforeAll(async () => {
  t = await makeTestApp();
  admin = await t.signedIn('admin');
});
afterAll(() => t.close());

async function createAccount(email: string) {
  const res = await admin.post('/api/users').send({ email, name: 'Ada Example', role: 'technologist', password: 'first-password-1' });
  expect(res.status).toBe(201);
  return res.body as { id: number; version: number };
}

describe('account administration', () => {
  it('when an admin creates an account, then the person can sign in with it and the audit trail records it', async () => {
    const created = await createAccount('ada@demo.test');
    const login = await t.agent().post('/api/auth/login').send({ email: 'ada@demo.test', password: 'first-password-1' });
    expect(login.status).toBe(200);
    expect(login.body.user.role).toBe('technologist');
    const audit = await admin.get(`/api/audit?entity=user&entityId=${created.id}`);
    expect(audit.body.items.map((e: { action: string }) => e.action)).toContain('create');
    expect(JSON.stringify(audit.body)).not.toMatch(/passwordHash|scrypt\$/);
  });

  it('when an account is deactivated, then its open session stops working and it cannot sign in', async () => {
    const created = await createAccount('bo@demo.test');
    const person = t.agent();
    await person.post('/api/auth/login').send({ email: 'bo@demo.test', password: 'first-password-1' });
    expect((await person.get('/api/auth/me')).status).toBe(200);
    const off = await admin.patch(`/api/users/${created.id}`).send({ active: false, version: created.version });
    expect(off.status).toBe(200);
    expect(off.body.active).toBe(false);
    expect((await person.get('/api/auth/me')).status).toBe(401);
    const again = await t.agent().post('/api/auth/login').send({ email: 'bo@demo.test', password: 'first-password-1' });
    expect(again.status).toBe(401);
  });

  it('when two admins save the same account, then the second save (stale version) gets 409 and changes nothing', async () => {
    const created = await createAccount('cy@demo.test');
    const first = await admin.patch(`/api/users/${created.id}`).send({ name: 'First Edit', version: created.version });
    expect(first.status).toBe(200);
    const second = await admin.patch(`/api/users/${created.id}`).send({ name: 'Second Edit', version: created.version });
    expect(second.status).toBe(409);
    expect(second.body.error.code).toBe('STALE_VERSION');
    const list = await admin.get('/api/users');
    expect(list.body.items.find((u: { id: number }) => u.id === created.id).name).toBe('First Edit');
  });

  it('when the role is changed, then the next sign-in carries the new role', async () => {
    const created = await createAccount('di@demo.test');
    await admin.patch(`/api/users/${created.id}`).send({ role: 'director', version: created.version });
    const login = await t.agent().post('/api/auth/login').send({ email: 'di@demo.test', password: 'first-password-1' });
    expect(login.body.user.role).toBe('director');
  });

  it('when an admin resets a password, then the old one fails and the new one works', async () => {
    const created = await createAccount('ed@demo.test');
    const reset = await admin.post(`/api/users/${created.id}/password`).send({ password: 'second-password-2' });
    expect(reset.status).toBe(204);
    expect((await t.agent().post('/api/auth/login').send({ email: 'ed@demo.test', password: 'first-password-1' })).status).toBe(401);
    expect((await t.agent().post('/api/auth/login').send({ email: 'ed@demo.test', password: 'second-password-2' })).status).toBe(200);
  });

  it('when an admin tries to deactivate their own account, then 400 and they stay active', async () => {
    const me = await admin.get('/api/auth/me');
    const list = await admin.get('/api/users');
    const self = list.body.items.find((u: { id: number }) => u.id === me.body.user.id);
    const res = await admin.patch(`/api/users/${self.id}`).send({ active: false, version: self.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('active');
  });

  it('when the lab profile is saved, then GET answers the new values and a stale save gets 409', async () => {
    const current = (await admin.get('/api/lab-profile')).body;
    const input = { ...current, name: 'Renamed Example Lab (fictitious)', addressLines: ['1 Test Way'] };
    const saved = await admin.put('/api/lab-profile').send(input);
    expect(saved.status).toBe(200);
    expect(saved.body).toMatchObject({ name: 'Renamed Example Lab (fictitious)', addressLines: ['1 Test Way'], version: current.version + 1 });
    const stale = await admin.put('/api/lab-profile').send(input);
    expect(stale.status).toBe(409);
  });
});

describe('the audit trail is append-only', () => {
  it('when anything tries to change or delete an audit event, then the database refuses', async () => {
    // Sequelize wraps SQLite's RAISE(ABORT) in its own error; the trigger's message is on the original.
    const refusal = (e: { parent?: { message?: string } }) => /append-only/.test(e.parent?.message ?? '');
    await expect(t.sequelize.query(`UPDATE audit_events SET action = 'forged'`)).rejects.toSatisfy(refusal);
    await expect(t.sequelize.query(`DELETE FROM audit_events`)).rejects.toSatisfy(refusal);
    const [rows] = await t.sequelize.query(`SELECT COUNT(*) AS n FROM audit_events WHERE action = 'forged'`);
    expect((rows as { n: number }[])[0]!.n).toBe(0);
  });
});
