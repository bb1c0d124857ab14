import { DataTypes, type QueryInterface } from 'sequelize';
import { refuseOnPostgres } from '../postgres-triggers';

export const name = '0001-foundation';

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  const timestamps = {
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  };
  await qi.createTable('users', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    title: { type: DataTypes.STRING(120), allowNull: true },
    role: { type: DataTypes.STRING(20), allowNull: false },
    passwordHash: { type: DataTypes.STRING(255), allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    failedLogins: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    lockedUntil: { type: DataTypes.DATE, allowNull: true },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    ...timestamps,
  });
  await qi.createTable('lab_profiles', {
    id: { type: DataTypes.INTEGER, primaryKey: true },
    name: { type: DataTypes.STRING(160), allowNull: false },
    addressLines: { type: DataTypes.TEXT, allowNull: false },
    accreditationNumber: { type: DataTypes.STRING(80), allowNull: false },
    phone: { type: DataTypes.STRING(40), allowNull: true },
    timeZone: { type: DataTypes.STRING(60), allowNull: false, defaultValue: 'UTC' },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    ...timestamps,
  });
  // Table and columns as connect-session-sequelize's Session model expects them.
  await qi.createTable('Sessions', {
    sid: { type: DataTypes.STRING(36), primaryKey: true },
    expires: { type: DataTypes.DATE, allowNull: true },
    data: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await qi.createTable('audit_events', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    at: { type: DataTypes.DATE, allowNull: false },
    actorId: { type: DataTypes.INTEGER, allowNull: true },
    actorEmail: { type: DataTypes.STRING(254), allowNull: true },
    action: { type: DataTypes.STRING(40), allowNull: false },
    entity: { type: DataTypes.STRING(60), allowNull: false },
    entityId: { type: DataTypes.STRING(60), allowNull: true },
    caseId: { type: DataTypes.INTEGER, allowNull: true },
    before: { type: DataTypes.TEXT, allowNull: true },
    after: { type: DataTypes.TEXT, allowNull: true },
    note: { type: DataTypes.TEXT, allowNull: true },
  });
  await qi.addIndex('audit_events', ['caseId']);
  await qi.addIndex('audit_events', ['entity', 'entityId']);
  // Append-only at the storage level: no code path, however written, can change or remove an event.
  if (qi.sequelize.getDialect() === 'postgres') {
    await refuseOnPostgres(qi, 'audit_events_no_update', 'audit_events', 'UPDATE', 'audit events are append-only');
    await refuseOnPostgres(qi, 'audit_events_no_delete', 'audit_events', 'DELETE', 'audit events are append-only');
    return;
  }
  await qi.sequelize.query(
    `CREATE TRIGGER audit_events_no_update BEFORE UPDATE ON audit_events
     BEGIN SELECT RAISE(ABORT, 'audit events are append-only'); END`,
  );
  await qi.sequelize.query(
    `CREATE TRIGGER audit_events_no_delete BEFORE DELETE ON audit_events
     BEGIN SELECT RAISE(ABORT, 'audit events are append-only'); END`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('audit_events');
  await qi.dropTable('Sessions');
  await qi.dropTable('lab_profiles');
  await qi.dropTable('users');
}
