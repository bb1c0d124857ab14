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

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('lab_profiles', 'allowSelfApproval');
  await qi.removeColumn('assay_definitions', 'approvedAt');
  await qi.removeColumn('assay_definitions', 'approvedById');
  await qi.removeColumn('assay_definitions', 'status');
}
