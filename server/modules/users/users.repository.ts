import { literal, QueryTypes, type Transaction } from 'sequelize';
import type { Role } from '@/schemas/common';
import type { SessionUser, User, UserAccount } from '@/schemas/user';
import { SHARED_SESSION_CACHE_MS } from '../../auth/session-cache';
import { forgetEverywhere, onForget } from '../../db/forget-everywhere';
import { isPostgres } from '../../db/sequelize';
import { UserModel } from './user.model';

export type UserWithSecrets = UserAccount & { passwordHash: string; failedLogins: number; sessionGeneration: number };

function toAccount(row: UserModel): UserWithSecrets {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    title: row.title,
    role: row.role,
    active: row.active,
    lockedUntil: row.lockedUntil ? row.lockedUntil.toISOString() : null,
    mustChangePassword: row.mustChangePassword,
    passwordChangedAt: row.passwordChangedAt ? row.passwordChangedAt.toISOString() : null,
    version: row.version,
    createdAt: row.createdAt.toISOString(),
    passwordHash: row.passwordHash,
    failedLogins: row.failedLogins,
    sessionGeneration: row.sessionGeneration,
  };
}

export function publicUser(u: Pick<User, 'id' | 'email' | 'name' | 'role'>): User {
  return { id: u.id, email: u.email, name: u.name, role: u.role };
}

export function withoutSecrets({
  passwordHash: _h,
  failedLogins: _f,
  sessionGeneration: _g,
  ...account
}: UserWithSecrets): UserAccount {
  return account;
}

export function sessionUser(u: Pick<UserWithSecrets, 'id' | 'email' | 'name' | 'role' | 'mustChangePassword'>): SessionUser {
  return { ...publicUser(u), mustChangePassword: u.mustChangePassword };
}

export async function findUserByEmail(email: string): Promise<UserWithSecrets | null> {
  const row = await UserModel.findOne({ where: { email: email.toLowerCase() } });
  return row ? toAccount(row) : null;
}

// Every signed-in request looks its user up; the answer is kept briefly in memory and forgotten whenever this
// repository (the only writer of users) changes that account, so a deactivation takes effect at once in this
// process. Other application servers sharing a PostgreSQL database are told through forgetEverywhere (LISTEN/
// NOTIFY) and drop their copy at once; should a notice not arrive, a copy there is read again after
// SHARED_SESSION_CACHE_MS anyway, like the session itself (it had been 30 s).
export type SessionAccount = { user: SessionUser; generation: number };
const sessionUserCache = new Map<number, { account: SessionAccount | null; at: number }>();
const SESSION_USER_TTL_MS = 30_000;
const sessionUserTtl = () => (isPostgres(UserModel.sequelize!) ? SHARED_SESSION_CACHE_MS : SESSION_USER_TTL_MS);

function forgetUser(id: number): void {
  sessionUserCache.delete(id);
}

// Another server changed these accounts, or notices were missed (server/db/forget-everywhere.ts).
onForget((forget) => {
  if (forget.all) sessionUserCache.clear();
  else forget.users?.forEach(forgetUser);
});

/**
 * The active account behind a session with its session generation (a session opened under an older generation
 * has ended), or null when the account is gone or deactivated.
 */
export async function findSessionAccount(id: number): Promise<SessionAccount | null> {
  const hit = sessionUserCache.get(id);
  if (hit && Date.now() - hit.at < sessionUserTtl()) return hit.account;
  const row = await UserModel.findByPk(id);
  const account = row && row.active ? { user: sessionUser(row), generation: row.sessionGeneration } : null;
  if (sessionUserCache.size > 5000) sessionUserCache.clear();
  sessionUserCache.set(id, { account, at: Date.now() });
  return account;
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
  data: { email: string; name: string; title: string | null; role: Role; passwordHash: string; mustChangePassword?: boolean },
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
  // Forget again once the change is committed, so a read in between cannot keep the old account; other servers too.
  if (transaction) transaction.afterCommit(() => forgetEverywhere({ users: [id] }));
  else await forgetEverywhere({ users: [id] });
  return count === 1;
}

/**
 * Stores a new password: ends every session opened before it (the generation rises), lifts any lock-out and
 * records whether the person must choose another at the next sign-in. Bumps the version (it is an edit).
 */
export async function storePassword(
  id: number,
  change: { passwordHash: string; mustChangePassword: boolean; at: Date },
  transaction: Transaction,
): Promise<void> {
  forgetUser(id);
  await UserModel.update(
    {
      passwordHash: change.passwordHash,
      mustChangePassword: change.mustChangePassword,
      passwordChangedAt: change.at,
      failedLogins: 0,
      lockedUntil: null,
      sessionGeneration: literal('"sessionGeneration" + 1') as never,
      version: literal('"version" + 1') as never,
    },
    { where: { id }, transaction },
  );
  transaction.afterCommit(() => forgetEverywhere({ users: [id] }));
}

export type FailureCount = { failedLogins: number; lockedUntil: Date | null };

const toFailureCount = (row: { failedLogins: number; lockedUntil: string | null } | undefined): FailureCount | null =>
  row ? { failedLogins: row.failedLogins, lockedUntil: row.lockedUntil ? new Date(row.lockedUntil) : null } : null;

/**
 * Counts one wrong password in a single statement, so concurrent failures can neither be lost nor read stale:
 * every `threshold`-th failure in a row sets the lock. Answers the counter as this statement left it.
 * Sign-in bookkeeping is not an edit of the account, so the version stays.
 */
export async function countFailedPassword(
  id: number,
  opts: { threshold: number; lockUntil: Date },
  transaction: Transaction,
): Promise<FailureCount | null> {
  forgetUser(id);
  const rows = await UserModel.sequelize!.query<{ failedLogins: number; lockedUntil: string | null }>(
    `UPDATE users SET "failedLogins" = "failedLogins" + 1,
       "lockedUntil" = CASE WHEN ("failedLogins" + 1) % :threshold = 0 THEN :lockUntil ELSE "lockedUntil" END
     WHERE id = :id RETURNING "failedLogins", "lockedUntil"`,
    { replacements: { id, ...opts }, type: QueryTypes.SELECT, transaction },
  );
  return toFailureCount(rows[0]);
}

/** The counter read inside the caller's write transaction (the serialised step that admits a right password). */
export async function readFailureCount(id: number, transaction: Transaction): Promise<FailureCount | null> {
  const row = await UserModel.findByPk(id, { attributes: ['failedLogins', 'lockedUntil'], transaction });
  return row ? { failedLogins: row.failedLogins, lockedUntil: row.lockedUntil } : null;
}

export async function clearFailedPasswords(id: number, transaction: Transaction): Promise<void> {
  forgetUser(id);
  await UserModel.update({ failedLogins: 0, lockedUntil: null }, { where: { id }, transaction });
}

export async function countUsers(): Promise<number> {
  return UserModel.count();
}
