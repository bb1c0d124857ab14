import { expect } from 'vitest';
import type { Role } from '@/schemas/common';
import { currentDefinitions } from '../../factories/workup';
import { DEMO_PASSWORD } from '../../setup/test-app';
import { CI_RATES_ACTIVITY, nextSerial, ok } from './fixtures';
import { perCall, type Ctx, type Rows } from './harness';

/*
 * Session, accounts, laboratory profile, audit trail and assay definitions. Statuses from docs/api.md ("Session and
 * accounts", "Assay definitions and the calculation preview"); where the docs name none, a read answers 200, a
 * create 201 and a change 200 [common practice for HTTP APIs, RFC 9110 §15.3].
 */

/** The demo account of a role, as seeded (server/db/seed/demo.ts names them; invented people). */
const demoEmail = (role: Role) => `${role}@demo.test`;

export function accountRows(ctx: Ctx): Rows {
  const admin = () => ctx.as('admin');
  const director = () => ctx.as('director');

  /** An account an administrator opens: it starts with a temporary password the person must replace. */
  async function newAccount(role: Role = 'technologist') {
    const n = nextSerial();
    const password = `temporary-pass-${n}-xyz`;
    const res = ok(
      await admin().post('/api/users').send({ email: `matrix-${n}@demo.test`, name: `Matrix Person ${n}`, role, password }),
      201,
      'new account',
    );
    return { id: res.body.id as number, email: res.body.email as string, version: res.body.version as number, password };
  }
  const signIn = (email: string, password: string) => ctx.anonymous().post('/api/auth/login').send({ email, password });

  /** A draft of a new version of one assay's definition, drafted by `who`; a code with no draft pending is picked. */
  async function definitionDraft(who: 'director' | 'director2') {
    const list = ok(await director().get('/api/assay-definitions'), 200, 'definitions');
    const pending = new Set((list.body.drafts as { definition: { code: string } }[]).map((d) => d.definition.code));
    const def = (await currentDefinitions(director())).find((d) => !pending.has(d.code))!;
    const { code, version, ...fields } = def;
    const res = ok(
      await ctx
        .as(who)
        .post(`/api/assay-definitions/${encodeURIComponent(code)}/versions`)
        .send({ definition: { ...fields, epsilonSource: `${fields.epsilonSource} (re-read ${nextSerial()})` }, changeNote: 'Matrix draft', basedOnVersion: version }),
      201,
      'definition draft',
    );
    return { code, version: res.body.definition.version as number };
  }
  const codePath = (code: string) => encodeURIComponent(code);
  const accountFor = perCall(() => newAccount());
  const draftToApprove = perCall(() => definitionDraft('director2'));
  const draftToWithdraw = perCall(() => definitionDraft('director'));

  return {
    'GET /api/health': {
      status: 200,
      call: async () => ({ send: (c) => c.get('/api/health'), check: (res) => expect(res.body).toEqual({ status: 'ok' }) }),
    },
    'POST /api/auth/login': {
      status: 200,
      // Anonymous signs in as the technologist; a signed-in caller signs in again as itself, on an agent of its own.
      call: async (caller) => {
        const role: Role = caller === 'anonymous' ? 'technologist' : caller;
        const own = caller === 'anonymous' ? ctx.anonymous() : await ctx.t.signedIn(caller);
        return {
          send: () => own.post('/api/auth/login').send({ email: demoEmail(role), password: DEMO_PASSWORD }),
          check: async (res) => {
            expect(res.body.user).toMatchObject({ email: demoEmail(role), role });
            expect((await own.get('/api/auth/me')).body.user.email).toBe(demoEmail(role));
          },
        };
      },
    },
    'POST /api/auth/logout': {
      status: 204,
      call: async (caller) => {
        const own = caller === 'anonymous' ? null : await ctx.t.signedIn(caller);
        return {
          send: (c) => (own ?? c).post('/api/auth/logout').send({}),
          check: async () => expect((await own!.get('/api/auth/me')).status).toBe(401),
        };
      },
    },
    'GET /api/auth/me': {
      status: 200,
      call: async (caller) => ({ send: (c) => c.get('/api/auth/me'), check: (res) => expect(res.body.user.role).toBe(caller) }),
    },
    'POST /api/auth/password': {
      status: 204,
      // A new account of the caller's role, so no demo password changes: signed in with its temporary password,
      // it chooses its own (the one change open before the forced one is done).
      call: async (caller) => {
        if (caller === 'anonymous') {
          return { send: (c) => c.post('/api/auth/password').send({ currentPassword: DEMO_PASSWORD, newPassword: 'never-applied-pass-1' }), check: () => undefined };
        }
        const account = await newAccount(caller);
        const own = ctx.anonymous();
        ok(await own.post('/api/auth/login').send({ email: account.email, password: account.password }), 200, 'temporary sign-in');
        const chosen = `chosen-by-${account.email}`;
        return {
          send: () => own.post('/api/auth/password').send({ currentPassword: account.password, newPassword: chosen }),
          check: async () => {
            const again = ok(await signIn(account.email, chosen), 200, 'sign-in with the chosen password');
            expect(again.body.user).toMatchObject({ role: caller, mustChangePassword: false });
          },
        };
      },
    },
    'GET /api/lab-profile': {
      status: 200,
      call: async () => ({
        send: (c) => c.get('/api/lab-profile'),
        check: (res) => expect(res.body.accreditationNumber).toBe('DEMO-ACC-0000'),
      }),
    },
    'PUT /api/lab-profile': {
      status: 200,
      call: async () => {
        const seen = ok(await admin().get('/api/lab-profile'), 200, 'profile').body;
        const phone = `+00 0000 ${String(nextSerial()).padStart(6, '0')}`;
        const { name, addressLines, accreditationNumber, timeZone, version } = seen;
        return {
          send: (c) => c.put('/api/lab-profile').send({ name, addressLines, accreditationNumber, phone, timeZone, version }),
          check: (res) => expect(res.body).toMatchObject({ phone, version: version + 1 }),
        };
      },
    },
    'GET /api/users': {
      status: 200,
      call: async () => ({
        send: (c) => c.get('/api/users'),
        check: (res) => expect(res.body.items.map((u: { email: string }) => u.email)).toContain('director2@demo.test'),
      }),
    },
    'POST /api/users': {
      status: 201,
      call: async () => {
        const email = `matrix-new-${nextSerial()}@demo.test`;
        return {
          send: (c) => c.post('/api/users').send({ email, name: 'Matrix Newcomer', role: 'clinician', password: 'temporary-pass-abc' }),
          check: (res) => expect(res.body).toMatchObject({ email, role: 'clinician', id: expect.any(Number) }),
        };
      },
    },
    'PATCH /api/users/:id': {
      status: 200,
      call: async (_caller, permitted) => {
        const account = await accountFor(permitted);
        return {
          send: (c) => c.patch(`/api/users/${account.id}`).send({ title: 'Bench lead (matrix)', version: account.version }),
          check: (res) => expect(res.body).toMatchObject({ id: account.id, title: 'Bench lead (matrix)' }),
        };
      },
    },
    'POST /api/users/:id/password': {
      status: 204,
      call: async () => {
        const account = await newAccount();
        return {
          send: (c) => c.post(`/api/users/${account.id}/password`).send({ password: 'reset-by-admin-123' }),
          check: async () => {
            const res = ok(await signIn(account.email, 'reset-by-admin-123'), 200, 'sign-in with the reset password');
            expect(res.body.user.mustChangePassword).toBe(true);
          },
        };
      },
    },
    'GET /api/clinicians': {
      status: 200,
      call: async () => ({
        send: (c) => c.get('/api/clinicians'),
        check: (res) => expect(res.body.items.map((u: { id: number }) => u.id)).toEqual(expect.arrayContaining([ctx.clinicianId(), ctx.clinician2Id()])),
      }),
    },
    'GET /api/audit': {
      status: 200,
      // Accounts' events: both readers see them (every sign-in of this file is one).
      call: async () => ({
        send: (c) => c.get('/api/audit?entity=user'),
        check: (res) => {
          expect(res.body.total).toBeGreaterThan(0);
          expect(res.body.items.length).toBeGreaterThan(0);
          for (const e of res.body.items) expect(e.entity).toBe('user');
        },
      }),
    },
    'GET /api/assay-definitions': {
      status: 200,
      call: async () => ({
        send: (c) => c.get('/api/assay-definitions'),
        check: (res) =>
          expect(res.body.items.map((d: { definition: { code: string } }) => d.definition.code).sort()).toEqual(
            // The seven assays of the brief: complexes I–IV, the linked I+III and II+III, and citrate synthase.
            ['CI', 'CI+III', 'CII', 'CII+III', 'CIII', 'CIV', 'CS'],
          ),
      }),
    },
    'GET /api/assay-definitions/:code/versions': {
      status: 200,
      call: async () => ({
        send: (c) => c.get('/api/assay-definitions/CS/versions'),
        check: (res) => {
          expect(res.body.items.length).toBeGreaterThan(0);
          for (const v of res.body.items) expect(v.definition.code).toBe('CS');
        },
      }),
    },
    'POST /api/assay-definitions/:code/versions': {
      status: 201,
      call: async () => {
        const def = (await currentDefinitions(director())).find((d) => d.code === 'CIII')!;
        const { code, version, ...fields } = def;
        return {
          send: (c) =>
            c.post(`/api/assay-definitions/${code}/versions`).send({ definition: { ...fields, lagMaxS: 90 }, changeNote: 'Shorter lag (matrix)', basedOnVersion: version }),
          check: (res) => expect(res.body).toMatchObject({ status: 'draft', definition: { code: 'CIII', lagMaxS: 90, version: version + 1 } }),
        };
      },
    },
    'POST /api/assay-definitions/:code/versions/:version/approve': {
      status: 200,
      // Drafted by the second director, so the demo director is the second pair of eyes.
      call: async (_caller, permitted) => {
        const draft = await draftToApprove(permitted);
        return {
          send: (c) => c.post(`/api/assay-definitions/${codePath(draft.code)}/versions/${draft.version}/approve`).send({}),
          check: (res) => expect(res.body).toMatchObject({ status: 'approved', definition: { code: draft.code, version: draft.version } }),
        };
      },
    },
    'POST /api/assay-definitions/:code/versions/:version/withdraw': {
      status: 200,
      call: async (_caller, permitted) => {
        const draft = await draftToWithdraw(permitted);
        return {
          send: (c) => c.post(`/api/assay-definitions/${codePath(draft.code)}/versions/${draft.version}/withdraw`).send({ reason: 'Drafted by mistake (matrix)' }),
          check: (res) => expect(res.body).toMatchObject({ status: 'withdrawn', definition: { code: draft.code, version: draft.version } }),
        };
      },
    },
    'POST /api/calculations/activity': {
      status: 200,
      call: async () => {
        // A straight CI trace falling 0.0248 A/min for 5 min, 40 µg protein in 1 mL, 1 cm, no background.
        const total = Array.from({ length: 31 }, (_, i) => ({ t: i * 10, a: 1.2 - (0.0248 * i * 10) / 60 }));
        return {
          send: (c) =>
            c.post('/api/calculations/activity').send({ assay: 'CI', pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 10, proteinMgPerMl: 4, total }),
          check: (res) => {
            expect(res.body.unit).toBe('nmol/min/mg protein');
            expect(res.body.activity).toBeCloseTo(CI_RATES_ACTIVITY, 0);
          },
        };
      },
    },
  };
}
