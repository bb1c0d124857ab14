import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0012-approvals';

/**
 * Separation of duties: an assay-definition version is a draft until a director approves it (until now a new
 * version was in force as soon as it was saved), and the laboratory profile says whether a director may approve
 * their own draft (a laboratory with a single director).
 *
 * Versions saved before this migration were put in force by the director who saved them: they are marked
 * approved by their author at their creation time, which is what happened. The published defaults (no author)
 * stay approved with no approver.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('assay_definitions', 'status', { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'approved' });
  await qi.addColumn('assay_definitions', 'approvedById', {
    type: DataTypes.INTEGER,
    allowNull: true,
    references: { model: 'users', key: 'id' },
  });
  await qi.addColumn('assay_definitions', 'approvedAt', { type: DataTypes.DATE, allowNull: true });
  await qi.sequelize.query(`UPDATE assay_definitions SET "approvedById" = "createdById", "approvedAt" = "createdAt"`);
  await qi.addColumn('lab_profiles', 'allowSelfApproval', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
}

/**
 * Plain DROP COLUMN (SQLite 3.35 and later, and PostgreSQL): Sequelize's SQLite removeColumn rebuilds the table
 * and reads the two-column unique key (code, version) as a unique code, so it fails on a second version.
 */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.sequelize.query('ALTER TABLE lab_profiles DROP COLUMN "allowSelfApproval"');
  for (const column of ['approvedAt', 'approvedById', 'status']) {
    await qi.sequelize.query(`ALTER TABLE assay_definitions DROP COLUMN "${column}"`);
  }
}
