import type { Request, Response } from 'express';
import { describe, expect, it } from 'vitest';
import { requireSameOrigin } from '../../../../server/auth/origin-check';
import { AppError } from '../../../../server/lib/errors';

/*
 * CSRF defence by checking the source origin (OWASP CSRF Prevention Cheat Sheet, "Verifying origin with standard
 * headers") [confirmed]. An origin is scheme, host and port (RFC 6454 §4) [confirmed], so a look-alike host or
 * another port is another origin, and a prefix match is not a match.
 */
const APP = 'http://localhost:3000';
const check = requireSameOrigin([APP, 'https://lab.cristae.example']);

function answer(method: string, headers: Record<string, string>): string {
  let out = 'none';
  const req = { method, get: (name: string) => headers[name.toLowerCase()] } as unknown as Request;
  check(req, {} as Response, (err?: unknown) => {
    out = err === undefined ? 'next' : err instanceof AppError ? `${err.code}: ${err.message}` : 'other';
  });
  return out;
}

describe('requireSameOrigin', () => {
  it('lets GET, HEAD and OPTIONS through whatever their headers say', () => {
    // [confirmed] RFC 9110 §9.2.1: these methods are safe, so they need no CSRF check.
    for (const m of ['GET', 'HEAD', 'OPTIONS']) expect(answer(m, { origin: 'http://evil.example' })).toBe('next');
  });
  it('admits a state-changing request from one of the app\'s own origins, by Origin or else by Referer', () => {
    // [confirmed] OWASP: compare the Origin header, falling back to the Referer.
    expect(answer('POST', { origin: APP })).toBe('next');
    expect(answer('DELETE', { origin: 'https://lab.cristae.example' })).toBe('next');
    expect(answer('PATCH', { referer: `${APP}/cases/7?tab=1` })).toBe('next');
  });
  it('refuses look-alike hosts, other ports, other schemes and prefix matches, naming the origin', () => {
    // [confirmed] RFC 6454 §4/§5: origins compare by scheme, host and port exactly.
    for (const origin of ['http://localhost:30001', 'http://localhost:3001', 'https://localhost:3000', 'http://localhost.evil.example:3000', 'http://127.0.0.1:3000', 'https://lab.cristae.example.evil.example']) {
      expect(answer('POST', { origin })).toBe(`ORIGIN_REFUSED: Requests from ${origin} are not accepted`);
    }
    expect(answer('PUT', { referer: 'http://localhost:30001/cases' })).toBe('ORIGIN_REFUSED: Requests from http://localhost:30001 are not accepted');
  });
  it('refuses a request that names no origin, or only an unreadable one', () => {
    // [confirmed] OWASP: a request whose source cannot be identified is refused.
    expect(answer('POST', {})).toBe('ORIGIN_REFUSED: The request does not say which site it came from');
    expect(answer('POST', { origin: 'not a url' })).toBe('ORIGIN_REFUSED: The request does not say which site it came from');
  });
  it('an unreadable Origin falls back to the Referer', () => {
    // [derived] from the fallback above: an Origin that is not a URL says nothing, so the Referer decides.
    expect(answer('POST', { origin: 'null-ish', referer: `${APP}/x` })).toBe('next');
  });
});

describe('requireSameOrigin: the same origin in other spellings, and look-alikes', () => {
  const spelled = (allowed: string[], headers: Record<string, string>, method = 'POST') => {
    let out = 'none';
    const req = { method, get: (name: string) => headers[name.toLowerCase()] } as unknown as Request;
    requireSameOrigin(allowed)(req, {} as Response, (err?: unknown) => {
      out = err === undefined ? 'next' : (err as AppError).code;
    });
    return out;
  };
  it('an allowed origin written in upper case, with a trailing slash or with the default port is the browser\'s origin', () => {
    // [confirmed] RFC 6454 §4 (host lower-cased) and §6.2 (serialisation without path); WHATWG URL drops the
    // scheme's default port (80 for http, 443 for https).
    expect(spelled(['HTTP://LOCALHOST:3000/'], { origin: 'http://localhost:3000' })).toBe('next');
    expect(spelled(['https://Lab.Cristae.Example:443'], { origin: 'https://lab.cristae.example' })).toBe('next');
    expect(spelled(['http://lab.cristae.example:80/'], { origin: 'http://lab.cristae.example' })).toBe('next');
  });
  it('an Origin header with a trailing slash or in upper case is the same origin; other ports, hosts and schemes are not', () => {
    // [confirmed] RFC 6454 §5: two origins are the same only if scheme, host and port are identical.
    expect(spelled([APP], { origin: 'http://localhost:3000/' })).toBe('next');
    expect(spelled([APP], { origin: 'HTTP://LocalHost:3000' })).toBe('next');
    for (const origin of ['http://localhost:30001', 'http://localhost:300', 'http://localhost', 'http://localhost.evil.test', 'http://localhost.evil.test:3000', 'https://localhost:3000', 'ws://localhost:3000', 'http://evil.test/http://localhost:3000']) {
      expect(spelled([APP], { origin })).toBe('ORIGIN_REFUSED');
    }
  });
  it('an allowed value that is not a URL admits nothing, and the other allowed origins still work', () => {
    expect(spelled(['not a url', APP], { origin: APP })).toBe('next');
    expect(spelled(['not a url'], { origin: 'not a url' })).toBe('ORIGIN_REFUSED');
    expect(spelled([], { origin: APP })).toBe('ORIGIN_REFUSED');
  });
  it('the opaque origin "null" (RFC 6454 §7.3) is refused unless a Referer from the app says where the request came from', () => {
    // [confirmed] RFC 6454 §7.3: privacy-sensitive contexts send "null"; it names no origin.
    expect(spelled([APP], { origin: 'null' })).toBe('ORIGIN_REFUSED');
    expect(spelled([APP], { origin: 'null', referer: 'http://evil.test/x' })).toBe('ORIGIN_REFUSED');
  });
  it('only the safe methods skip the check: PUT, PATCH, DELETE and an unknown method are checked', () => {
    // [confirmed] RFC 9110 §9.2.1: GET, HEAD, OPTIONS (and TRACE) are safe; the others may change state.
    for (const m of ['POST', 'PUT', 'PATCH', 'DELETE', 'PURGE', 'get']) expect(spelled([APP], {}, m)).toBe('ORIGIN_REFUSED');
    for (const m of ['GET', 'HEAD', 'OPTIONS']) expect(spelled([APP], {}, m)).toBe('next');
  });
});
