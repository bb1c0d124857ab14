import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ORIGIN, countRows, makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
let admin: Awaited<ReturnType<TestApp['signedIn']>>;
beforeAll(async () => {
  t = await makeTestApp();
  admin = await t.signedIn('admin');
});
afterAll(() => t.close());

/** Sends a bad request and proves nothing was written to users or the audit trail. */
async function expectNothingWritten(send: () => Promise<request.Response>) {
  const before = [await countRows(t.sequelize, 'users'), await countRows(t.sequelize, 'audit_events')];
  const res = await send();
  const after = [await countRows(t.sequelize, 'users'), await countRows(t.sequelize, 'audit_events')];
  expect(after).toEqual(before);
  expect(res.body.error).toBeDefined();
  expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts:\d+|SELECT|INSERT|sqlite/i);
  return res;
}

const valid = { email: 'new.person@demo.test', name: 'New Person', role: 'technologist', password: 'long-enough-pass' };

describe('bad input gets a clear 4xx JSON error and nothing is written', () => {
  it('when the JSON is malformed, then 400 MALFORMED_JSON', async () => {
    const res = await expectNothingWritten(() =>
      admin.post('/api/users').set('Content-Type', 'application/json').send('{"email": "x@demo.test", '),
    );
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('MALFORMED_JSON');
  });

  it('when a field has the wrong type, then 400 naming that field', async () => {
    const res = await expectNothingWritten(() => admin.post('/api/users').send({ ...valid, name: 42 }));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(Object.keys(res.body.error.fields)).toEqual(['name']);
  });

  it('when an unknown field is sent, then 400 naming the unknown field', async () => {
    const res = await expectNothingWritten(() => admin.post('/api/users').send({ ...valid, isSuperuser: true }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ isSuperuser: 'Unknown field' });
  });

  it('when a string is longer than allowed, then 400 naming the field', async () => {
    const res = await expectNothingWritten(() => admin.post('/api/users').send({ ...valid, name: 'x'.repeat(500) }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.name).toMatch(/120/);
  });

  it('when the role is not one of the four, then 400 naming role', async () => {
    const res = await expectNothingWritten(() => admin.post('/api/users').send({ ...valid, role: 'superuser' }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('role');
  });

  it('when the body is larger than the limit, then 413 TOO_LARGE', async () => {
    const res = await expectNothingWritten(() =>
      admin.post('/api/users').send({ ...valid, name: 'y'.repeat(300 * 1024) }),
    );
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('TOO_LARGE');
  });

  it('when the id in the path is not a number, then 400 naming id', async () => {
    const res = await expectNothingWritten(() => admin.patch('/api/users/abc').send({ version: 0, name: 'Z' }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('id');
  });

  it('when the API route does not exist, then 404 NOT_FOUND as JSON', async () => {
    const res = await request(t.app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
  });

  it('when an e-mail is already in use, then 409 CONFLICT naming email, and one account stays', async () => {
    const res = await expectNothingWritten(() =>
      admin.post('/api/users').set('Origin', ORIGIN).send({ ...valid, email: 'director@demo.test' }),
    );
    expect(res.status).toBe(409);
    expect(res.body.error.fields).toHaveProperty('email');
  });
});
