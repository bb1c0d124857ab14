import { AppError } from '../lib/errors';
import { findUserByEmail, publicUser, setLoginState } from '../modules/users/users.repository';
import type { User } from '@/schemas/user';
import { hashPassword, verifyPassword } from './password';

export const LOCKOUT_THRESHOLD = 5;
export const LOCKOUT_MINUTES = 15;

// Compared against when the e-mail is unknown, so a wrong address costs as long as a wrong password.
let decoyHash: Promise<string> | null = null;

const badCredentials = () => new AppError('BAD_CREDENTIALS', 'E-mail address or password is not correct');

/**
 * Checks a sign-in attempt. After LOCKOUT_THRESHOLD wrong passwords in a row the account is locked for
 * LOCKOUT_MINUTES; an administrator can lift the lock by resetting the password or reactivating the account.
 */
export async function checkCredentials(email: string, password: string, now = new Date()): Promise<User> {
  const user = await findUserByEmail(email.trim());
  if (!user || !user.active) {
    decoyHash ??= hashPassword('decoy-password-for-timing');
    await verifyPassword(password, await decoyHash);
    throw badCredentials();
  }
  if (user.lockedUntil && new Date(user.lockedUntil) > now) {
    throw new AppError(
      'ACCOUNT_LOCKED',
      `This account is locked after ${LOCKOUT_THRESHOLD} failed sign-ins. Try again after ${LOCKOUT_MINUTES} minutes or ask an administrator.`,
    );
  }
  if (!(await verifyPassword(password, user.passwordHash))) {
    const failures = user.failedLogins + 1;
    if (failures >= LOCKOUT_THRESHOLD) {
      await setLoginState(user.id, 0, new Date(now.getTime() + LOCKOUT_MINUTES * 60_000));
      throw new AppError(
        'ACCOUNT_LOCKED',
        `Too many failed sign-ins: this account is locked for ${LOCKOUT_MINUTES} minutes.`,
      );
    }
    await setLoginState(user.id, failures, null);
    throw badCredentials();
  }
  if (user.failedLogins !== 0 || user.lockedUntil) await setLoginState(user.id, 0, null);
  return publicUser(user);
}
