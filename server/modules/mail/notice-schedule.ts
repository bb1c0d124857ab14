/*
 * When the notice worker tries again, and when it gives up (docs/notices.md). Pure: no clock, no I/O.
 *
 * The first try is immediate. After the n-th failed try the next one waits min(30 s × 2^(n−1), 1 h):
 * 30 s, 1 min, 2 min, 4 min, 8 min, 16 min, 32 min, 1 h, 1 h — ten tries over about 3 h, then the
 * notice is marked as not sent and an administrator can ask for it again. Doubling with a ceiling is the
 * usual exponential backoff; the laboratory's own mail server queues and retries for days after it has
 * accepted a message (RFC 5321 §4.5.4.1), so Cristae only has to get it that far.
 */

export type RetrySchedule = { firstDelayMs: number; maxDelayMs: number; maxAttempts: number };

export const DEFAULT_RETRY_SCHEDULE: RetrySchedule = { firstDelayMs: 30_000, maxDelayMs: 60 * 60_000, maxAttempts: 10 };

/** The wait after `failedAttempts` failed tries (1 = after the first), in milliseconds. */
export function retryDelayMs(failedAttempts: number, schedule: RetrySchedule = DEFAULT_RETRY_SCHEDULE): number {
  const n = Math.max(1, Math.floor(failedAttempts));
  return Math.min(schedule.firstDelayMs * 2 ** (n - 1), schedule.maxDelayMs);
}

/** Every wait between tries, first to last (maxAttempts − 1 of them). */
export function retryDelays(schedule: RetrySchedule = DEFAULT_RETRY_SCHEDULE): number[] {
  return Array.from({ length: schedule.maxAttempts - 1 }, (_, i) => retryDelayMs(i + 1, schedule));
}

/** An error that trying again cannot fix: no mail server configured, or an SMTP 5yz reply. */
export class PermanentMailError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'PermanentMailError';
  }
}

type SmtpishError = { code?: unknown; responseCode?: unknown; response?: unknown; message?: unknown };

/**
 * Whether a failed try is worth repeating. SMTP reply codes 4yz are transient and 5yz permanent
 * (RFC 5321 §4.2.1); a network error (refused, timed out, DNS) may clear up, so it is retried.
 */
export function isPermanent(err: unknown): boolean {
  if (err instanceof PermanentMailError) return true;
  const code = (err as SmtpishError | null)?.responseCode;
  return typeof code === 'number' && code >= 500 && code < 600;
}

/** The reason shown on the Sent e-mail page, in plain words, with the server's own reply kept. */
export function describeMailError(err: unknown): string {
  const e = (err ?? {}) as SmtpishError;
  const message = err instanceof Error ? err.message : String(err);
  const code = typeof e.code === 'string' ? e.code : '';
  const reply = typeof e.responseCode === 'number' ? e.responseCode : null;
  let text: string;
  if (err instanceof PermanentMailError) text = message;
  else if (code === 'EAUTH') text = `The mail server did not accept Cristae's sign-in (${message})`;
  else if (reply !== null && reply >= 500) text = `The mail server refused the message for good (${message})`;
  else if (reply !== null && reply >= 400) text = `The mail server asked Cristae to try later (${message})`;
  else if (/ECONNREFUSED|ECONNECTION|ENOTFOUND|EHOSTUNREACH|ENETUNREACH/.test(`${code} ${message}`)) {
    text = `Cristae could not reach the mail server (${message})`;
  } else if (/ETIMEDOUT|timeout/i.test(`${code} ${message}`)) text = `The mail server did not answer in time (${message})`;
  else text = message;
  return text.slice(0, 1000);
}
