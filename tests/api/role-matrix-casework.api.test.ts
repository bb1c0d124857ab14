import { describe } from 'vitest';
import { makeCtx, walk } from './role-matrix/harness';
import { caseworkRows } from './role-matrix/rows-casework';

/*
 * The role × route matrix, part 2 of 4: patients, cases, specimens, assay work, plate files and maps, results,
 * submission and runs. See role-matrix.api.test.ts for the whole and for the completeness check.
 */
const ctx = await makeCtx();

describe('role × route: case work', () => {
  walk(ctx, caseworkRows(ctx));
});
