import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { DEMO_PASSWORD, makeTestApp, ORIGIN, type TestApp } from '../setup/test-app';

// A TLS terminator in front of Cristae speaks HTTPS to the browser and plain HTTP to the app, adding
// X-Forwarded-Proto and X-Forwarded-For (de-facto headers, named in RFC 7239 §1 [confirmed]). Express believes them
// only as far as its 'trust proxy' setting allows (Express 5 "Behind proxies" guide [from memory]).
const production = (extra: Record<string, string>) =>
  loadConfig({ NODE_ENV: 'production', PORT: '3000', SESSION_SECRET: 'x'.repeat(8) + '-a-production-secret-of-40-chars', ...extra });

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const credentials = { email: 'technologist@demo.test', password: DEMO_PASSWORD };

describe('session cookie behind a TLS proxy', () => {
  it('when TRUST_PROXY=1 and the proxy says https, then sign-in sets a Secure HttpOnly cookie, and GET /api/auth/me with it answers 200', async () => {
    const app = t.withOptions({ config: production({ TRUST_PROXY: '1' }) });
    const login = await request(app).post('/api/auth/login').set('Origin', ORIGIN).set('X-Forwarded-Proto', 'https').send(credentials);
    expect(login.status).toBe(200);
    const cookie = ([] as string[]).concat(login.headers['set-cookie'] ?? []).find((c) => c.startsWith('cristae.sid='));
    // RFC 6265 §4.1.2.5 and §4.1.2.6: Secure and HttpOnly attributes [confirmed].
    expect(cookie).toMatch(/;\s*Secure/i);
    expect(cookie).toMatch(/;\s*HttpOnly/i);

    const me = await request(app).get('/api/auth/me').set('X-Forwarded-Proto', 'https').set('Cookie', cookie!.split(';')[0]!);
    expect(me.status).toBe(200);
    expect(me.body.user).toMatchObject({ email: credentials.email, role: 'technologist' });
    // The cookie identifies the session whichever way the request arrived; only setting it needs HTTPS.
    expect((await request(app).get('/api/auth/me').set('Cookie', cookie!.split(';')[0]!)).status).toBe(200);
  });

  it('when TRUST_PROXY is off (the default), then X-Forwarded-Proto is not believed: the sign-in over plain HTTP is refused with the reason, and no cookie is sent', async () => {
    const app = t.withOptions({ config: production({}) });
    const login = await request(app).post('/api/auth/login').set('Origin', ORIGIN).set('X-Forwarded-Proto', 'https').send(credentials);
    expect(login.status).toBe(403);
    expect(login.body.error.message).toMatch(/^Signing in needs HTTPS.*TRUST_PROXY/);
    expect(login.headers['set-cookie']).toBeUndefined();
  });

  it('when TRUST_PROXY=1, then the per-address sign-in limit counts each client address, not the proxy', async () => {
    const app = t.withOptions({ config: production({ TRUST_PROXY: '1' }), loginAttemptsPerWindow: 3 });
    const attempt = (clientAddress: string, n: number) =>
      request(app)
        .post('/api/auth/login')
        .set('Origin', ORIGIN)
        .set('X-Forwarded-Proto', 'https')
        .set('X-Forwarded-For', clientAddress)
        .send({ email: `nobody-${clientAddress}-${n}@fernhollow.test`, password: 'not the password at all' });
    // Documentation addresses from RFC 5737 [confirmed].
    const first = await Promise.all([1, 2, 3].map((n) => attempt('203.0.113.7', n)));
    expect(first.map((r) => r.status)).not.toContain(429);
    expect((await attempt('203.0.113.7', 4)).status).toBe(429);
    expect((await attempt('203.0.113.8', 1)).status).not.toBe(429);
  });
});
