import type { RequestHandler } from 'express';
import type { Store } from 'express-session';
import { forgetEverywhere, onForget } from '../db/forget-everywhere';

type SessionStoreLike = Pick<Store, 'get' | 'set' | 'destroy' | 'touch'>;

/** How often a session's expiry is pushed forward (and its cookie sent again): at most once per interval. */
export const SESSION_EXTEND_EVERY_MS = 5 * 60_000;
/** How many sessions one process keeps in memory; the next one empties the cache (it fills again as sessions are read). */
export const SESSION_CACHE_MAX_ENTRIES = 10_000;
/** How long a process serves its copy of a session from a store other processes also write (PostgreSQL). */
export const SHARED_SESSION_CACHE_MS = 5_000;

type Plain = null | boolean | number | string | Plain[] | { [key: string]: Plain };
type Entry = { data: { [key: string]: Plain }; expiresAt: number; readAt: number };

// Every cache made in this process, so ending an account's sessions can drop them from all of them.
const caches = new Set<Map<string, Entry>>();

/** Drops these sessions from every in-memory cache of this process (their rows have been deleted). */
export function forgetCachedSessions(sids: readonly string[]): void {
  for (const cache of caches) for (const sid of sids) cache.delete(sid);
}

// Another server ended these sessions, or notices were missed (server/db/forget-everywhere.ts).
onForget((forget) => {
  if (forget.all) for (const cache of caches) cache.clear();
  else if (forget.sessions) forgetCachedSessions(forget.sessions);
});

/** A deep copy of JSON-shaped data: express-session and passport mutate the object they are handed. */
function copy<T extends Plain>(value: T): T {
  if (value === null || typeof value !== 'object') return value;
  if (Array.isArray(value)) return value.map(copy) as T;
  const out: { [key: string]: Plain } = {};
  for (const key in value) out[key] = copy(value[key]!);
  return out as T;
}

/**
 * Sessions stay in the database (they survive a restart and are shared by every application process), but a
 * process need not read the same row on every request: reads are served from memory as copies of plain data
 * (no JSON round trip), writes go through to the store and refresh the copy, sign-out drops it. Expiry is not
 * written on every request: `extendSessions` re-saves a session once per SESSION_EXTEND_EVERY_MS, so the
 * store's per-request touch is not needed.
 */
/**
 * `maxAgeMs` bounds how long a copy is served without reading the row again. One process (SQLite) sees every
 * change to its sessions, so its copies live until the session expires; several processes sharing a PostgreSQL
 * database do not see each other's sign-outs or ended sessions, so there a copy is re-read after a few seconds.
 */
export function cacheSessionReads(store: SessionStoreLike, opts: { maxAgeMs?: number } = {}): void {
  const maxAgeMs = opts.maxAgeMs ?? Infinity;
  const cache = new Map<string, Entry>();
  caches.add(cache);
  const remember = (sid: string, data: { [key: string]: Plain }) => {
    const expires = (data.cookie as { expires?: string } | null)?.expires;
    if (cache.size >= SESSION_CACHE_MAX_ENTRIES) cache.clear();
    cache.set(sid, { data, expiresAt: expires ? Date.parse(expires) : Infinity, readAt: Date.now() });
  };

  const get = store.get.bind(store);
  const set = store.set.bind(store);
  const destroy = store.destroy.bind(store);

  store.get = (sid, callback) => {
    const hit = cache.get(sid);
    if (hit) {
      if (hit.expiresAt > Date.now() && Date.now() - hit.readAt < maxAgeMs) return callback(null, copy(hit.data) as never);
      cache.delete(sid);
    }
    get(sid, (err, session) => {
      if (err || !session) return callback(err, session);
      const data = copy(session as unknown as { [key: string]: Plain });
      // The table's periodic clean-up may not have run yet: an expired row is ended here, never served.
      const expires = (data.cookie as { expires?: string } | null)?.expires;
      if (expires && Date.parse(expires) <= Date.now()) return destroy(sid, () => callback(null, null));
      remember(sid, data);
      callback(null, session);
    });
  };
  store.set = (sid, session, callback) => {
    cache.delete(sid);
    // The session object carries a Cookie instance; its JSON form is what the store keeps and reads back.
    const data = JSON.parse(JSON.stringify(session)) as { [key: string]: Plain };
    set(sid, session, (err?: unknown) => {
      if (!err) remember(sid, data);
      callback?.(err);
    });
  };
  store.destroy = (sid, callback) => {
    cache.delete(sid);
    destroy(sid, (err?: unknown) => {
      if (err) return callback?.(err);
      // Signed out: other servers drop their copies too (those sharing a PostgreSQL database), before the answer.
      void forgetEverywhere({ sessions: [sid] }).then(() => callback?.());
    });
  };
  store.touch = (_sid, _session, callback) => callback?.();
}

/**
 * Rolling expiry with a coarse step, for express-session with `rolling: false`: a stored session whose expiry
 * was last pushed forward SESSION_EXTEND_EVERY_MS or more ago is marked changed, so express-session saves it
 * once and sends the cookie with a fresh expiry; on every other request the cookie is neither re-signed nor
 * re-sent and nothing is written. The eight-hour idle limit therefore holds to within the step.
 */
export function extendSessions(everyMs = SESSION_EXTEND_EVERY_MS): RequestHandler {
  return (req, _res, next) => {
    const session = req.session as (typeof req.session & { extendedAt?: number }) | undefined;
    const { expires, originalMaxAge } = session?.cookie ?? {};
    if (session && expires && originalMaxAge && originalMaxAge - (expires.getTime() - Date.now()) >= everyMs) {
      session.extendedAt = Date.now();
    }
    next();
  };
}
