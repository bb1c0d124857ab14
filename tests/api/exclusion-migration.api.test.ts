import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import { createMigrator } from '../../server/db/migrate';
import { openDatabase } from '../../server/db/sequelize';

/*
 * Migration 0011 gives measurements an exclusion (reason, who, when) and the instant they were first part of a
 * submission. Measurements of a case that already holds a results snapshot were submitted: they must come out
 * marked, others not; going back down must keep every row and the one-replicate-per-key rule. Invented rows.
 */

let db: Sequelize;
const rows = async (sql: string) => (await db.query(sql))[0] as Record<string, unknown>[];

type Column = { name: string; type: string; notnull: number; dflt_value: unknown; pk: number };

/** Inserts a row giving every required column without a default a plain value of its type, then `values`. */
async function insert(table: string, values: Record<string, unknown>): Promise<number> {
  const columns = (await rows(`PRAGMA table_info("${table}")`)) as unknown as Column[];
  const row: Record<string, unknown> = {};
  for (const c of columns) {
    if (c.pk || !c.notnull || c.dflt_value !== null) continue;
    row[c.name] = /INT|FLOAT|REAL|DOUBLE|DECIMAL|NUMERIC/i.test(c.type) ? 1 : /DATE/i.test(c.type) ? '2026-01-05 10:00:00.000 +00:00' : 'x';
  }
  Object.assign(row, values);
  const names = Object.keys(row);
  await db.query(`INSERT INTO "${table}" (${names.map((n) => `"${n}"`).join(', ')}) VALUES (${names.map(() => '?').join(', ')})`, {
    replacements: names.map((n) => row[n]),
  });
  return ((await rows('SELECT last_insert_rowid() AS id'))[0]!.id as number) ?? 0;
}

let submittedCase = 0;
beforeAll(async () => {
  db = await openDatabase(':memory:');
  await createMigrator(db).up({ to: '0010-case-amendment' });
  // Bare rows: the references point at rows this test does not need.
  await db.query('PRAGMA foreign_keys = OFF');
  submittedCase = await insert('cases', { accession: 'FX-MIG-1', resultsSnapshot: '{"frozen":true}', updatedAt: '2026-02-03 04:05:06.000 +00:00' });
  const openCase = await insert('cases', { accession: 'FX-MIG-2', resultsSnapshot: null });
  await insert('measurements', { caseId: submittedCase, specimenId: 1, assay: 'CI', replicate: 1 });
  await insert('measurements', { caseId: openCase, specimenId: 2, assay: 'CI', replicate: 1 });
});
afterAll(() => db.close());

describe('migration 0011 (measurement exclusion)', () => {
  it('when applied, then measurements of a case with a results snapshot are marked submitted at its last change, others not, and none is excluded', async () => {
    await createMigrator(db).up({ to: '0011-measurement-exclusion' });
    const after = await rows('SELECT "caseId", "submittedAt", "excludedReason", "excludedById", "excludedAt" FROM measurements ORDER BY id');
    expect(after).toEqual([
      { caseId: submittedCase, submittedAt: '2026-02-03 04:05:06.000 +00:00', excludedReason: null, excludedById: null, excludedAt: null },
      { caseId: expect.any(Number), submittedAt: null, excludedReason: null, excludedById: null, excludedAt: null },
    ]);
  });

  it('when reverted, then the columns are gone, the rows stay and a second replicate 1 of the same assay is still refused', async () => {
    await createMigrator(db).down({ to: '0011-measurement-exclusion' });
    const columns = (await rows('PRAGMA table_info("measurements")')).map((c) => c.name);
    expect(columns).not.toContain('submittedAt');
    expect(columns).not.toContain('excludedReason');
    expect(await rows('SELECT "caseId" FROM measurements')).toHaveLength(2);
    await expect(insert('measurements', { caseId: submittedCase, specimenId: 1, assay: 'CI', replicate: 1 })).rejects.toMatchObject({
      name: 'SequelizeUniqueConstraintError',
    });
    // Replicate 2 of the same assay and specimen is a different key.
    await expect(insert('measurements', { caseId: submittedCase, specimenId: 1, assay: 'CI', replicate: 2 })).resolves.toBeGreaterThan(0);
  });
});
