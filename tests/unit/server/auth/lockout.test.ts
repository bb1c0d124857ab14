import { describe, expect, it } from 'vitest';
import { accountLocked, isLocked, LOCKOUT_MINUTES, LOCKOUT_THRESHOLD, refuseIfLocked } from '../../../../server/auth/lockout';
import { AppError } from '../../../../server/lib/errors';

/*
 * Lock-out after repeated wrong passwords: OWASP ASVS 4.0 V2.2.1 asks for anti-automation such as a lock-out
 * [confirmed]; the limits (five wrong passwords in a row, a 15-minute pause) are the API contract (docs/api.md, "Passwords and lock-out")
 * [common practice]. Counting itself runs in the database and is tested in tests/api.
 */
const now = new Date('2031-04-02T10:00:00.000Z');
const at = (ms: number) => new Date(now.getTime() + ms);

describe('isLocked / refuseIfLocked', () => {
  it('is locked while the pause lasts and free from the instant it ends', () => {
    // [common practice] a pause "until T" is over at T: locked strictly before, free at and after.
    expect(isLocked(at(1), now)).toBe(true);
    expect(isLocked(at(0), now)).toBe(false);
    expect(isLocked(at(-1), now)).toBe(false);
    expect(isLocked(null, now)).toBe(false);
  });
  it('reads the time as stored by the database (an ISO string) the same way', () => {
    // [confirmed] ECMA-262 Date parsing of the ISO 8601 date-time string format.
    expect(isLocked('2031-04-02T10:00:00.001Z', now)).toBe(true);
    expect(isLocked('2031-04-02T10:00:00.000Z', now)).toBe(false);
  });
  it('refuses with 423 ACCOUNT_LOCKED naming the pause, and passes otherwise', () => {
    // [confirmed] RFC 4918 §11.3: 423 Locked; the message states the pause length (product rule).
    expect(() => refuseIfLocked(at(-1), now)).not.toThrow();
    expect(() => refuseIfLocked(null, now)).not.toThrow();
    let caught: unknown;
    try {
      refuseIfLocked(at(60_000), now);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(AppError);
    expect((caught as AppError).code).toBe('ACCOUNT_LOCKED');
    expect((caught as AppError).status).toBe(423);
    expect((caught as AppError).message).toContain('15 minutes');
    expect(accountLocked().message).toBe((caught as AppError).message);
  });
  it('pauses after five wrong passwords for fifteen minutes', () => {
    // [confirmed] API contract limits, written here from docs/api.md ("Five wrong passwords in a row lock sign-in for 15 minutes") rather than read from the code.
    expect([LOCKOUT_THRESHOLD, LOCKOUT_MINUTES]).toEqual([5, 15]);
  });
});
