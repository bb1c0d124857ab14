import type { Sequelize } from 'sequelize';
import type {
  ChangePasswordInput,
  CreateUserInput,
  ResetPasswordInput,
  UpdateUserInput,
  User,
  UserAccount,
} from '@/schemas/user';
import { admitRightPassword, countWrongPassword, refuseIfLocked } from '../../auth/lockout';
import { hashPassword, verifyPassword } from '../../auth/password';
import type { SignedInAccount } from '../../auth/sign-in';
import { endSessionsOfUser } from '../../auth/user-sessions';
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

/**
 * An administrator opens an account with a first password they chose: like a reset, it is temporary, and the
 * person chooses their own at the first sign-in.
 */
export async function createAccount(sequelize: Sequelize, actor: User, input: CreateUserInput): Promise<UserAccount> {
  if (await repo.findUserByEmail(input.email)) {
    throw new AppError('CONFLICT', 'An account with this e-mail address already exists', {
      fields: { email: 'An account with this e-mail address already exists' },
    });
  }
  const passwordHash = await hashPassword(input.password);
  return writeTransaction(sequelize, async (transaction) => {
    const created = await repo.insertUser(
      { email: input.email, name: input.name, title: input.title ?? null, role: input.role, passwordHash, mustChangePassword: true },
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

/**
 * An administrator sets a temporary password: every session of that account ends, any lock-out is lifted, and
 * the person must choose their own password before anything else (so nobody signs a report with a password
 * someone else chose). Audited without the password.
 */
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
    await repo.storePassword(id, { passwordHash, mustChangePassword: true, at: new Date() }, transaction);
    const ended = await endSessionsOfUser(sequelize, id, transaction);
    await recordAudit(
      actor,
      {
        action: 'reset-password',
        entity: 'user',
        entityId: id,
        after: { mustChangePassword: true, sessionsEnded: ended },
        note: 'Temporary password set by an administrator; the person must choose their own at the next sign-in',
      },
      transaction,
    );
  });
}

const wrongCurrentPassword = () =>
  new AppError('BAD_CREDENTIALS', 'Your current password is not correct', {
    fields: { currentPassword: 'This is not your current password' },
  });

/**
 * A person changes their own password: the current one is checked (a wrong one counts toward the lock-out),
 * the new one is stored, the forced change (if any) is done, and every other session of the account ends.
 * Returns the account as the caller's own session should continue with it.
 */
export async function changeOwnPassword(
  sequelize: Sequelize,
  actor: User,
  input: ChangePasswordInput,
): Promise<SignedInAccount> {
  const now = new Date();
  const account = await repo.findUserById(actor.id);
  if (!account || !account.active) throw wrongCurrentPassword();
  refuseIfLocked(account.lockedUntil, now);
  if (!(await verifyPassword(input.currentPassword, account.passwordHash))) {
    return countWrongPassword(sequelize, { userId: account.id }, wrongCurrentPassword, now);
  }
  await admitRightPassword(sequelize, account.id, now);
  const passwordHash = await hashPassword(input.newPassword);
  return writeTransaction(sequelize, async (transaction) => {
    await repo.storePassword(account.id, { passwordHash, mustChangePassword: false, at: now }, transaction);
    const ended = await endSessionsOfUser(sequelize, account.id, transaction);
    await recordAudit(
      actor,
      {
        action: 'change-password',
        entity: 'user',
        entityId: account.id,
        after: { mustChangePassword: false, sessionsEnded: ended },
        note: account.mustChangePassword ? 'Own password chosen after an administrator’s reset' : 'Own password changed',
      },
      transaction,
    );
    const after = (await repo.findUserById(account.id, transaction))!;
    return { user: repo.sessionUser(after), generation: after.sessionGeneration };
  });
}
