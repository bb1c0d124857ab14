import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0010-case-amendment';

/**
 * A signed case reopened for a correction of its results: why, and since when. Both are set when a director
 * reopens the case and cleared when the corrected report is signed; while set, the signed reports are shown
 * with a note that a corrected version will follow (the stored reports themselves never change).
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('cases', 'amendReason', { type: DataTypes.TEXT, allowNull: true });
  await qi.addColumn('cases', 'amendedAt', { type: DataTypes.DATE, allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('cases', 'amendedAt');
  await qi.removeColumn('cases', 'amendReason');
}
