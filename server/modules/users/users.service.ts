import type { Sequelize } from 'sequelize';
import type { CreateUserInput, ResetPasswordInput, UpdateUserInput, User, UserAccount } from '@/schemas/user';
import { hashPassword } from '../../auth/password';
import { AppError, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import * as repo from './users.repository';
import { writeTransaction } from '../../db/write-transaction';

export async function listAccounts(): Promise<UserAccount[]> {
  return (await repo.listUsers()).map(repo.withoutSecrets);
}

export async function listActiveClinicians(): Promise<User[]> {
  return (await repo.listUsers({ role: 'clinician', active: true })).map(repo.publicUser);
}

export async function createAccount(sequelize: Sequelize, actor: User, input: CreateUserInput): Promise<UserAccount> {
  if (await repo.findUserByEmail(input.email)) {
    throw new AppError('CONFLICT', 'An account with this e-mail address already exists', {
      fields: { email: 'An account with this e-mail address already exists' },
    });
  }
  const passwordHash = await hashPassword(input.password);
  return writeTransaction(sequelize, async (transaction) => {
    const created = await repo.insertUser(
      { email: input.email, name: input.name, title: input.title ?? null, role: input.role, passwordHash },
      transaction,
    );
    const account = repo.withoutSecrets(created);
    await recordAudit(actor, { action: 'create', entity: 'user', entityId: account.id, after: account }, transaction);
    return account;
  });
}

export async function updateAccount(
  sequelize: Sequelize,
  actor: User,
  id: number,
  input: UpdateUserInput,
): Promise<UserAccount> {
  return writeTransaction(sequelize, async (transaction) => {
    const current = await repo.findUserById(id, transaction);
    if (!current) throw notFound('User', id);
    if (actor.id === id && (input.active === false || (input.role && input.role !== current.role))) {
      throw new AppError('VALIDATION_FAILED', 'You cannot deactivate your own account or change your own role', {
        fields: { [input.active === false ? 'active' : 'role']: 'Not allowed on your own account' },
      });
    }
    const { version, ...changes } = input;
    const reactivating = changes.active === true && !current.active;
    const ok = await repo.updateUserIfVersion(
      id,
      version,
      { ...changes, ...(reactivating ? { failedLogins: 0, lockedUntil: null } : {}) },
      transaction,
    );
    if (!ok) throw staleVersion('account');
    const after = repo.withoutSecrets((await repo.findUserById(id, transaction))!);
    await recordAudit(
      actor,
      { action: 'update', entity: 'user', entityId: id, before: repo.withoutSecrets(current), after },
      transaction,
    );
    return after;
  });
}

/** An admin sets a new password; this also lifts a lock-out. */
export async function resetPassword(
  sequelize: Sequelize,
  actor: User,
  id: number,
  input: ResetPasswordInput,
): Promise<void> {
  const passwordHash = await hashPassword(input.password);
  await writeTransaction(sequelize, async (transaction) => {
    const current = await repo.findUserById(id, transaction);
    if (!current) throw notFound('User', id);
    await repo.updateUserIfVersion(id, current.version, { passwordHash, failedLogins: 0, lockedUntil: null }, transaction);
    await recordAudit(actor, { action: 'reset-password', entity: 'user', entityId: id }, transaction);
  });
}
