import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0004-reference-intervals';

const userRef = { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' } };

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  // One row is one version of one key (assay × measure × specimen type × age band). Rows are never
  // deleted: a comparison stores the id it used, and that id must stay readable for as long as the report.
  await qi.createTable('reference_intervals', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    /** "assay|measure|specimenType|minYears|maxYears": groups the versions of one key. */
    intervalKey: { type: DataTypes.STRING(120), allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false },
    status: { type: DataTypes.STRING(10), allowNull: false },
    setName: { type: DataTypes.STRING(160), allowNull: false },
    assay: { type: DataTypes.STRING(10), allowNull: false },
    measure: { type: DataTypes.STRING(12), allowNull: false },
    specimenType: { type: DataTypes.STRING(30), allowNull: false },
    ageLabel: { type: DataTypes.STRING(60), allowNull: false },
    ageMinYears: { type: DataTypes.FLOAT, allowNull: false },
    ageMaxYears: { type: DataTypes.FLOAT, allowNull: true },
    lower: { type: DataTypes.FLOAT, allowNull: false },
    upper: { type: DataTypes.FLOAT, allowNull: false },
    mean: { type: DataTypes.FLOAT, allowNull: false },
    sd: { type: DataTypes.FLOAT, allowNull: true },
    n: { type: DataTypes.INTEGER, allowNull: false },
    unit: { type: DataTypes.STRING(40), allowNull: false },
    basis: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'linear_rate' },
    method: { type: DataTypes.STRING(20), allowNull: false },
    /** Outlier rule, excluded values, limit CIs and warnings of a derivation (JSON), or null. */
    derivation: { type: DataTypes.TEXT, allowNull: true },
    sourceNote: { type: DataTypes.TEXT, allowNull: false },
    uploadId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'uploads', key: 'id' } },
    /** ISO dates; effectiveTo is exclusive (the day the next version takes over), null = open. */
    effectiveFrom: { type: DataTypes.STRING(10), allowNull: false },
    effectiveTo: { type: DataTypes.STRING(10), allowNull: true },
    createdById: userRef,
    approvedById: userRef,
    approvedAt: { type: DataTypes.DATE, allowNull: true },
    retiredById: userRef,
    retiredAt: { type: DataTypes.DATE, allowNull: true },
    retireReason: { type: DataTypes.TEXT, allowNull: true },
    /** Optimistic-locking counter ("version" is taken by the interval's own version number). */
    revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('reference_intervals', ['intervalKey', 'version'], { unique: true });
  await qi.addIndex('reference_intervals', ['assay', 'measure', 'specimenType', 'status']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('reference_intervals');
}
