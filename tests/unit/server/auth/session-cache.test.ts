import { afterEach, describe, expect, it, vi } from 'vitest';
import {
  cacheSessionReads,
  extendSessions,
  forgetCachedSessions,
  SESSION_CACHE_MAX_ENTRIES,
  SESSION_EXTEND_EVERY_MS,
} from '../../../../server/auth/session-cache';

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

/*
 * Boundaries of the session cache and of the rolling expiry. A session cookie past its expiry is no longer sent
 * and its session is over (RFC 6265 §5.3, §4.1.2.1 [confirmed]); "expires at T" is taken as over at T, as for
 * the lock-out pause [common practice]. The idle limit is pushed forward in steps of SESSION_EXTEND_EVERY_MS, the
 * documented product rule (docs/api.md, sessions) [common practice: OWASP Session Management Cheat Sheet, idle
 * timeout].
 */
describe('session cache boundaries', () => {
  const T = new Date('2031-06-01T12:00:00.000Z').getTime();
  afterEach(() => vi.useRealTimers());
  const at = (ms: number) => vi.setSystemTime(new Date(T + ms));

  it('when a cached session expires at T, then it is served at T − 1 ms and read from the store at T', async () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    at(0);
    const { store, calls } = countingStore();
    cacheSessionReads(store as never);
    store.set('edge', { cookie: { expires: new Date(T + 1000).toISOString() }, passport: { user: 1 } });
    at(999);
    expect(await get(store, 'edge')).toMatchObject({ passport: { user: 1 } });
    expect(calls.get).toBe(0);
    at(1000);
    // The row is still in the store; the store's own read finds it expired at T and ends it.
    expect(await get(store, 'edge')).toBeNull();
    expect(calls.get).toBe(1);
    expect(calls.destroy).toBe(1);
  });

  it('when a stored row expires 1 ms from now, then it is served and cached', async () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    at(0);
    const { store, calls, rows } = countingStore();
    cacheSessionReads(store as never);
    rows.set('soon', JSON.stringify({ cookie: { expires: new Date(T + 1).toISOString() }, passport: { user: 4 } }));
    expect(await get(store, 'soon')).toMatchObject({ passport: { user: 4 } });
    expect(await get(store, 'soon')).toMatchObject({ passport: { user: 4 } });
    expect([calls.get, calls.destroy]).toEqual([1, 0]);
  });

  it('when copies may be served for maxAgeMs, then a copy maxAgeMs − 1 ms old is served and one maxAgeMs old is read again', async () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    at(0);
    const { store, calls } = countingStore();
    cacheSessionReads(store as never, { maxAgeMs: 5000 });
    store.set('shared', { cookie: { expires: new Date(T + 3_600_000).toISOString() }, passport: { user: 9 } });
    at(4999);
    await get(store, 'shared');
    expect(calls.get).toBe(0);
    at(5000);
    await get(store, 'shared');
    expect(calls.get).toBe(1);
    // The row read again is cached afresh from its own read time.
    at(9999);
    await get(store, 'shared');
    expect(calls.get).toBe(1);
  });

  it('when a session has no cookie expiry, then its copy is served until the session is written or ended', async () => {
    const { store, calls } = countingStore();
    cacheSessionReads(store as never);
    store.set('bare', { passport: { user: 2 } } as never);
    expect(await get(store, 'bare')).toEqual({ passport: { user: 2 } });
    expect(calls.get).toBe(0);
  });

  it(`when ${SESSION_CACHE_MAX_ENTRIES} sessions are cached, then all stay; the next one empties the cache and the first is read from the store again`, async () => {
    const { store, calls } = countingStore();
    cacheSessionReads(store as never);
    const session = { cookie: { expires: later }, passport: { user: 1 } };
    for (let i = 0; i < SESSION_CACHE_MAX_ENTRIES; i++) store.set(`s${i}`, session);
    await get(store, 's0');
    await get(store, `s${SESSION_CACHE_MAX_ENTRIES - 1}`);
    expect(calls.get).toBe(0);
    store.set('one-more', session);
    await get(store, 'one-more');
    expect(calls.get).toBe(0);
    await get(store, 's0');
    expect(calls.get).toBe(1);
  });

  it('when session data holds null (JSON null), then every copy keeps null, and a row with no cookie is served as it is', async () => {
    // [confirmed] RFC 8259 §3: null is a JSON value of its own, neither an object nor an array; the copy must keep it.
    const { store, calls, rows } = countingStore();
    cacheSessionReads(store as never);
    store.set('nul', { cookie: { expires: later }, returnTo: null, passport: { user: 7 } } as never);
    expect(await get(store, 'nul')).toEqual({ cookie: { expires: later }, returnTo: null, passport: { user: 7 } });
    rows.set('bare-row', JSON.stringify({ cookie: null, note: null }));
    expect(await get(store, 'bare-row')).toEqual({ cookie: null, note: null });
    expect(await get(store, 'bare-row')).toEqual({ cookie: null, note: null });
    expect(calls.get).toBe(1);
  });

  it('when the store fails or finds nothing, then the caller gets that answer and nothing is cached', async () => {
    const { store, calls } = countingStore();
    const failing = { ...store, get: (_sid: string, cb: (err: unknown, s?: unknown) => void) => (calls.get++, cb(new Error('disk'))) };
    cacheSessionReads(failing as never);
    const answer = await new Promise<unknown>((resolve) => failing.get('z', (e: unknown) => resolve((e as Error).message)));
    expect(answer).toBe('disk');
    await new Promise<void>((resolve) => failing.get('z', () => resolve()));
    expect(calls.get).toBe(2);
  });

  it('when a write or an end is not given a callback, then it still happens', async () => {
    const { store, calls, rows } = countingStore();
    cacheSessionReads(store as never);
    store.set('n', { cookie: { expires: later } });
    expect(rows.has('n')).toBe(true);
    expect(() => store.touch('n', {} as never)).not.toThrow();
    store.destroy('n');
    expect(rows.has('n')).toBe(false);
    expect(calls.set).toBe(1);
  });

  it('when a store write fails, then the caller hears of it and the old copy is not served', async () => {
    const { store, calls, rows } = countingStore();
    let fail = false;
    const flaky = { ...store, set: (sid: string, s: unknown, cb?: (err?: unknown) => void) => (fail ? cb?.(new Error('full')) : store.set(sid, s, cb)) };
    cacheSessionReads(flaky as never);
    flaky.set('w', { cookie: { expires: later }, v: 1 } as never);
    fail = true;
    const err = await new Promise<unknown>((resolve) => flaky.set('w', { cookie: { expires: later }, v: 2 } as never, resolve));
    expect((err as Error).message).toBe('full');
    rows.set('w', JSON.stringify({ cookie: { expires: later }, v: 1 }));
    expect(await get(flaky, 'w')).toMatchObject({ v: 1 });
    expect(calls.get).toBe(1);
  });

  it('when an array inside a served copy is changed by the caller, then the cached copy keeps its own', async () => {
    const { store } = countingStore();
    cacheSessionReads(store as never);
    store.set('arr', { cookie: { expires: later }, flash: ['a', { n: 1 }] } as never);
    const first = (await get(store, 'arr')) as { flash: unknown[] };
    first.flash.push('b');
    (first.flash[1] as { n: number }).n = 2;
    expect(await get(store, 'arr')).toEqual({ cookie: { expires: later }, flash: ['a', { n: 1 }] });
  });

  it('when the sessions of an account are ended, then they are dropped from every cache of the process', async () => {
    const one = countingStore();
    const two = countingStore();
    cacheSessionReads(one.store as never);
    cacheSessionReads(two.store as never);
    one.store.set('x1', { cookie: { expires: later } });
    two.store.set('x1', { cookie: { expires: later } });
    two.store.set('x2', { cookie: { expires: later } });
    forgetCachedSessions(['x1']);
    one.rows.delete('x1');
    two.rows.delete('x1');
    expect(await get(one.store, 'x1')).toBeNull();
    expect(await get(two.store, 'x1')).toBeNull();
    expect(await get(two.store, 'x2')).not.toBeNull();
    expect([one.calls.get, two.calls.get]).toEqual([1, 1]);
  });
});

