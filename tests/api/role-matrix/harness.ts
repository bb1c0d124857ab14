import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roles, type Role } from '@/schemas/common';
import { splitKey } from '../../../server/lib/route';
import { ORIGIN, makeTestApp, type TestApp } from '../../setup/test-app';
import type { Agent } from '../../setup/lab-staff';
import { accountId } from '../../factories/workup';
import { allowed, expected } from './who';

/*
 * The role × route walk. Each row of the matrix (rows-*.ts) says, by hand, for one route:
 * - `status`: the exact status a permitted caller gets for a valid request (from docs/api.md and the issues);
 * - `call(caller, permitted)`: builds that valid request with real ids — from the seeded demo data, or from a
 *   fixture made through the API — and a `check` of the answer's body that shows the handler ran (the id it
 *   created, the record it read back). State-changing routes build a fresh fixture for every permitted call;
 *   refused calls share one fixture per route, since a refusal changes nothing.
 * Who is permitted comes from ./who.ts (the brief's role table), never from the server's permissions table.
 * A permitted caller must get exactly `status`; a refused one exactly 403 FORBIDDEN; anonymous exactly
 * 401 UNAUTHENTICATED (public routes: `status` for everyone).
 */

export type Caller = Role | 'anonymous';
export const callers: readonly Caller[] = ['anonymous', ...roles];

export type Call = {
  /** Sends the request with the caller's client (a signed-in agent, or for anonymous a fresh agent never signed in). */
  send: (client: Agent) => request.Test;
  /** Checks a permitted answer's body: evidence the handler ran and did what the docs say. */
  check: (res: request.Response) => unknown;
};
export type Row = { status: number; call: (caller: Caller, permitted: boolean) => Promise<Call> };
export type Rows = Record<string, Row>;

export type Ctx = {
  t: TestApp;
  /** The agent signed in once for this file as the demo account of that role (or the second director or clinician). */
  as: (who: Role | 'director2' | 'clinician2') => Agent;
  /** A fresh agent with the app's Origin that has never signed in. */
  anonymous: () => Agent;
  /** Account ids of the two demo referring clinicians. */
  clinicianId: () => number;
  clinician2Id: () => number;
};

/** One app for the file and one agent per account, signed in once before the walk. */
export async function makeCtx(): Promise<Ctx> {
  const t = await makeTestApp();
  const agents = new Map<string, Agent>();
  const ids = { clinician: 0, clinician2: 0 };
  beforeAll(async () => {
    const who = [...roles, 'director2', 'clinician2'] as const;
    const signed = await Promise.all(who.map((w) => t.signedIn(w)));
    who.forEach((w, i) => agents.set(w, signed[i]!));
    ids.clinician = await accountId(agents.get('admin')!, 'clinician@demo.test');
    ids.clinician2 = await accountId(agents.get('admin')!, 'clinician2@demo.test');
  });
  afterAll(() => t.close());
  return {
    t,
    as: (who) => agents.get(who)!,
    anonymous: () => {
      const a = request.agent(t.app);
      a.set('Origin', ORIGIN);
      return a;
    },
    clinicianId: () => ids.clinician,
    clinician2Id: () => ids.clinician2,
  };
}

/** A fixture made once, on first use. */
export function once<T>(make: () => Promise<T>): () => Promise<T> {
  let made: Promise<T> | undefined;
  return () => (made ??= make());
}

/** A fresh fixture for every permitted call; one shared fixture for all refused calls of the route. */
export function perCall<T>(make: () => Promise<T>): (permitted: boolean) => Promise<T> {
  const shared = once(make);
  return (permitted) => (permitted ? make() : shared());
}

/** The JSON body, also when the request asked for raw bytes (a refused file download answers a JSON error). */
const jsonOf = (res: request.Response) => (Buffer.isBuffer(res.body) ? JSON.parse(res.body.toString('utf8')) : res.body);
const short = (body: unknown) => (Buffer.isBuffer(body) ? `<${body.length} bytes>` : JSON.stringify(body)?.slice(0, 400));

/** One test per route and caller: the exact status, the body check for a permitted caller, the error code otherwise. */
export function walk(ctx: Ctx, rows: Rows): void {
  for (const [key, row] of Object.entries(rows)) {
    const { method, path } = splitKey(key as Parameters<typeof splitKey>[0]);
    const e = expected(method, path);
    describe(key, () => {
      for (const caller of callers) {
        const permitted = caller === 'anonymous' ? e === 'public' : allowed(e, caller);
        const want = permitted ? row.status : caller === 'anonymous' ? 401 : 403;
        it(`${caller} → ${want}`, async () => {
          const call = await row.call(caller, permitted);
          const res = await call.send(caller === 'anonymous' ? ctx.anonymous() : ctx.as(caller));
          expect(res.status, short(res.body)).toBe(want);
          if (permitted) await call.check(res);
          else expect(jsonOf(res).error.code).toBe(caller === 'anonymous' ? 'UNAUTHENTICATED' : 'FORBIDDEN');
        });
      }
    });
  }
}
