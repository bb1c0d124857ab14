import { describe, expect, it } from 'vitest';
import {
  DEFAULT_RETRY_SCHEDULE,
  PermanentMailError,
  describeMailError,
  isPermanent,
  retryDelayMs,
  retryDelays,
} from '../../../../server/modules/mail/notice-schedule';

/*
 * The notice worker's retry policy against what docs/notices.md publishes, and the split of SMTP replies into
 * "try later" and "refused for good": RFC 5321 §4.2.1 makes 4yz transient and 5yz permanent negative
 * completions [from memory]; the enhanced status classes of RFC 1893/3463 split the same way (4.x.x persistent
 * transient, 5.x.x permanent) [confirmed in a page quoting RFC 1893].
 */

const smtpError = (responseCode: number, message: string, code = 'EENVELOPE') => Object.assign(new Error(message), { responseCode, code });

describe('retry schedule', () => {
  it('waits 30 s, 1, 2, 4, 8, 16, 32 min, 1 h and 1 h between ten tries (the table in docs/notices.md)', () => {
    expect(DEFAULT_RETRY_SCHEDULE.maxAttempts).toBe(10);
    expect(retryDelays().map((ms) => ms / 1000)).toEqual([30, 60, 120, 240, 480, 960, 1920, 3600, 3600]);
    // About 3 h from the first try to the last [derived: 30+60+120+240+480+960+1920+3600+3600 = 11010 s].
    expect(retryDelays().reduce((a, b) => a + b, 0) / 1000).toBe(11010);
  });

  it('never waits longer than the ceiling, however many tries have failed', () => {
    expect(retryDelayMs(40)).toBe(60 * 60_000);
    expect(retryDelayMs(0)).toBe(30_000);
  });
});

describe('which failures are worth another try', () => {
  it('a 4yz reply or a network error is tried again; a 5yz reply or no mail server is not', () => {
    expect(isPermanent(smtpError(451, 'Requested action aborted: local error in processing'))).toBe(false);
    expect(isPermanent(smtpError(421, 'Service not available'))).toBe(false);
    expect(isPermanent(Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:1'), { code: 'ESOCKET' }))).toBe(false);
    expect(isPermanent(smtpError(550, 'Requested action not taken: mailbox unavailable'))).toBe(true);
    expect(isPermanent(smtpError(554, 'Transaction failed', 'EMESSAGE'))).toBe(true);
    expect(isPermanent(new PermanentMailError('No mail server is configured'))).toBe(true);
  });

  it('the reason names what happened in plain words and keeps the server’s own reply', () => {
    expect(describeMailError(smtpError(451, '451 Try again later'))).toBe('The mail server asked Cristae to try later (451 Try again later)');
    expect(describeMailError(smtpError(550, '550 No such user'))).toBe('The mail server refused the message for good (550 No such user)');
    expect(describeMailError(Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:1'), { code: 'ESOCKET' }))).toBe(
      'Cristae could not reach the mail server (connect ECONNREFUSED 127.0.0.1:1)',
    );
    expect(describeMailError(smtpError(535, 'Invalid login: 535 Authentication failed', 'EAUTH'))).toMatch(/did not accept Cristae's sign-in/);
    expect(describeMailError(new Error('x'.repeat(5000)))).toHaveLength(1000);
  });
});
