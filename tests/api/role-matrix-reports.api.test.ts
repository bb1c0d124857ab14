import { describe } from 'vitest';
import { makeCtx, walk } from './role-matrix/harness';
import { clinicianOwnReports, reportRows } from './role-matrix/rows-reports';

/*
 * The role × route matrix, part 4 of 4: reports, review, signing, corrections, the mail outbox and the registry.
 * See role-matrix.api.test.ts for the whole and for the completeness check.
 */
const ctx = await makeCtx();

describe('role × route: reports, review, signing, outbox, registry', () => {
  walk(ctx, reportRows(ctx));
});

describe("a clinician's own reports and no one else's", () => {
  clinicianOwnReports(ctx);
});
