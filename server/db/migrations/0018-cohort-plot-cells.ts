import { DataTypes, type QueryInterface } from 'sequelize';
import { rebuildPlotCells } from '../../modules/registry/cohort-plot-cells';

export const name = '0018-cohort-plot-cells';

/*
 * The cohort plots at registry scale. Until now every call grouped the cohort's member rows seven times (the
 * intervals, then each complex's bins), a sort of the whole cohort each time. Now:
 * - cohort_plot_cells: one row per distinct cell (a complex's ratio to CS with its interval, value and % of mean in
 *   whole percent; "key" is those fields as JSON, unique) with the number of members in it (n): the plots of every
 *   signed case read these alone;
 * - cohort_members."plotCells": the ids of the member's cells, so a filtered cohort's plots count ids read in one
 *   pass over the rows its filter selects.
 * Kept at signing (server/modules/registry/cohort-plot-cells.ts); the rows already there are counted below.
 */

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('cohort_plot_cells', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    key: { type: DataTypes.TEXT, allowNull: false },
    complex: { type: DataTypes.STRING(8), allowNull: false },
    n: { type: DataTypes.INTEGER, allowNull: false },
  });
  await qi.addIndex('cohort_plot_cells', ['key'], { name: 'cohort_plot_cells_key', unique: true });
  await qi.addColumn('cohort_members', 'plotCells', { type: DataTypes.TEXT, allowNull: true });
  await rebuildPlotCells(qi.sequelize);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  // Plain DROP COLUMN (SQLite 3.35+, PostgreSQL): Sequelize's SQLite removeColumn rebuilds the table without its indexes.
  await qi.sequelize.query('ALTER TABLE cohort_members DROP COLUMN "plotCells"');
  await qi.dropTable('cohort_plot_cells');
}
