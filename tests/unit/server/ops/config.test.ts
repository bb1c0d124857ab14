import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig, parseTrustProxy } from '../../../../server/config';

const SECRET = 'k'.repeat(32);
const problemsOf = (env: Record<string, string>): string[] => {
  try {
    loadConfig(env);
    return [];
  } catch (err) {
    expect(err).toBeInstanceOf(ConfigError);
    return (err as ConfigError).problems;
  }
};

describe('TRUST_PROXY takes the values Express\'s "trust proxy" setting takes (Express 5 API, app settings [from memory])', () => {
  it.each([
    [undefined, false],
    ['', false],
    ['false', false],
    ['0', false],
    ['true', true],
    ['1', 1],
    ['2', 2],
    ['loopback', 'loopback'],
    ['loopback, 10.0.0.0/8', 'loopback, 10.0.0.0/8'],
    ['192.0.2.10,2001:db8::/32', '192.0.2.10,2001:db8::/32'],
  ])('%j is accepted as %j', (raw, expected) => {
    expect(parseTrustProxy(raw)).toEqual({ value: expected });
  });

  it.each(['proxy.internal', '10.0.0.0/33', '1.2.3'])('%j is refused with a message naming TRUST_PROXY', (raw) => {
    const problems = problemsOf({ NODE_ENV: 'production', SESSION_SECRET: SECRET, TRUST_PROXY: raw });
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^TRUST_PROXY: /);
  });
});

describe('demo data', () => {
  it.each([
    [{ NODE_ENV: 'development' }, true],
    [{ NODE_ENV: 'development', SEED_DEMO: '0' }, false],
    [{ NODE_ENV: 'production', SESSION_SECRET: SECRET }, false],
    [{ NODE_ENV: 'production', SESSION_SECRET: SECRET, SEED_DEMO: '1', DEMO_PASSWORD: 'a private demo password' }, true],
  ])('%j seeds the demo: %s', (env, expected) => {
    expect(loadConfig(env).seedDemo).toBe(expected);
  });

  it('production with SEED_DEMO=1 and the public demo password is refused, naming DEMO_PASSWORD', () => {
    expect(problemsOf({ NODE_ENV: 'production', SESSION_SECRET: SECRET, SEED_DEMO: '1' })).toEqual([
      expect.stringMatching(/^DEMO_PASSWORD: /),
    ]);
  });
});

describe('first administrator from the environment', () => {
  it('both variables give the account, with a default name', () => {
    const config = loadConfig({ NODE_ENV: 'production', SESSION_SECRET: SECRET, BOOTSTRAP_ADMIN_EMAIL: 'it@fernhollow.test', BOOTSTRAP_ADMIN_PASSWORD: 'twelve chars ok' });
    expect(config.bootstrapAdmin).toEqual({ email: 'it@fernhollow.test', password: 'twelve chars ok', name: 'Laboratory administrator' });
  });

  // OWASP ASVS 4.0 V2.1.1: passwords of at least 12 characters [from memory]; the public demo password is never allowed.
  it.each([
    ['eleven char', /Use at least 12 characters/],
    ['cristae-demo', /public demo password/],
  ])('password %j is refused with one message naming BOOTSTRAP_ADMIN_PASSWORD', (password, message) => {
    const problems = problemsOf({ NODE_ENV: 'development', BOOTSTRAP_ADMIN_EMAIL: 'it@fernhollow.test', BOOTSTRAP_ADMIN_PASSWORD: password });
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^BOOTSTRAP_ADMIN_PASSWORD: /);
    expect(problems[0]).toMatch(message);
  });

  it('an e-mail address without a password is refused, naming the missing one', () => {
    expect(problemsOf({ NODE_ENV: 'development', BOOTSTRAP_ADMIN_EMAIL: 'it@fernhollow.test' })).toEqual([
      expect.stringMatching(/^BOOTSTRAP_ADMIN_PASSWORD: set both/),
    ]);
  });
});

describe('session secret', () => {
  it('development runs on the built-in value; production never does', () => {
    expect(loadConfig({ NODE_ENV: 'development' }).sessionSecret).toBe('cristae-local-session-secret-change-me');
    expect(problemsOf({ NODE_ENV: 'production' })).toEqual([expect.stringMatching(/^SESSION_SECRET: required in production/)]);
    expect(loadConfig({ NODE_ENV: 'production', SESSION_SECRET: SECRET }).sessionSecret).toBe(SECRET);
  });
});

describe('DATABASE_POOL_MAX: connections per application process to PostgreSQL', () => {
  it('unset or empty gives 10; a whole number from 2 up is taken as it is', () => {
    expect(loadConfig({}).databasePoolMax).toBe(10);
    expect(loadConfig({ DATABASE_POOL_MAX: '' }).databasePoolMax).toBe(10);
    expect(loadConfig({ DATABASE_POOL_MAX: '2' }).databasePoolMax).toBe(2);
    expect(loadConfig({ DATABASE_POOL_MAX: '40' }).databasePoolMax).toBe(40);
  });

  // With one connection, a write holding it waited for ever for a second to read with: the demo seed on an empty
  // PostgreSQL database never finished (tests/api/startup-lock.api.test.ts shows 2 is enough).
  it.each([
    ['1', /^DATABASE_POOL_MAX: must be at least 2: a write holds one connection/],
    ['0', /^DATABASE_POOL_MAX: must be at least 2/],
    ['abc', /^DATABASE_POOL_MAX: must be a whole number$/],
    ['2.5', /^DATABASE_POOL_MAX: must be a whole number$/],
    ['1001', /^DATABASE_POOL_MAX: must be at most 1000/],
  ])('%j is refused, naming the variable', (raw, message) => {
    const problems = problemsOf({ DATABASE_POOL_MAX: raw });
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(message);
  });
});
