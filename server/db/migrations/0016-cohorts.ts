import { DataTypes, type QueryInterface } from 'sequelize';
import { backfillCohort } from '../../modules/registry/cohort-rows';

export const name = '0016-cohorts';

/*
 * Cohort search over signed results. The numbers a director signed live inside each report's document (JSON),
 * which no index can reach; these tables copy them out once, at signing, in the signing transaction:
 * - cohort_members: one row per accepted specimen with results on a case's current signed report (a corrected
 *   report replaces the rows of the version it supersedes), with what the filters ask about: specimen type,
 *   sex, completed years at collection, report date, pattern code and a flag per pattern kind and per deficient complex.
 * - cohort_values: one row per member × assay × measure: the value, its % of the reference mean and the interval.
 * - saved_searches: a user's own named filters.
 * Existing signed reports are copied in by the backfill below.
 */
const bool = { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false };
/** One flag per pattern kind and per complex a deficiency finding names (server/modules/registry/cohort-rows.ts fills them). */
const FLAGS = ['isNormal', 'isIsolated', 'isCombined', 'isLinked', 'isRaisedCs', 'isInsufficient', 'lowCI', 'lowCII', 'lowCIII', 'lowCIV', 'lowCI_III', 'lowCII_III'];


export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('cohort_members', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    reportId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'reports', key: 'id' } },
    caseId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cases', key: 'id' } },
    specimenId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'specimens', key: 'id' } },
    accession: { type: DataTypes.STRING(40), allowNull: false },
    reportVersion: { type: DataTypes.INTEGER, allowNull: false },
    reportStatus: { type: DataTypes.STRING(12), allowNull: false },
    specimenLabel: { type: DataTypes.STRING(40), allowNull: false },
    specimenType: { type: DataTypes.STRING(20), allowNull: false },
    sex: { type: DataTypes.STRING(10), allowNull: false },
    /** Completed years on the day of collection (of receipt when collection was not recorded). */
    ageYears: { type: DataTypes.INTEGER, allowNull: true },
    /** The laboratory's calendar day of the signature, YYYY-MM-DD (the report date). */
    signedOn: { type: DataTypes.STRING(10), allowNull: false },
    patternCode: { type: DataTypes.STRING(200), allowNull: true },
    ...Object.fromEntries(FLAGS.map((c) => [c, bool])),
  });
  await qi.addIndex('cohort_members', ['caseId'], { name: 'cohort_members_case' });
  await qi.addIndex('cohort_members', ['signedOn', 'id'], { name: 'cohort_members_signed_on' });
  await qi.addIndex('cohort_members', ['specimenType', 'signedOn'], { name: 'cohort_members_type' });

  await qi.createTable('cohort_values', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    memberId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cohort_members', key: 'id' } },
    assay: { type: DataTypes.STRING(8), allowNull: false },
    measure: { type: DataTypes.STRING(10), allowNull: false },
    value: { type: DataTypes.DOUBLE, allowNull: true },
    pctOfMean: { type: DataTypes.DOUBLE, allowNull: true },
    lower: { type: DataTypes.DOUBLE, allowNull: true },
    upper: { type: DataTypes.DOUBLE, allowNull: true },
    mean: { type: DataTypes.DOUBLE, allowNull: true },
  });
  await qi.addIndex('cohort_values', ['memberId'], { name: 'cohort_values_member' });
  // Range conditions read only these indexes (memberId included): no lookup into the table per matching value.
  await qi.addIndex('cohort_values', ['assay', 'measure', 'pctOfMean', 'memberId'], { name: 'cohort_values_pct' });
  await qi.addIndex('cohort_values', ['assay', 'measure', 'value', 'memberId'], { name: 'cohort_values_value' });

  await qi.createTable('saved_searches', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    userId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
    name: { type: DataTypes.STRING(80), allowNull: false },
    /** The filter as JSON (src/schemas/registry.ts, without paging). */
    filters: { type: DataTypes.TEXT, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('saved_searches', ['userId', 'name'], { name: 'saved_searches_user_name', unique: true });

  await backfillCohort(qi.sequelize);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const t of ['saved_searches', 'cohort_values', 'cohort_members']) await qi.dropTable(t);
}
