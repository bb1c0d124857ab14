import type { Store } from 'express-session';

type SessionStoreLike = Pick<Store, 'get' | 'set' | 'destroy' | 'touch'>;

const TOUCH_EVERY_MS = 60_000;
const MAX_ENTRIES = 10_000;

// Every cache made in this process, so ending an account's sessions can drop them from all of them.
const caches = new Set<{ cache: Map<string, string>; lastTouch: Map<string, number> }>();

/** Drops these sessions from every in-memory cache (their rows have been deleted). */
export function forgetCachedSessions(sids: readonly string[]): void {
  for (const c of caches) {
    for (const sid of sids) {
      c.cache.delete(sid);
      c.lastTouch.delete(sid);
    }
  }
}

/**
 * Sessions stay in SQLite (they survive a restart), but a single server process need not read the same row on
 * every request nor write its expiry each time: reads are served from memory, written through on every change
 * and dropped on sign-out; a rolling expiry is written at most once a minute per session, which keeps the
 * eight-hour idle limit to within a minute.
 */
export function cacheSessionReads(store: SessionStoreLike): void {
  const cache = new Map<string, string>();
  const lastTouch = new Map<string, number>();
  caches.add({ cache, lastTouch });
  const remember = (sid: string, data: unknown) => {
    if (cache.size >= MAX_ENTRIES) cache.clear();
    cache.set(sid, JSON.stringify(data));
  };

  const get = store.get.bind(store);
  const set = store.set.bind(store);
  const destroy = store.destroy.bind(store);
  const touch = store.touch!.bind(store);

  store.get = (sid, callback) => {
    const hit = cache.get(sid);
    if (hit !== undefined) {
      const data = JSON.parse(hit) as { cookie?: { expires?: string } };
      // An expired session is not served from memory: the store decides, as it would without the cache.
      if (!data.cookie?.expires || new Date(data.cookie.expires) > new Date()) return callback(null, data as never);
      cache.delete(sid);
    }
    get(sid, (err, session) => {
      if (!err && session) remember(sid, session);
      callback(err, session);
    });
  };
  store.set = (sid, session, callback) => {
    cache.delete(sid);
    set(sid, session, (err?: unknown) => {
      if (!err) remember(sid, session);
      callback?.(err);
    });
  };
  store.destroy = (sid, callback) => {
    cache.delete(sid);
    lastTouch.delete(sid);
    destroy(sid, callback);
  };
  store.touch = (sid, session, callback) => {
    if (cache.has(sid)) remember(sid, session);
    const now = Date.now();
    if (now - (lastTouch.get(sid) ?? 0) < TOUCH_EVERY_MS) return callback?.();
    if (lastTouch.size >= MAX_ENTRIES) lastTouch.clear();
    lastTouch.set(sid, now);
    touch(sid, session, callback);
  };
}
