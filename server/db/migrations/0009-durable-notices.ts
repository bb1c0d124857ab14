import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0009-durable-notices';

const ref = (table: string) => ({ type: DataTypes.INTEGER, allowNull: true, references: { model: table, key: 'id' } });

/** Columns the new outbox shares with the delivery log it replaces. */
const shared = () => ({
  id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
  kind: { type: DataTypes.STRING(30), allowNull: false },
  reportId: ref('reports'),
  caseId: ref('cases'),
  recipientUserId: ref('users'),
  recipient: { type: DataTypes.STRING(320), allowNull: false },
  subject: { type: DataTypes.STRING(500), allowNull: false },
  status: { type: DataTypes.STRING(10), allowNull: false },
  messageId: { type: DataTypes.STRING(255), allowNull: true },
});

/**
 * The clinician's notice becomes a durable outbox row, written in the same transaction as the signature and
 * delivered by a worker that retries (docs/notices.md). It replaces mail_deliveries, which logged one attempt
 * per row after the fact; the rows it holds are carried over as finished notices (sent or failed, one try).
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('notice_outbox', {
    // status: pending | sending | sent | failed
    ...shared(),
    // The message as composed at signing; null only for rows carried over from mail_deliveries.
    body: { type: DataTypes.TEXT, allowNull: true },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    nextAttemptAt: { type: DataTypes.DATE, allowNull: true },
    leaseUntil: { type: DataTypes.DATE, allowNull: true },
    lastAttemptAt: { type: DataTypes.DATE, allowNull: true },
    lastError: { type: DataTypes.TEXT, allowNull: true },
    sentAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('notice_outbox', ['status', 'nextAttemptAt']);
  await qi.addIndex('notice_outbox', ['reportId']);
  await qi.sequelize.query(
    `INSERT INTO notice_outbox (kind, "reportId", "caseId", "recipientUserId", recipient, subject, body, status, attempts,
       "nextAttemptAt", "leaseUntil", "lastAttemptAt", "lastError", "messageId", "sentAt", "createdAt")
     SELECT kind, "reportId", "caseId", "recipientUserId", recipient, subject, NULL, status, 1,
       NULL, NULL, "attemptedAt", error, "messageId", CASE WHEN status = 'sent' THEN "attemptedAt" END, "attemptedAt"
     FROM mail_deliveries ORDER BY id`,
  );
  await qi.dropTable('mail_deliveries');
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('mail_deliveries', {
    ...shared(),
    error: { type: DataTypes.TEXT, allowNull: true },
    attemptedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('mail_deliveries', ['reportId']);
  // Only finished notices fit the old log; anything still waiting is lost on the way down.
  await qi.sequelize.query(
    `INSERT INTO mail_deliveries (kind, "reportId", "caseId", "recipientUserId", recipient, subject, status, error, "messageId", "attemptedAt")
     SELECT kind, "reportId", "caseId", "recipientUserId", recipient, subject, status, "lastError", "messageId",
       COALESCE("lastAttemptAt", "createdAt")
     FROM notice_outbox WHERE status IN ('sent', 'failed') ORDER BY id`,
  );
  await qi.dropTable('notice_outbox');
}
