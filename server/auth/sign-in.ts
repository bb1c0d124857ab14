import type { Sequelize } from 'sequelize';
import { AppError } from '../lib/errors';
import { readAddressFailures } from '../modules/auth/sign-in-failures.repository';
import { findUserByEmail, sessionUser } from '../modules/users/users.repository';
import type { SessionUser } from '@/schemas/user';
import { hashPassword, verifyPassword } from './password';
import { admitRightPassword, countWrongPassword, refuseIfLocked } from './lockout';

export { LOCKOUT_MINUTES, LOCKOUT_THRESHOLD } from './lockout';

/** What a successful check hands to the session: the user and the session generation it was opened under. */
export type SignedInAccount = { user: SessionUser; generation: number };

// Compared against when the e-mail is unknown, so a wrong address costs as long as a wrong password.
let decoyHash: Promise<string> | null = null;

const badCredentials = () => new AppError('BAD_CREDENTIALS', 'E-mail address or password is not correct');

/**
 * Checks a sign-in attempt. After LOCKOUT_THRESHOLD wrong passwords in a row the account is locked for
 * LOCKOUT_MINUTES; an administrator can lift the lock by setting a temporary password or reactivating the
 * account. An address with no usable account (unknown or deactivated) is counted and locked the same way, with
 * the same messages, so the answers do not tell whether an account exists.
 */
export async function checkCredentials(
  sequelize: Sequelize,
  email: string,
  password: string,
  now = new Date(),
): Promise<SignedInAccount> {
  const address = email.trim().toLowerCase();
  const user = await findUserByEmail(address);
  if (!user || !user.active) {
    refuseIfLocked((await readAddressFailures(sequelize, address)).lockedUntil, now);
    decoyHash ??= hashPassword('decoy-password-for-timing');
    await verifyPassword(password, await decoyHash);
    return countWrongPassword(sequelize, { email: address }, badCredentials, now);
  }
  refuseIfLocked(user.lockedUntil, now);
  if (!(await verifyPassword(password, user.passwordHash))) {
    return countWrongPassword(sequelize, { userId: user.id }, badCredentials, now);
  }
  await admitRightPassword(sequelize, user.id, now);
  return { user: sessionUser(user), generation: user.sessionGeneration };
}
