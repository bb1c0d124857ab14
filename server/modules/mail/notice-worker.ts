import type { Sequelize } from 'sequelize';
import { Op } from 'sequelize';
import { writeTransaction } from '../../db/write-transaction';
import { logError, logInfo } from '../../lib/log';
import { findDueNotices, updateNotice } from './mail.repository';
import type { Mailer } from './mailer';
import { DEFAULT_RETRY_SCHEDULE, describeMailError, isPermanent, retryDelayMs, type RetrySchedule } from './notice-schedule';

/*
 * Delivers the durable outbox (docs/notices.md). A notice row is written in the signing transaction as
 * 'pending'; this worker claims a due row ('sending', attempts + 1, a lease), hands it to the mail server and
 * marks it 'sent', or 'pending' again with the next try's time, or 'failed' with the reason. A row left
 * 'sending' by a process that stopped mid-send becomes due again when its lease runs out, so a notice is
 * delivered at least once; in that narrow case it can arrive twice.
 */

export type Clock = () => Date;

export type NoticeDeliveryOptions = {
  sequelize: Sequelize;
  mailer: Mailer;
  /** Injected in tests; the real time otherwise. */
  now?: Clock;
  schedule?: RetrySchedule;
  /** How long a claimed row stays claimed; past it another try may take the row. */
  leaseMs?: number;
  /** Most notices handled in one run (the rest wait for the next run). */
  maxPerRun?: number;
};

export type RunSummary = { sent: number; retrying: number; failed: number };

/** Longer than nodemailer's connection, greeting and socket timeouts together (mailer.ts): 10 + 10 + 20 s. */
export const DEFAULT_LEASE_MS = 2 * 60_000;

const INTERRUPTED = 'The previous try was cut short (Cristae stopped while sending); the notice is sent again.';
const INTERRUPTED_GIVE_UP = 'Every try was cut short (Cristae stopped while sending each time); no further tries.';

type Claimed = { id: number; reportId: number | null; attempts: number; recipient: string; subject: string; body: string };

