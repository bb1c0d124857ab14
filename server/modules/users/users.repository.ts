import type { Transaction } from 'sequelize';
import type { Role } from '@/schemas/common';
import type { User, UserAccount } from '@/schemas/user';
import { UserModel } from './user.model';

export type UserWithSecrets = UserAccount & { passwordHash: string; failedLogins: number };

function toAccount(row: UserModel): UserWithSecrets {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    title: row.title,
    role: row.role,
    active: row.active,
    lockedUntil: row.lockedUntil ? row.lockedUntil.toISOString() : null,
    version: row.version,
    createdAt: row.createdAt.toISOString(),
    passwordHash: row.passwordHash,
    failedLogins: row.failedLogins,
  };
}

export function publicUser(u: Pick<User, 'id' | 'email' | 'name' | 'role'>): User {
  return { id: u.id, email: u.email, name: u.name, role: u.role };
}

export function withoutSecrets({ passwordHash: _h, failedLogins: _f, ...account }: UserWithSecrets): UserAccount {
  return account;
}

export async function findUserByEmail(email: string): Promise<UserWithSecrets | null> {
  const row = await UserModel.findOne({ where: { email: email.toLowerCase() } });
  return row ? toAccount(row) : null;
}

// Every signed-in request looks its user up; the answer is kept briefly in memory and forgotten whenever this
// repository (the only writer of users) changes that account, so a deactivation still takes effect at once.
const sessionUserCache = new Map<number, { user: User | null; at: number }>();
const SESSION_USER_TTL_MS = 30_000;

function forgetUser(id: number): void {
  sessionUserCache.delete(id);
}

/** The active account behind a session, or null when it is gone or deactivated. */
export async function findSessionUser(id: number): Promise<User | null> {
  const hit = sessionUserCache.get(id);
  if (hit && Date.now() - hit.at < SESSION_USER_TTL_MS) return hit.user;
  const row = await UserModel.findByPk(id);
  const user = row && row.active ? publicUser(row) : null;
  if (sessionUserCache.size > 5000) sessionUserCache.clear();
  sessionUserCache.set(id, { user, at: Date.now() });
  return user;
}

export async function findUserById(id: number, transaction?: Transaction): Promise<UserWithSecrets | null> {
  const row = await UserModel.findByPk(id, { transaction });
  return row ? toAccount(row) : null;
}

export async function listUsers(filter: { role?: Role; active?: boolean } = {}): Promise<UserWithSecrets[]> {
  const where: Record<string, unknown> = {};
  if (filter.role) where.role = filter.role;
  if (filter.active !== undefined) where.active = filter.active;
  const rows = await UserModel.findAll({ where, order: [['name', 'ASC']] });
  return rows.map(toAccount);
}

export async function insertUser(
  data: { email: string; name: string; title: string | null; role: Role; passwordHash: string },
  transaction?: Transaction,
): Promise<UserWithSecrets> {
  const row = await UserModel.create({ ...data, email: data.email.toLowerCase(), lockedUntil: null }, { transaction });
  return toAccount(row);
}

/**
 * Updates a user only if its version is still `expectedVersion` (optimistic locking).
 * Returns false when another save got there first.
 */
export async function updateUserIfVersion(
  id: number,
  expectedVersion: number,
  changes: Partial<Pick<UserModel, 'name' | 'title' | 'role' | 'active' | 'passwordHash' | 'failedLogins' | 'lockedUntil'>>,
  transaction?: Transaction,
): Promise<boolean> {
  forgetUser(id);
  const [count] = await UserModel.update(
    { ...changes, version: expectedVersion + 1 },
    { where: { id, version: expectedVersion }, transaction },
  );
  // Forget again once the transaction ends, so a read in between cannot keep the old account.
  transaction?.afterCommit(() => forgetUser(id));
  return count === 1;
}

/** Sign-in bookkeeping: counters are not edits of the account, so they do not bump its version. */
export async function setLoginState(id: number, failedLogins: number, lockedUntil: Date | null): Promise<void> {
  forgetUser(id);
  await UserModel.update({ failedLogins, lockedUntil }, { where: { id } });
}

export async function countUsers(): Promise<number> {
  return UserModel.count();
}
