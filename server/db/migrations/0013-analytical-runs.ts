import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0013-analytical-runs';

/**
 * Analytical runs with quality control. A run is one plate read on one instrument: its layout maps wells to
 * specimens of any open case, to control materials and to blanks; its file is kept in uploads with its SHA-256.
 * Control materials (material, lot, level, expiry) carry per-assay target means and SDs, versioned like intervals
 * (draft → approved → retired). Every control result a run produced is kept for the Westgard evaluation of later
 * runs and for the Levey–Jennings chart. A measurement remembers the run it came from.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
  const user = { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' } };
  const stamps = { createdAt: { type: DataTypes.DATE, allowNull: false }, updatedAt: { type: DataTypes.DATE, allowNull: false } };

  await qi.createTable('control_materials', {
    id,
    name: { type: DataTypes.STRING(120), allowNull: false },
    lot: { type: DataTypes.STRING(60), allowNull: false },
    level: { type: DataTypes.STRING(60), allowNull: false },
    expiresOn: { type: DataTypes.DATEONLY, allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    retiredAt: { type: DataTypes.DATE, allowNull: true },
    createdById: user,
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    ...stamps,
  });
  await qi.addIndex('control_materials', ['name', 'lot', 'level'], { unique: true, name: 'control_materials_name_lot_level' });

  await qi.createTable('control_targets', {
    id,
    controlMaterialId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'control_materials', key: 'id' } },
    assayCode: { type: DataTypes.STRING(10), allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false },
    mean: { type: DataTypes.DOUBLE, allowNull: false },
    sd: { type: DataTypes.DOUBLE, allowNull: false },
    /** 'entered' by a director, or 'established' from the laboratory's own first runs. */
    source: { type: DataTypes.STRING(12), allowNull: false },
    /** For an established target: the control results it was computed from (JSON: ids, n, first and last run). */
    basis: { type: DataTypes.TEXT, allowNull: true },
    status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'draft' },
    note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    createdById: user,
    approvedById: user,
    approvedAt: { type: DataTypes.DATE, allowNull: true },
    retiredAt: { type: DataTypes.DATE, allowNull: true },
    ...stamps,
  });
  await qi.addIndex('control_targets', ['controlMaterialId', 'assayCode', 'version'], {
    unique: true,
    name: 'control_targets_material_assay_version',
  });

  await qi.createTable('analytical_runs', {
    id,
    /** The laboratory's run number, e.g. RUN-2026-0007. */
    runNumber: { type: DataTypes.STRING(30), allowNull: false, unique: true },
    instrument: { type: DataTypes.STRING(120), allowNull: false },
    startedAt: { type: DataTypes.DATE, allowNull: false },
    operatorId: user,
    /** 24, 96 or 384 wells. */
    plateFormat: { type: DataTypes.INTEGER, allowNull: false },
    /** JSON: every used well with its use (specimen group, control, blank). */
    layout: { type: DataTypes.TEXT, allowNull: false },
    /** JSON: assay code → assay definition version used. */
    definitionVersions: { type: DataTypes.TEXT, allowNull: false },
    uploadId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'uploads', key: 'id' } },
    /** 'accept' | 'warn' | 'reject' after the Westgard evaluation; 'none' when the run carried no controls. */
    qcStatus: { type: DataTypes.STRING(10), allowNull: false },
    /** JSON: the rules that fired, with the levels and assays. */
    qcViolations: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' },
    overrideReason: { type: DataTypes.TEXT, allowNull: true },
    overrideById: user,
    overrideAt: { type: DataTypes.DATE, allowNull: true },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    ...stamps,
  });
  await qi.addIndex('analytical_runs', ['startedAt'], { name: 'analytical_runs_started_at' });

  await qi.createTable('control_results', {
    id,
    runId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'analytical_runs', key: 'id' } },
    controlMaterialId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'control_materials', key: 'id' } },
    assayCode: { type: DataTypes.STRING(10), allowNull: false },
    /** Specific activity of the control (mean of its replicate wells), in the assay's unit. */
    value: { type: DataTypes.DOUBLE, allowNull: false },
    /** JSON: the wells and replicate values behind the value. */
    wells: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' },
    /** The target (id) the result was judged against when the run was evaluated; null when none was approved. */
    controlTargetId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'control_targets', key: 'id' } },
    z: { type: DataTypes.DOUBLE, allowNull: true },
    measuredAt: { type: DataTypes.DATE, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('control_results', ['runId', 'controlMaterialId', 'assayCode'], {
    unique: true,
    name: 'control_results_run_material_assay',
  });
  await qi.addIndex('control_results', ['controlMaterialId', 'assayCode', 'measuredAt'], { name: 'control_results_history' });

  // No foreign-key clause: SQLite cannot drop a column that carries one (down), and the service checks the run.
  await qi.addColumn('measurements', 'runId', { type: DataTypes.INTEGER, allowNull: true });
  await qi.addIndex('measurements', ['runId'], { name: 'measurements_run_id' });
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeIndex('measurements', 'measurements_run_id');
  await qi.sequelize.query('ALTER TABLE measurements DROP COLUMN "runId"');
  await qi.dropTable('control_results');
  await qi.dropTable('analytical_runs');
  await qi.dropTable('control_targets');
  await qi.dropTable('control_materials');
}