export function createNoticeDelivery(opts: NoticeDeliveryOptions) {
  const { sequelize, mailer } = opts;
  const now = opts.now ?? (() => new Date());
  const schedule = opts.schedule ?? DEFAULT_RETRY_SCHEDULE;
  const leaseMs = opts.leaseMs ?? DEFAULT_LEASE_MS;
  const maxPerRun = opts.maxPerRun ?? 50;

  /** Takes the oldest due notice for this process, or gives up on one that was cut short too often. */
  async function claimOne(summary: RunSummary): Promise<Claimed | null | 'again'> {
    const at = now();
    return writeTransaction(sequelize, async (t) => {
      const [row] = await findDueNotices(at, 1, t);
      if (!row) return null;
      const seen = { status: row.status, attempts: row.attempts };
      const interrupted = row.status === 'sending';
      if (row.body === null || (interrupted && row.attempts >= schedule.maxAttempts)) {
        const lastError = row.body === null ? 'The text of this notice was not kept, so it cannot be sent.' : INTERRUPTED_GIVE_UP;
        await updateNotice(row.id, seen, { status: 'failed', leaseUntil: null, nextAttemptAt: null, lastError }, t);
        summary.failed += 1;
        return 'again';
      }
      const attempts = row.attempts + 1;
      await updateNotice(
        row.id,
        seen,
        {
          status: 'sending',
          attempts,
          leaseUntil: new Date(at.getTime() + leaseMs),
          lastAttemptAt: at,
          ...(interrupted ? { lastError: INTERRUPTED } : {}),
        },
        t,
      );
      return { id: row.id, reportId: row.reportId, attempts, recipient: row.recipient, subject: row.subject, body: row.body };
    });
  }

  async function deliver(c: Claimed): Promise<keyof RunSummary> {
    try {
      const { messageId } = await mailer.send({ to: c.recipient, subject: c.subject, text: c.body });
      await writeTransaction(sequelize, (t) =>
        updateNotice(
          c.id,
          { status: { [Op.ne]: 'sent' } },
          { status: 'sent', sentAt: now(), messageId, leaseUntil: null, nextAttemptAt: null, lastError: null },
          t,
        ),
      );
      logInfo('notice sent', { notice: c.id, reportId: c.reportId, attempt: c.attempts });
      return 'sent';
    } catch (err) {
      const reason = describeMailError(err);
      const giveUp = isPermanent(err) || c.attempts >= schedule.maxAttempts;
      const at = now();
      const values = giveUp
        ? { status: 'failed' as const, leaseUntil: null, nextAttemptAt: null, lastError: reason }
        : { status: 'pending' as const, leaseUntil: null, nextAttemptAt: new Date(at.getTime() + retryDelayMs(c.attempts, schedule)), lastError: reason };
      // Only if the row is still this try's: a lease that ran out may have passed it to another try.
      await writeTransaction(sequelize, (t) => updateNotice(c.id, { status: 'sending', attempts: c.attempts }, values, t));
      logInfo(giveUp ? 'notice not sent; no further tries' : 'notice not sent; will try again', {
        notice: c.id,
        reportId: c.reportId,
        attempt: c.attempts,
        reason,
        nextAttemptAt: values.nextAttemptAt?.toISOString() ?? null,
      });
      return giveUp ? 'failed' : 'retrying';
    }
  }

  /** Sends every notice due now, one at a time; never throws for a mail problem (only for a database one). */
  async function runOnce(): Promise<RunSummary> {
    const summary: RunSummary = { sent: 0, retrying: 0, failed: 0 };
    for (let handled = 0; handled < maxPerRun; handled += 1) {
      const claimed = await claimOne(summary);
      if (claimed === null) break;
      if (claimed === 'again') continue;
      summary[await deliver(claimed)] += 1;
    }
    return summary;
  }

  return { runOnce };
}

export type NoticeWorkerOptions = NoticeDeliveryOptions & {
  /** Time between looks at the outbox when nothing wakes the worker. */
  pollMs?: number;
  /** Wait before the first look (tests use it to stop the process between commit and delivery). */
  startDelayMs?: number;
};

export type NoticeWorker = { stop: () => Promise<void> };

const wakers = new Set<() => void>();

/** Tells running workers that a notice was just queued, so it goes out now rather than at the next poll. */
export function nudgeNoticeWorkers(): void {
  for (const wake of wakers) wake();
}

/** Starts the background loop that runs the delivery until `stop()`, which waits for the run in progress. */
export function startNoticeWorker(opts: NoticeWorkerOptions): NoticeWorker {
  const delivery = createNoticeDelivery(opts);
  const pollMs = opts.pollMs ?? 5000;
  let started = false;
  let stopped = false;
  let again = false;
  let running: Promise<void> | null = null;
  let timer: NodeJS.Timeout | undefined;

  const later = (ms: number) => {
    if (stopped) return;
    clearTimeout(timer);
    timer = setTimeout(tick, ms);
    timer.unref();
  };
  function tick(): void {
    if (stopped) return;
    if (running) {
      again = true;
      return;
    }
    running = delivery
      .runOnce()
      .then(
        () => undefined,
        (err: unknown) => logError(err, 'notice worker'),
      )
      .finally(() => {
        running = null;
        const soon = again;
        again = false;
        later(soon ? 0 : pollMs);
      });
  }
  const wake = () => {
    if (started) later(0);
  };
  wakers.add(wake);
  const first = setTimeout(() => {
    started = true;
    tick();
  }, opts.startDelayMs ?? 0);
  first.unref();

  return {
    stop: async () => {
      stopped = true;
      wakers.delete(wake);
      clearTimeout(first);
      clearTimeout(timer);
      await running;
    },
  };
}
