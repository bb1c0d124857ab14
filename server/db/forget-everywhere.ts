import type { Sequelize } from 'sequelize';
import { logError, logInfo } from '../lib/log';
import { openOwnConnection, type OwnConnection } from './sequelize';

/*
 * Application servers sharing a PostgreSQL database each keep copies of sessions and accounts in memory
 * (server/auth/session-cache.ts, server/modules/users/users.repository.ts). When one server ends a session or
 * changes an account, it tells the others through PostgreSQL's LISTEN/NOTIFY [confirmed: PostgreSQL 15 manual,
 * NOTIFY: "a notification is delivered to every session listening on the channel", payload under 8000 bytes, sent
 * when the notifying transaction commits], so their copies go at once instead of when they expire. The copies
 * still expire after a few seconds: a server whose listening connection is down misses notices, and that bound
 * then holds.
 */

/** What to drop: sessions by id, accounts by id, or every copy (after missed notices). */
export type Forget = { sessions?: string[]; users?: number[]; all?: true };

const CHANNEL = 'cristae_forget';
/** Session ids per notice: well under PostgreSQL's 8000-byte payload limit. */
const SIDS_PER_NOTICE = 100;

const handlers: ((forget: Forget) => void)[] = [];
let notify: ((payload: string) => Promise<void>) | null = null;

/** Registers what this process drops when told to forget (the caches register themselves when loaded). */
export function onForget(handler: (forget: Forget) => void): void {
  handlers.push(handler);
}

function forgetHere(forget: Forget): void {
  for (const handler of handlers) handler(forget);
}

/**
 * Drops the copies here and, on PostgreSQL with `listenForForgets` running, on every other server. Call it once
 * the change is committed (an `afterCommit` hook, or after a statement outside a transaction). Resolves once the
 * notices are with the database (never rejects: a notice that cannot be sent is logged, and the other servers'
 * copies then expire by themselves).
 */
export async function forgetEverywhere(forget: Forget): Promise<void> {
  forgetHere(forget);
  const send = notify;
  if (!send) return;
  const payloads: string[] = [];
  const sids = forget.sessions ?? [];
  for (let i = 0; i < sids.length; i += SIDS_PER_NOTICE) payloads.push(JSON.stringify({ sessions: sids.slice(i, i + SIDS_PER_NOTICE) }));
  if (forget.users?.length) payloads.push(JSON.stringify({ users: forget.users }));
  await Promise.all(payloads.map(send));
}

function parse(payload: string | undefined): Forget | null {
  try {
    const f = JSON.parse(payload ?? '') as Forget;
    const sessions = Array.isArray(f.sessions) ? f.sessions.filter((s) => typeof s === 'string') : undefined;
    const users = Array.isArray(f.users) ? f.users.filter((u) => Number.isInteger(u)) : undefined;
    return { sessions, users };
  } catch {
    return null;
  }
}

const RETRY_FIRST_MS = 1_000;
const RETRY_MAX_MS = 30_000;

/**
 * PostgreSQL only: listens for other servers' notices on a connection of its own (outside the pool) and sends
 * this server's through the pool. A lost connection is opened again (after 1 s, doubling up to 30 s); every copy
 * is dropped when it is back, since notices sent meanwhile were missed. Answers a function that stops listening.
 */
export async function listenForForgets(sequelize: Sequelize): Promise<() => Promise<void>> {
  notify = (payload) =>
    sequelize.query('SELECT pg_notify(:channel, :payload)', { replacements: { channel: CHANNEL, payload } }).then(
      () => undefined,
      (err: unknown) => logError(err, 'telling other servers to forget'),
    );
  let connection: OwnConnection | null = null;
  let stopped = false;
  let retryMs = RETRY_FIRST_MS;
  let timer: NodeJS.Timeout | null = null;

  const connect = async (again: boolean): Promise<void> => {
    let own: OwnConnection | null = null;
    try {
      own = await openOwnConnection(sequelize);
      const mine = own;
      const c = own.client;
      c.on('notification', (message) => {
        if (message.channel !== CHANNEL) return;
        const forget = parse(message.payload);
        if (forget) forgetHere(forget);
      });
      const lost = () => {
        if (connection !== mine) return;
        connection = null;
        if (!stopped) schedule();
      };
      c.on('error', lost);
      c.on('end', lost);
      await c.query(`LISTEN ${CHANNEL}`);
      connection = mine;
      retryMs = RETRY_FIRST_MS;
      if (again) {
        forgetHere({ all: true });
        logInfo('listening again for other servers’ sign-outs and account changes');
      }
    } catch (err) {
      await own?.close().catch(() => undefined);
      if (!again) throw err;
      logError(err, 'listening for other servers’ sign-outs and account changes');
      schedule();
    }
  };
  const schedule = () => {
    timer = setTimeout(() => void connect(true), retryMs);
    timer.unref();
    retryMs = Math.min(retryMs * 2, RETRY_MAX_MS);
  };

  await connect(false);
  return async () => {
    stopped = true;
    notify = null;
    if (timer) clearTimeout(timer);
    const own = connection;
    connection = null;
    await own?.close().catch(() => undefined);
  };
}
