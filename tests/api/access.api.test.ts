import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { allows, permissions, type RouteKey } from '../../server/auth/permissions';
import { registeredRouteKeys, splitKey } from '../../server/lib/route';
import { roles, type Role } from '@/schemas/common';
import { ORIGIN, makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
const agents = new Map<Role, Awaited<ReturnType<TestApp['signedIn']>>>();

beforeAll(async () => {
  t = await makeTestApp();
  for (const role of roles) agents.set(role, await t.signedIn(role));
});
afterAll(() => t.close());

// Sign-out ends the agent's session, so it is walked last.
const keys = (Object.keys(permissions) as RouteKey[]).sort((a, b) => Number(a.includes('logout')) - Number(b.includes('logout')));

function send(agent: request.Agent | ReturnType<typeof request>, key: RouteKey) {
  const { method, path } = splitKey(key);
  const url = path.replace(/:(\w+)/g, '999999');
  const req = (agent as request.Agent)[method](url).set('Origin', ORIGIN);
  return method === 'get' ? req : req.send({});
}

describe('the permissions table', () => {
  it('when the app is built, then every route in the table is registered and nothing else is', () => {
    expect([...registeredRouteKeys].sort()).toEqual([...keys].sort());
  });

  it.each(keys)('%s: anonymous callers get 401 unless the route is public', async (key) => {
    const res = await send(request(t.app), key);
    if (permissions[key] === 'public') expect([401, 403]).not.toContain(res.status);
    else {
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('UNAUTHENTICATED');
    }
  });

  for (const key of keys) {
    it.each(roles)(`${key}: as %s, 403 exactly when the table denies the role`, async (role) => {
      const res = await send(agents.get(role)!, key);
      if (allows(permissions[key], role)) expect([401, 403]).not.toContain(res.status);
      else {
        expect(res.status).toBe(403);
        expect(res.body.error.code).toBe('FORBIDDEN');
      }
    });
  }
});
