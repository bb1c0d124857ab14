import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0015-qc-rules';

/**
 * The Westgard rules the laboratory switches on (JSON array of rule names, e.g. ["1-2s","1-3s","2-2s","R-4s"]),
 * kept on the laboratory profile. Null means every rule, which is what a laboratory gets until a director chooses.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('lab_profiles', 'qcRules', { type: DataTypes.TEXT, allowNull: true });
}

/** Plain DROP COLUMN (SQLite 3.35 and later, and PostgreSQL), as 0012 does for the same table. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.sequelize.query('ALTER TABLE lab_profiles DROP COLUMN "qcRules"');
}
