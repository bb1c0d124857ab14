import { DataTypes, type QueryInterface } from 'sequelize';
import { refuseOnPostgres } from '../postgres-triggers';

export const name = '0006-reports';

const userRef = (allowNull: boolean) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: 'users', key: 'id' },
});
const caseRef = (allowNull: boolean) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: 'cases', key: 'id' },
});

/** Columns of a signed report that no statement may change once written. */
const FROZEN_COLUMNS = [
  'caseId',
  'version',
  'kind',
  'specimenId',
  'patternSummary',
  'interpretation',
  'meaning',
  'signedById',
  'signerName',
  'signerTitle',
  'signedAt',
  'supersedesReportId',
  'correctionReason',
  'changesSummary',
  'document',
  'documentSha256',
  'pdf',
  'pdfSha256',
  'pdfSizeBytes',
];

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  // One row per signed version of a case's report. The PDF is rendered once, at signing, and kept byte for
  // byte with its SHA-256; only the superseded-by columns are ever written afterwards.
  await qi.createTable('reports', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    caseId: caseRef(false),
    version: { type: DataTypes.INTEGER, allowNull: false },
    /** 'final' for version 1, 'corrected' for every later version. */
    kind: { type: DataTypes.STRING(12), allowNull: false },
    specimenId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'specimens', key: 'id' } },
    patternSummary: { type: DataTypes.TEXT, allowNull: true },
    interpretation: { type: DataTypes.TEXT, allowNull: false },
    /** The meaning of the signature, as printed on the report. */
    meaning: { type: DataTypes.STRING(200), allowNull: false },
    signedById: userRef(false),
    /** Name and title as they were at signing: an account renamed later does not change a signed report. */
    signerName: { type: DataTypes.STRING(120), allowNull: false },
    signerTitle: { type: DataTypes.STRING(120), allowNull: false },
    signedAt: { type: DataTypes.DATE, allowNull: false },
    supersedesReportId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'reports', key: 'id' } },
    supersededByReportId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'reports', key: 'id' } },
    supersededAt: { type: DataTypes.DATE, allowNull: true },
    correctionReason: { type: DataTypes.TEXT, allowNull: true },
    changesSummary: { type: DataTypes.TEXT, allowNull: true },
    /** The report document (JSON) the PDF was rendered from: what the director signed. */
    document: { type: DataTypes.TEXT, allowNull: false },
    /** SHA-256 of `document` exactly as stored. */
    documentSha256: { type: DataTypes.STRING(64), allowNull: false },
    pdf: { type: DataTypes.BLOB, allowNull: false },
    pdfSha256: { type: DataTypes.STRING(64), allowNull: false },
    pdfSizeBytes: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('reports', ['caseId', 'version'], { unique: true });
  await qi.addIndex('reports', ['signedAt']);

  // The director's working text between visits to the review page; the signed text lives on the report.
  await qi.createTable('interpretation_drafts', {
    caseId: { ...caseRef(false), primaryKey: true },
    text: { type: DataTypes.TEXT, allowNull: false },
    updatedById: userRef(true),
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });

  // What the local SMTP stand-in received (development and tests): the "Sent e-mail" page lists it.
  await qi.createTable('outbox_messages', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    messageId: { type: DataTypes.STRING(255), allowNull: true },
    fromAddress: { type: DataTypes.STRING(320), allowNull: true },
    toAddress: { type: DataTypes.TEXT, allowNull: false },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    receivedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('outbox_messages', ['receivedAt']);

  // Every attempt to send a notice, sent or failed, whichever SMTP server is in use.
  await qi.createTable('mail_deliveries', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    kind: { type: DataTypes.STRING(30), allowNull: false },
    reportId: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'reports', key: 'id' } },
    caseId: caseRef(true),
    recipientUserId: userRef(true),
    recipient: { type: DataTypes.STRING(320), allowNull: false },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    status: { type: DataTypes.STRING(10), allowNull: false },
    error: { type: DataTypes.TEXT, allowNull: true },
    messageId: { type: DataTypes.STRING(255), allowNull: true },
    attemptedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('mail_deliveries', ['reportId']);

  if (qi.sequelize.getDialect() === 'postgres') {
    const changed = 'A signed report cannot be changed; issue a corrected report instead';
    await refuseOnPostgres(qi, 'reports_signed_content_frozen', 'reports', 'UPDATE', changed, FROZEN_COLUMNS);
    await refuseOnPostgres(qi, 'reports_never_deleted', 'reports', 'DELETE', 'A signed report cannot be deleted');
  }
  if (qi.sequelize.getDialect() === 'sqlite') {
    // A signed report is a record: the database itself refuses to alter its content or delete it.
    await qi.sequelize.query(
      `CREATE TRIGGER reports_signed_content_frozen BEFORE UPDATE OF ${FROZEN_COLUMNS.map((c) => `"${c}"`).join(', ')} ON reports
       BEGIN SELECT RAISE(ABORT, 'A signed report cannot be changed; issue a corrected report instead'); END`,
    );
    await qi.sequelize.query(
      `CREATE TRIGGER reports_never_deleted BEFORE DELETE ON reports
       BEGIN SELECT RAISE(ABORT, 'A signed report cannot be deleted'); END`,
    );
  }
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  if (qi.sequelize.getDialect() === 'sqlite') {
    await qi.sequelize.query('DROP TRIGGER IF EXISTS reports_signed_content_frozen');
    await qi.sequelize.query('DROP TRIGGER IF EXISTS reports_never_deleted');
  }
  for (const t of ['mail_deliveries', 'outbox_messages', 'interpretation_drafts', 'reports']) await qi.dropTable(t);
}
