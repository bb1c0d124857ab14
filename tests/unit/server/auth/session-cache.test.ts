import { describe, expect, it } from 'vitest';
import { cacheSessionReads } from '../../../../server/auth/session-cache';

/** A store that counts its calls, standing in for the SQLite session table. */
function countingStore() {
  const rows = new Map<string, string>();
  const calls = { get: 0, set: 0, destroy: 0, touch: 0 };
  const store = {
    get: (sid: string, cb: (err: unknown, s?: unknown) => void) => {
      calls.get++;
      const row = rows.get(sid);
      cb(null, row ? JSON.parse(row) : null);
    },
    set: (sid: string, s: unknown, cb?: (err?: unknown) => void) => {
      calls.set++;
      rows.set(sid, JSON.stringify(s));
      cb?.();
    },
    destroy: (sid: string, cb?: (err?: unknown) => void) => {
      calls.destroy++;
      rows.delete(sid);
      cb?.();
    },
    touch: (_sid: string, _s: unknown, cb?: () => void) => {
      calls.touch++;
      cb?.();
    },
  };
  return { store, calls, rows };
}

const later = new Date(Date.now() + 3_600_000).toISOString();
const get = (store: { get: (sid: string, cb: (e: unknown, s?: unknown) => void) => void }, sid: string) =>
  new Promise<unknown>((resolve) => store.get(sid, (_e, s) => resolve(s)));

describe('session read cache', () => {
  it('when a session is read twice, then the database is read once and both answers are equal but separate objects', async () => {
    const { store, calls } = countingStore();
    cacheSessionReads(store as never);
    store.set('a', { cookie: { expires: later }, passport: { user: 1 } });
    const first = await get(store, 'a');
    const second = await get(store, 'a');
    expect(calls.get).toBe(0); // written through on set, so even the first read is served from memory
    expect(second).toEqual(first);
    expect(second).not.toBe(first);
  });

  it('when a session is destroyed (sign-out), then the next read goes to the store and finds nothing', async () => {
    const { store, calls } = countingStore();
    cacheSessionReads(store as never);
    store.set('b', { cookie: { expires: later }, passport: { user: 2 } });
    store.destroy('b');
    expect(await get(store, 'b')).toBeNull();
    expect(calls.get).toBe(1);
  });

  it('when a cached session has expired, then it is not served from memory', async () => {
    const { store, calls, rows } = countingStore();
    cacheSessionReads(store as never);
    store.set('c', { cookie: { expires: new Date(Date.now() - 1000).toISOString() } });
    rows.delete('c');
    expect(await get(store, 'c')).toBeNull();
    expect(calls.get).toBe(1);
  });

  it('when a stored session has expired but the clean-up has not run yet, then it is not served and its row is deleted', async () => {
    const { store, calls, rows } = countingStore();
    cacheSessionReads(store as never);
    rows.set('x', JSON.stringify({ cookie: { expires: new Date(Date.now() - 1000).toISOString() }, passport: { user: 3 } }));
    expect(await get(store, 'x')).toBeNull();
    expect(calls.destroy).toBe(1);
    expect(rows.has('x')).toBe(false);
  });

  it('when express-session touches a session on every request, then nothing is written (extendSessions moves the expiry)', () => {
    const { store, calls } = countingStore();
    cacheSessionReads(store as never);
    let answered = 0;
    for (let i = 0; i < 50; i++) store.touch('d', { cookie: { expires: later } } as never, () => answered++);
    expect(calls.touch).toBe(0);
    expect(answered).toBe(50);
  });

  it('when the caller changes the session it was handed, then the cached copy is not changed', async () => {
    const { store } = countingStore();
    cacheSessionReads(store as never);
    store.set('e', { cookie: { expires: later }, passport: { user: { id: 5, gen: 1 } } } as never);
    const first = (await get(store, 'e')) as { passport: { user?: unknown } };
    delete first.passport.user; // what passport's sign-out does to req.session.passport
    expect(await get(store, 'e')).toEqual({ cookie: { expires: later }, passport: { user: { id: 5, gen: 1 } } });
  });

  it('when the store is shared with other processes and the copy is older than maxAgeMs, then the row is read again and a sign-out elsewhere is seen', async () => {
    const { store, calls, rows } = countingStore();
    cacheSessionReads(store as never, { maxAgeMs: 0 });
    store.set('shared', { cookie: { expires: later }, passport: { user: 9 } });
    // Another process signs the session out: its row is deleted, this process's copy is not told.
    rows.delete('shared');
    expect(await get(store, 'shared')).toBeNull();
    expect(calls.get).toBe(1);
  });
});