describe('extendSessions: the expiry moves forward once per step', () => {
  afterEach(() => vi.useRealTimers());
  const T = new Date('2031-06-01T12:00:00.000Z').getTime();
  const MAX_AGE = 8 * 3_600_000;
  /** A session whose cookie was last given its full max age `elapsed` ms ago. */
  function request(elapsed: number, extra: Record<string, unknown> = {}) {
    return { session: { cookie: { expires: new Date(T - elapsed + MAX_AGE), originalMaxAge: MAX_AGE, ...extra } } } as never as {
      session: { extendedAt?: number; cookie: unknown };
    };
  }
  const run = (req: unknown, everyMs?: number) => {
    let called = 0;
    (everyMs === undefined ? extendSessions() : extendSessions(everyMs))(req as never, {} as never, () => called++);
    expect(called).toBe(1);
  };

  it('the step is five minutes: 5 min − 1 ms after the last extension nothing changes; at 5 min the session is marked to be saved', () => {
    // [common practice] docs/api.md (Session and accounts): the expiry moves forward at most once every 5 minutes.
    expect(SESSION_EXTEND_EVERY_MS).toBe(5 * 60_000);
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(T);
    const early = request(SESSION_EXTEND_EVERY_MS - 1);
    run(early);
    expect(early.session.extendedAt).toBeUndefined();
    const due = request(SESSION_EXTEND_EVERY_MS);
    run(due);
    expect(due.session.extendedAt).toBe(T);
  });

  it('a custom step is honoured at its edge, and a request without a session or without an expiry passes untouched', () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(T);
    const below = request(999);
    run(below, 1000);
    expect(below.session.extendedAt).toBeUndefined();
    const on = request(1000);
    run(on, 1000);
    expect(on.session.extendedAt).toBe(T);
    run({});
    const noExpiry = { session: { cookie: { expires: undefined, originalMaxAge: MAX_AGE } } } as { session: { extendedAt?: number } };
    run(noExpiry, 0);
    expect(noExpiry.session.extendedAt).toBeUndefined();
    const noMaxAge = { session: { cookie: { expires: new Date(T), originalMaxAge: null } } } as { session: { extendedAt?: number } };
    run(noMaxAge, 0);
    expect(noMaxAge.session.extendedAt).toBeUndefined();
  });
});
