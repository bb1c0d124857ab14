import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { FailureCount } from '../users/users.repository';

/*
 * Failed sign-ins for e-mail addresses with no usable account (unknown or deactivated). They are counted and
 * locked exactly like an account's own counter, so the answers never tell whether an account exists.
 */

type Row = { failedLogins: number; lockedUntil: string | null };
const toCount = (row: Row | undefined): FailureCount =>
  row
    ? { failedLogins: row.failedLogins, lockedUntil: row.lockedUntil ? new Date(row.lockedUntil) : null }
    : { failedLogins: 0, lockedUntil: null };

export async function readAddressFailures(sequelize: Sequelize, email: string): Promise<FailureCount> {
  const rows = await sequelize.query<Row>(
    'SELECT "failedLogins", "lockedUntil" FROM sign_in_failures WHERE email = :email',
    { replacements: { email }, type: QueryTypes.SELECT },
  );
  return toCount(rows[0]);
}

/**
 * One more failure for the address: the row is created at zero if missing, then counted by a single
 * UPDATE … RETURNING like an account's counter (every threshold-th failure in a row sets the lock).
 */
export async function countAddressFailure(
  sequelize: Sequelize,
  email: string,
  opts: { threshold: number; lockUntil: Date; now: Date },
  transaction: Transaction,
): Promise<FailureCount> {
  await sequelize.query(
    `INSERT INTO sign_in_failures (email, "failedLogins", "lockedUntil", "updatedAt") VALUES (:email, 0, NULL, :now)
     ON CONFLICT(email) DO NOTHING`,
    { replacements: { email, now: opts.now }, transaction },
  );
  const rows = await sequelize.query<Row>(
    `UPDATE sign_in_failures SET "failedLogins" = "failedLogins" + 1,
       "lockedUntil" = CASE WHEN ("failedLogins" + 1) % :threshold = 0 THEN :lockUntil ELSE "lockedUntil" END,
       "updatedAt" = :now
     WHERE email = :email RETURNING "failedLogins", "lockedUntil"`,
    { replacements: { email, ...opts }, type: QueryTypes.SELECT, transaction },
  );
  return toCount(rows[0]);
}
