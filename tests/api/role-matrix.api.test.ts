import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { registeredRouteKeys, splitKey } from '../../server/lib/route';
import { roles, type Role } from '@/schemas/common';
import { ORIGIN, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Who may call what, written from the product brief's role table (shared/docs/product.md, "Who uses it") and
 * the issues that refined it — never from server/auth/permissions.ts. The server's own table is checked against
 * this one, route by route and role by role, so a wrong row there fails here.
 *
 * - technologist: cases, patients, specimens, protein, assay data, results, submission; reads definitions,
 *   intervals and reports of the laboratory; never signs, never changes definitions or intervals.
 * - director: all of that, plus definitions, intervals and their control data, review, signing, corrections,
 *   reopening, rejection reasons; reads the whole audit trail.
 * - clinician: the reports of their own referrals (list, one report, its PDF) and their cases in progress.
 * - admin: accounts, the laboratory profile, the mail outbox, and the non-clinical audit trail; no clinical data.
 */
type Expected = 'public' | 'signed-in' | readonly Role[];
const LAB: readonly Role[] = ['technologist', 'director'];

function expected(method: string, path: string): Expected {
  const route = `${method.toUpperCase()} ${path}`;
  if (route === 'GET /api/health' || route === 'POST /api/auth/login') return 'public';
  if (path.startsWith('/api/auth/') || route === 'GET /api/lab-profile') return 'signed-in';
  if (path === '/api/lab-profile' || path.startsWith('/api/users') || path.startsWith('/api/outbox')) return ['admin'];
  if (path === '/api/audit') return ['admin', 'director'];
  if (path === '/api/reports/in-progress') return ['clinician'];
  if (path.startsWith('/api/reports')) return [...LAB, 'clinician'];
  // Signing, corrections, reopening and review are the director's.
  if (/^\/api\/cases\/:id\/(sign|correct|amend)$/.test(path) || path.startsWith('/api/review')) return ['director'];
  // Definitions and intervals: everyone in the laboratory reads them; only a director changes them.
  if (path.startsWith('/api/assay-definitions') || path.startsWith('/api/rejection-reasons')) {
    return method === 'get' ? LAB : ['director'];
  }
  if (path.startsWith('/api/reference-intervals')) {
    // The control data behind an interval is interval-management work, except reading the file an
    // interval's history links to, which every laboratory reader of that history may open.
    if (path === '/api/reference-intervals/controls/:id/file') return LAB;
    if (path.startsWith('/api/reference-intervals/controls')) return ['director'];
    // derive, verify and partition are calculations a director does while managing intervals.
    return method === 'get' ? LAB : ['director'];
  }
  // The registry export, identified or de-identified, is the director's alone (issue 13: "directors only; others 403").
  if (path === '/api/registry/export.csv') return ['director'];
  // Cohort search, its plots and saved searches: directors and technologists (issue 13), never clinicians or admins.
  if (path.startsWith('/api/registry/cohort') || path.startsWith('/api/registry/saved-searches')) return LAB;
  // Quality control (issue 12): the stateless Westgard evaluation is for technologists and directors; the rule
  // selection, control materials and their targets are read by the laboratory and changed only by a director.
  if (path === '/api/qc/evaluate') return LAB;
  if (path === '/api/qc/rules' || path.startsWith('/api/control-materials') || path.startsWith('/api/control-targets')) {
    return method === 'get' ? LAB : ['director'];
  }
  // Runs (issue 12): the laboratory imports and reads runs; "a director can release them only with a documented
  // override", so the override is the director's alone.
  if (path === '/api/runs/:id/override') return ['director'];
  // Everything else is assay work on cases: the laboratory only.
  return LAB;
}

// Built while the file is collected, so the routes the app registers are known before the tests are listed.
const t: TestApp = await makeTestApp();
const agents = new Map<Role, Awaited<ReturnType<TestApp['signedIn']>>>();
beforeAll(async () => {
  for (const role of roles) agents.set(role, await t.signedIn(role));
});
afterAll(() => t.close());

// Sign-out ends the agent's session, so it is walked last.
const keys = [...registeredRouteKeys].sort((a, b) => Number(a.includes('logout')) - Number(b.includes('logout')));

function send(agent: request.Agent | ReturnType<typeof request>, key: string) {
  const { method, path } = splitKey(key as Parameters<typeof splitKey>[0]);
  const req = (agent as request.Agent)[method](path.replace(/:(\w+)/g, '999999')).set('Origin', ORIGIN);
  return method === 'get' ? req : req.send({});
}

const allowed = (e: Expected, role: Role) => e === 'public' || e === 'signed-in' || e.includes(role);

describe('role × route, against the brief', () => {
  it('when the app is built, then it has routes to check (the walk below is not empty)', () => {
    expect(keys.length).toBeGreaterThan(80);
  });

  for (const key of keys) {
    const { method, path } = splitKey(key as Parameters<typeof splitKey>[0]);
    const e = expected(method, path);
    it(`${key}: anonymous → ${e === 'public' ? 'not refused' : '401'}`, async () => {
      const res = await send(request(t.app), key);
      if (e === 'public') expect([401, 403]).not.toContain(res.status);
      else {
        expect(res.status).toBe(401);
        expect(res.body.error.code).toBe('UNAUTHENTICATED');
      }
      expect(res.status).toBeLessThan(500);
    });
    it.each(roles)(`${key}: as %s, refused exactly when the brief says so, and never a 500`, async (role) => {
      const res = await send(agents.get(role)!, key);
      if (allowed(e, role)) expect([401, 403]).not.toContain(res.status);
      else {
        expect(res.status).toBe(403);
        expect(res.body.error.code).toBe('FORBIDDEN');
      }
      expect(res.status).toBeLessThan(500);
    });
  }
});
