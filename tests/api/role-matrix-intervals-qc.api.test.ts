import { describe } from 'vitest';
import { makeCtx, walk } from './role-matrix/harness';
import { intervalAndQcRows } from './role-matrix/rows-intervals-qc';

/*
 * The role × route matrix, part 3 of 4: reference intervals and their control data, quality control, control
 * materials and targets. See role-matrix.api.test.ts for the whole and for the completeness check.
 */
const ctx = await makeCtx();

describe('role × route: reference intervals and quality control', () => {
  walk(ctx, intervalAndQcRows(ctx));
});
