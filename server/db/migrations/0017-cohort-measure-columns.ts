import { DataTypes, type QueryInterface } from 'sequelize';
import { cohortComplexes, type CohortComplex } from '@/schemas/registry';
import { cohortMeasures, intervalColumn, measureColumn, measureColumns } from '../../modules/registry/cohort-rows';

export const name = '0017-cohort-measure-columns';

/*
 * Cohort search at registry scale. Migration 0016 kept each printed value in cohort_values only, so a range
 * condition was a subquery per condition (a set of member ids built and probed for every member), and the plots
 * read the values through an index in value order, one table lookup per value. Now each member row also carries:
 * - per assay × measure, the value and its % of the reference mean ("CI_ratio_cs_value", "CI_ratio_cs_pct"), so
 *   every filter is a condition on the member row and a count is one pass over one table;
 * - per complex, the interval its ratio to CS was read against ("CI_ratio_cs_lower", "_upper", "_mean"), so the
 *   plots group the members alone.
 * cohort_values stays (the values of a page's members, the export); its range indexes go, nothing reads them now.
 * Sorting by accession or age reads an index rather than sorting the cohort. Filled at signing (cohort-rows.ts);
 * the rows already there are filled from cohort_values below, in portable SQL.
 */

const RANGE_INDEXES = [
  { fields: ['assay', 'measure', 'pctOfMean', 'memberId'], name: 'cohort_values_pct' },
  { fields: ['assay', 'measure', 'value', 'memberId'], name: 'cohort_values_value' },
];
const SORT_INDEXES = [
  { fields: ['accession', 'id'], name: 'cohort_members_accession' },
  { fields: ['ageYears', 'id'], name: 'cohort_members_age' },
];

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const column of measureColumns) await qi.addColumn('cohort_members', column, { type: DataTypes.DOUBLE, allowNull: true });
  for (const { name: index } of RANGE_INDEXES) await qi.removeIndex('cohort_values', index);
  for (const { fields, name: index } of SORT_INDEXES) await qi.addIndex('cohort_members', fields, { name: index });

  // Backfill: the first value printed for each measure (the order cohort_values was written in).
  for (const { assay, measure } of cohortMeasures) {
    const interval = measure === 'ratio_cs' && (cohortComplexes as readonly string[]).includes(assay);
    const targets = [measureColumn(assay, measure, 'value'), measureColumn(assay, measure, 'pct')];
    const sources = ['value', '"pctOfMean"'];
    if (interval) {
      targets.push(...(['lower', 'upper', 'mean'] as const).map((b) => intervalColumn(assay as CohortComplex, b)));
      sources.push('lower', 'upper', 'mean');
    }
    await qi.sequelize.query(
      `UPDATE cohort_members SET (${targets.map((c) => `"${c}"`).join(', ')}) =
         (SELECT ${sources.join(', ')} FROM cohort_values v
           WHERE v."memberId" = cohort_members.id AND v.assay = :assay AND v.measure = :measure ORDER BY v.id LIMIT 1)`,
      { replacements: { assay, measure } },
    );
  }
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const { name: index } of SORT_INDEXES) await qi.removeIndex('cohort_members', index);
  for (const { fields, name: index } of RANGE_INDEXES) await qi.addIndex('cohort_values', fields, { name: index });
  // Plain DROP COLUMN (SQLite 3.35+, PostgreSQL): Sequelize's SQLite removeColumn rebuilds the table without its indexes.
  for (const column of measureColumns) await qi.sequelize.query(`ALTER TABLE cohort_members DROP COLUMN "${column}"`);
}
