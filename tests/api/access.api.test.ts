import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { permissions } from '../../server/auth/permissions';
import { registeredRouteKeys } from '../../server/lib/route';
import { makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

describe('the permissions table', () => {
  it('when the app is built, then every route in the table is registered and nothing else is', () => {
    expect([...registeredRouteKeys].sort()).toEqual(Object.keys(permissions).sort());
  });

  // Who may call each route is checked against the brief, independently of this table, in role-matrix.api.test.ts.
});
