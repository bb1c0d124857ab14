import type { Sequelize } from 'sequelize';
import { writeTransaction } from '../db/write-transaction';
import { AppError } from '../lib/errors';
import { recordAudit } from '../modules/audit/audit.service';
import { countAddressFailure } from '../modules/auth/sign-in-failures.repository';
import { clearFailedPasswords, countFailedPassword, readFailureCount } from '../modules/users/users.repository';

/*
 * Lock-out after repeated wrong passwords (OWASP ASVS 4.0, 2.2.1). Sign-in, the signing password and the
 * current password of a change all count toward the same counter. Every count is one UPDATE … RETURNING inside
 * the queued write transaction, and a right password is admitted only after reading the counter inside the same
 * queue, so a burst of concurrent guesses cannot slip past the limit.
 */

export const LOCKOUT_THRESHOLD = 5;
export const LOCKOUT_MINUTES = 15;

/** One answer whether or not the e-mail address belongs to an account. */
export const accountLocked = () =>
  new AppError(
    'ACCOUNT_LOCKED',
    `Too many wrong passwords in a row: this sign-in is paused for ${LOCKOUT_MINUTES} minutes. An administrator can lift the pause by setting a temporary password.`,
  );

/** Whose counter: an account, or an e-mail address with no usable account behind it. */
export type Counter = { userId: number } | { email: string };

export function isLocked(lockedUntil: Date | string | null, now: Date): boolean {
  return lockedUntil !== null && new Date(lockedUntil) > now;
}

export function refuseIfLocked(lockedUntil: Date | string | null, now: Date): void {
  if (isLocked(lockedUntil, now)) throw accountLocked();
}

/**
 * Counts a wrong password and throws: 423 when the counter is locked after this failure (this one may have
 * reached the limit, or concurrent ones did), otherwise the caller's own error.
 */
export async function countWrongPassword(
  sequelize: Sequelize,
  counter: Counter,
  wrong: () => AppError,
  now = new Date(),
): Promise<never> {
  const opts = { threshold: LOCKOUT_THRESHOLD, lockUntil: new Date(now.getTime() + LOCKOUT_MINUTES * 60_000) };
  const count = await writeTransaction(sequelize, async (t) => {
    const c =
      'userId' in counter
        ? await countFailedPassword(counter.userId, opts, t)
        : await countAddressFailure(sequelize, counter.email, { ...opts, now }, t);
    if (c && c.failedLogins % LOCKOUT_THRESHOLD === 0) {
      await recordAudit(
        null,
        {
          action: 'lock-out',
          entity: 'user',
          entityId: 'userId' in counter ? counter.userId : null,
          note: `${c.failedLogins} wrong passwords in a row${'email' in counter ? ` for ${counter.email} (no usable account)` : ''}; paused until ${opts.lockUntil.toISOString()}`,
        },
        t,
      );
    }
    return c;
  });
  if (count && isLocked(count.lockedUntil, now)) throw accountLocked();
  throw wrong();
}

/**
 * The serialised step after a right password: the counter is read inside the write queue, so failures counted
 * before it are seen; a lock answers 423, otherwise the counter starts again from zero.
 */
export async function admitRightPassword(sequelize: Sequelize, userId: number, now = new Date()): Promise<void> {
  await writeTransaction(sequelize, async (t) => {
    const count = await readFailureCount(userId, t);
    if (!count) return;
    refuseIfLocked(count.lockedUntil, now);
    if (count.failedLogins !== 0 || count.lockedUntil) await clearFailedPasswords(userId, t);
  });
}
