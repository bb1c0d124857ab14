import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { vi } from 'vitest';
import { DEMO_PASSWORD, makeTestApp, ORIGIN, type TestApp } from './test-app';

/*
 * Component tests fed by the real server: makeTestApp() (migrations and the demo seed over an in-memory SQLite)
 * listens on a free loopback port inside the test process, and the page's fetch calls ('/api/...', as the browser
 * sends them) are routed to it with the session cookie of a signed-in demo user and the app's own Origin. No
 * response body is written by hand.
 */

process.env.CRISTAE_QUIET = '1';

export type RealApp = {
  t: TestApp;
  /** Signs in as a demo account over HTTP and makes fetch carry its session from now on. */
  signInAs: (email: string) => Promise<void>;
  /** A request as the signed-in user, for the test itself (to read what the API says, or check a state after). */
  call: (path: string, init?: RequestInit) => Promise<Response>;
  /** JSON of a GET that must succeed. */
  json: <T = unknown>(path: string) => Promise<T>;
  close: () => Promise<void>;
};

export async function startRealApp(): Promise<RealApp> {
  const t = await makeTestApp();
  const server: Server = await new Promise((resolve) => {
    const s = t.app.listen(0, '127.0.0.1', () => resolve(s));
  });
  // Idle keep-alive sockets stay open for the whole file: Node's 5 s default can close one just as fetch reuses it
  // (ECONNRESET) when a test spends a while rendering between two requests.
  server.keepAliveTimeout = 10 * 60_000;
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const realFetch = globalThis.fetch;
  let cookie = '';

  const call = (path: string, init: RequestInit = {}) => {
    const headers = new Headers(init.headers);
    headers.set('Origin', ORIGIN);
    if (cookie) headers.set('Cookie', cookie);
    // The browser's same-origin credentials are the cookie header set above.
    const { credentials: _ignored, ...rest } = init;
    return realFetch(new URL(path, base), { ...rest, headers });
  };
  vi.stubGlobal('fetch', (input: RequestInfo | URL, init?: RequestInit) => call(String(input), init));

  const signInAs = async (email: string) => {
    cookie = '';
    const res = await call('/api/auth/login', {
      method: 'POST',
      headers: { 'Content-Type': 'application/json' },
      body: JSON.stringify({ email, password: DEMO_PASSWORD }),
    });
    if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${await res.text()}`);
    cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  };

  const json = async <T,>(path: string): Promise<T> => {
    const res = await call(path);
    if (!res.ok) throw new Error(`GET ${path} answered ${res.status}: ${await res.text()}`);
    return (await res.json()) as T;
  };

  return {
    t,
    signInAs,
    call,
    json,
    close: async () => {
      vi.unstubAllGlobals();
      server.closeAllConnections();
      await new Promise<void>((resolve, reject) => server.close((e) => (e ? reject(e) : resolve())));
      await t.close();
    },
  };
}
