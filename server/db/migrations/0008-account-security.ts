import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0008-account-security';

/**
 * Account security: a forced password change after an administrator's reset, the time of the last change, a
 * session generation (raised on every password change or reset, which ends every session opened before it),
 * and failure counters for e-mail addresses that have no usable account, so their lock-out answers are the same
 * as a real account's.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('users', 'mustChangePassword', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
  await qi.addColumn('users', 'passwordChangedAt', { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn('users', 'sessionGeneration', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.createTable('sign_in_failures', {
    email: { type: DataTypes.STRING(254), primaryKey: true },
    failedLogins: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    lockedUntil: { type: DataTypes.DATE, allowNull: true },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('sign_in_failures');
  await qi.removeColumn('users', 'sessionGeneration');
  await qi.removeColumn('users', 'passwordChangedAt');
  await qi.removeColumn('users', 'mustChangePassword');
}
