import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import { createMigrator } from '../../server/db/migrate';
import { openDatabase } from '../../server/db/sequelize';

/*
 * Migration 0012 gives assay-definition versions a status and an approver, and the laboratory profile the
 * single-director setting. Versions saved before it were put in force by whoever saved them: they come out
 * approved by their author at their creation time; the published defaults (no author) approved by nobody.
 * Going back down keeps every row and the one-version-per-number rule. Invented rows.
 */

let db: Sequelize;
const rows = async (sql: string) => (await db.query(sql))[0] as Record<string, unknown>[];
const insertDefinition = (version: number, createdById: number | null) =>
  db.query(
    `INSERT INTO assay_definitions (code, version, data, "changeNote", "createdById", "createdAt") VALUES ('CI', ?, '{}', 'fixture', ?, ?)`,
    { replacements: [version, createdById, `2026-01-0${version} 10:00:00.000 +00:00`] },
  );

beforeAll(async () => {
  db = await openDatabase(':memory:');
  await createMigrator(db).up({ to: '0011-measurement-exclusion' });
  await db.query('PRAGMA foreign_keys = OFF');
  await insertDefinition(1, null);
  await insertDefinition(2, 7);
  await db.query(
    `INSERT INTO lab_profiles (id, name, "addressLines", "accreditationNumber", "timeZone", version, "createdAt", "updatedAt")
     VALUES (1, 'Fixture lab (invented)', '["x"]', 'FX-1', 'UTC', 0, '2026-01-01', '2026-01-01')`,
  );
});
afterAll(() => db.close());

describe('migration 0012 (approvals)', () => {
  it('when applied, then earlier versions are approved by their author at their creation time and self-approval is off', async () => {
    await createMigrator(db).up({ to: '0012-approvals' });
    expect(await rows('SELECT version, status, "approvedById", "approvedAt" FROM assay_definitions ORDER BY version')).toEqual([
      { version: 1, status: 'approved', approvedById: null, approvedAt: '2026-01-01 10:00:00.000 +00:00' },
      { version: 2, status: 'approved', approvedById: 7, approvedAt: '2026-01-02 10:00:00.000 +00:00' },
    ]);
    expect(await rows('SELECT "allowSelfApproval" FROM lab_profiles')).toEqual([{ allowSelfApproval: 0 }]);
  });

  it('when reverted, then the columns are gone, the rows stay and a second version 2 of the same assay is still refused', async () => {
    await createMigrator(db).down({ to: '0012-approvals' });
    const columns = (await rows('PRAGMA table_info("assay_definitions")')).map((c) => c.name);
    expect(columns).not.toContain('status');
    expect(columns).not.toContain('approvedById');
    expect((await rows('PRAGMA table_info("lab_profiles")')).map((c) => c.name)).not.toContain('allowSelfApproval');
    expect(await rows('SELECT version FROM assay_definitions ORDER BY version')).toEqual([{ version: 1 }, { version: 2 }]);
    await expect(insertDefinition(2, 8)).rejects.toMatchObject({ name: 'SequelizeUniqueConstraintError' });
  });
});
