import type { Sequelize } from 'sequelize';
import type { UserAccount } from '@/schemas/user';
import { hashPassword } from '../auth/password';
import { writeTransaction } from '../db/write-transaction';
import { AppError } from '../lib/errors';
import { recordAudit } from '../modules/audit/audit.service';
import * as users from '../modules/users/users.repository';

export type AdminSpec = { email: string; password: string; name: string };

/** Where an administrator created outside the application came from, as the audit trail records it. */
export type AdminSource = 'BOOTSTRAP_ADMIN_EMAIL at start-up' | 'npm run create-admin';

export async function countActiveAdministrators(): Promise<number> {
  return (await users.listUsers({ role: 'admin', active: true })).length;
}

/**
 * Creates an administrator account from outside the application (no signed-in actor), audited in the same
 * transaction with the source named and without the password. Refuses an e-mail address that already has an
 * account, whatever its role: an existing person is never silently promoted.
 */
export async function createAdministrator(sequelize: Sequelize, spec: AdminSpec, source: AdminSource): Promise<UserAccount> {
  const passwordHash = await hashPassword(spec.password);
  return writeTransaction(sequelize, async (transaction) => {
    if (await users.findUserByEmail(spec.email)) {
      throw new AppError('CONFLICT', `An account with the e-mail address ${spec.email.toLowerCase()} already exists`, {
        fields: { email: 'An account with this e-mail address already exists' },
      });
    }
    const created = await users.insertUser(
      { email: spec.email, name: spec.name, title: null, role: 'admin', passwordHash },
      transaction,
    );
    const account = users.withoutSecrets(created);
    await recordAudit(
      null,
      { action: 'create', entity: 'user', entityId: account.id, after: account, note: `administrator created by ${source}` },
      transaction,
    );
    return account;
  });
}

/**
 * The start-up's first administrator: created from the configuration when no active administrator exists.
 * Returns the new account, or null when an administrator already exists (the variables are then ignored).
 */
export async function ensureFirstAdministrator(sequelize: Sequelize, spec: AdminSpec): Promise<UserAccount | null> {
  if ((await countActiveAdministrators()) > 0) return null;
  return createAdministrator(sequelize, spec, 'BOOTSTRAP_ADMIN_EMAIL at start-up');
}
