import { describe, expect, it } from 'vitest';
import { registeredRouteKeys } from '../../server/lib/route';
import { makeCtx, walk, type Rows } from './role-matrix/harness';
import { accountRows } from './role-matrix/rows-accounts';
import { caseworkRows } from './role-matrix/rows-casework';
import { intervalAndQcRows } from './role-matrix/rows-intervals-qc';
import { reportRows } from './role-matrix/rows-reports';

/*
 * The role × route matrix, part 1 of 4: session, accounts, profile, audit trail and assay definitions; and the
 * check that every route the server registers has a hand-written row (a route added without one fails here).
 * The other parts: role-matrix-casework, role-matrix-intervals-qc and role-matrix-reports (one app per file).
 */

// Built while the file is collected, so the routes the app registers are known before the tests are listed.
const ctx = await makeCtx();
const parts: Rows[] = [accountRows(ctx), caseworkRows(ctx), intervalAndQcRows(ctx), reportRows(ctx)];

describe('the hand-written matrix covers the server', () => {
  const written = parts.flatMap((p) => Object.keys(p));

  it('when the app is built, then it registers routes (the walk is not empty)', () => {
    expect(registeredRouteKeys.size).toBeGreaterThan(80);
  });

  it('when a route is registered, then the matrix has a row for it (no route goes unchecked)', () => {
    const missing = [...registeredRouteKeys].filter((k) => !written.includes(k));
    expect(missing, 'routes registered by the server without a row in the matrix').toEqual([]);
  });

  it('when the matrix has a row, then the server registers that route, and no row is written twice', () => {
    expect(written.filter((k) => !registeredRouteKeys.has(k as never))).toEqual([]);
    expect(new Set(written).size).toBe(written.length);
  });
});

describe('role × route: session, accounts, profile, audit, definitions', () => {
  walk(ctx, parts[0]!);
});
