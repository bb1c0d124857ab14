import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0011-measurement-exclusion';

/**
 * A replicate can be excluded from the case's calculations with a reason (who and when kept beside it) instead
 * of being deleted, and a measurement remembers when it was first part of a submission for review: from then on
 * it can only be excluded, never deleted.
 *
 * Measurements of cases that already hold a results snapshot were part of a submission; they are marked with the
 * case's last change, the closest instant the database still knows. (A measurement added after a return for more
 * work is marked too: it can then be excluded but not deleted, which errs on the side of keeping it.)
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('measurements', 'excludedReason', { type: DataTypes.TEXT, allowNull: true });
  await qi.addColumn('measurements', 'excludedById', { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' } });
  await qi.addColumn('measurements', 'excludedAt', { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn('measurements', 'submittedAt', { type: DataTypes.DATE, allowNull: true });
  await qi.sequelize.query(
    `UPDATE measurements SET "submittedAt" = (SELECT c."updatedAt" FROM cases c WHERE c.id = measurements."caseId")
     WHERE "caseId" IN (SELECT id FROM cases WHERE "resultsSnapshot" IS NOT NULL)`,
  );
}

/**
 * Plain DROP COLUMN (SQLite 3.35 and later, and PostgreSQL): Sequelize's SQLite removeColumn rebuilds the table
 * and reads the three-column unique key (specimen, assay, replicate) as a unique replicate column, so it fails
 * on any two measurements sharing a replicate number.
 */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const column of ['submittedAt', 'excludedAt', 'excludedById', 'excludedReason']) {
    await qi.sequelize.query(`ALTER TABLE measurements DROP COLUMN "${column}"`);
  }
}
