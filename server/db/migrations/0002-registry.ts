import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0002-registry';

const timestamps = {
  createdAt: { type: DataTypes.DATE, allowNull: false },
  updatedAt: { type: DataTypes.DATE, allowNull: false },
};
const version = { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 };
const userRef = (allowNull: boolean) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: 'users', key: 'id' },
});

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('assay_definitions', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    code: { type: DataTypes.STRING(10), allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false },
    /** The whole definition as the shared schema describes it, frozen once written. */
    data: { type: DataTypes.TEXT, allowNull: false },
    changeNote: { type: DataTypes.TEXT, allowNull: true },
    createdById: userRef(true),
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('assay_definitions', ['code', 'version'], { unique: true });

  await qi.createTable('patients', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    labPatientId: { type: DataTypes.STRING(40), allowNull: false, unique: true },
    familyName: { type: DataTypes.STRING(80), allowNull: false },
    givenName: { type: DataTypes.STRING(80), allowNull: false },
    dateOfBirth: { type: DataTypes.STRING(10), allowNull: false },
    sex: { type: DataTypes.STRING(10), allowNull: false },
    /** Lower-cased "family given" for duplicate checks and search. */
    nameKey: { type: DataTypes.STRING(170), allowNull: false },
    version,
    ...timestamps,
  });
  await qi.addIndex('patients', ['nameKey', 'dateOfBirth']);

  await qi.createTable('accession_counters', {
    year: { type: DataTypes.INTEGER, primaryKey: true },
    last: { type: DataTypes.INTEGER, allowNull: false },
  });

  await qi.createTable('cases', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    accession: { type: DataTypes.STRING(20), allowNull: false, unique: true },
    patientId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'patients', key: 'id' } },
    referringClinicianId: userRef(false),
    clinicalIndication: { type: DataTypes.TEXT, allowNull: false },
    priority: { type: DataTypes.STRING(10), allowNull: false },
    state: { type: DataTypes.STRING(20), allowNull: false },
    cancelReason: { type: DataTypes.TEXT, allowNull: true },
    returnReason: { type: DataTypes.TEXT, allowNull: true },
    /** Earliest specimen receipt (denormalised for sorting and date filters). */
    receivedAt: { type: DataTypes.DATE, allowNull: true },
    /** ",type,type," of the case's specimens (denormalised for filtering). */
    specimenTypes: { type: DataTypes.STRING(200), allowNull: false, defaultValue: ',' },
    /** Lower-cased accession, patient name and lab ID (denormalised for search). */
    searchText: { type: DataTypes.STRING(300), allowNull: false },
    patientName: { type: DataTypes.STRING(170), allowNull: false },
    patternCode: { type: DataTypes.STRING(40), allowNull: true },
    /** Results frozen at submission for review: numbers, comparisons and the interval versions used. */
    resultsSnapshot: { type: DataTypes.TEXT, allowNull: true },
    createdById: userRef(true),
    version,
    ...timestamps,
  });
  await qi.addIndex('cases', ['state', 'receivedAt']);
  await qi.addIndex('cases', ['receivedAt']);
  await qi.addIndex('cases', ['patientId']);
  await qi.addIndex('cases', ['referringClinicianId']);

  await qi.createTable('rejection_reasons', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    text: { type: DataTypes.STRING(200), allowNull: false, unique: true },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    ...timestamps,
  });

  await qi.createTable('specimens', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    caseId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cases', key: 'id' } },
    label: { type: DataTypes.STRING(20), allowNull: false },
    type: { type: DataTypes.STRING(30), allowNull: false },
    source: { type: DataTypes.STRING(160), allowNull: false, defaultValue: '' },
    collectedAt: { type: DataTypes.DATE, allowNull: true },
    receivedAt: { type: DataTypes.DATE, allowNull: false },
    transportCondition: { type: DataTypes.STRING(20), allowNull: false },
    wetWeightMg: { type: DataTypes.FLOAT, allowNull: true },
    accepted: { type: DataTypes.BOOLEAN, allowNull: false },
    rejectionReason: { type: DataTypes.STRING(200), allowNull: true },
    proteinMgPerMl: { type: DataTypes.FLOAT, allowNull: true },
    proteinSource: { type: DataTypes.STRING(200), allowNull: true },
    /** Standard curve, fit and unknowns behind proteinMgPerMl, when it came from a curve. */
    proteinDetails: { type: DataTypes.TEXT, allowNull: true },
    version,
    ...timestamps,
  });
  await qi.addIndex('specimens', ['caseId']);

  await qi.createTable('uploads', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    caseId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'cases', key: 'id' } },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    filename: { type: DataTypes.STRING(255), allowNull: false },
    mimeType: { type: DataTypes.STRING(100), allowNull: false },
    sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
    sha256: { type: DataTypes.STRING(64), allowNull: false },
    content: { type: DataTypes.BLOB, allowNull: false },
    uploadedById: userRef(true),
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('uploads', ['caseId']);

  await qi.createTable('plate_maps', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
    wells: { type: DataTypes.TEXT, allowNull: false },
    createdById: userRef(true),
    version,
    ...timestamps,
  });

  await qi.createTable('measurements', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    caseId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cases', key: 'id' } },
    specimenId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'specimens', key: 'id' } },
    assay: { type: DataTypes.STRING(10), allowNull: false },
    replicate: { type: DataTypes.INTEGER, allowNull: false },
    /** 'rates' (typed ΔA/min), 'traces' (pasted) or 'plate' (uploaded file). */
    inputMode: { type: DataTypes.STRING(10), allowNull: false },
    inputs: { type: DataTypes.TEXT, allowNull: false },
    result: { type: DataTypes.TEXT, allowNull: false },
    definitionId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'assay_definitions', key: 'id' } },
    definitionVersion: { type: DataTypes.INTEGER, allowNull: false },
    activity: { type: DataTypes.FLOAT, allowNull: true },
    flags: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' },
    uploadId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'uploads', key: 'id' } },
    createdById: userRef(true),
    version,
    ...timestamps,
  });
  await qi.addIndex('measurements', ['specimenId', 'assay', 'replicate'], { unique: true });
  await qi.addIndex('measurements', ['caseId']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const t of ['measurements', 'plate_maps', 'uploads', 'specimens', 'rejection_reasons', 'cases', 'accession_counters', 'patients', 'assay_definitions']) {
    await qi.dropTable(t);
  }
}
