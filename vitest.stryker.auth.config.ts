import { mutationConfig } from './vitest.stryker.shared';

// Mutation testing of server/auth's database-bound code (`npm run mutation:auth`, stryker.auth.config.json):
// sign-in, passport, ending sessions and the lock-out counter run only behind the HTTP layer and a database, so
// besides the lock-out unit test this runs the focused API tests of signing in (tests/api/auth-*.api.test.ts:
// cheap password hashes, one migrated in-memory database per file). supertest drives the app in the same process,
// so per-test coverage sees the code each test reaches. Note stryker.auth.config.json's ignorePatterns start with
// "/": a bare "reports" also drops server/modules/reports from the sandbox, the app cannot be imported there, and
// the API tests are then silently skipped (every mutant they reach shows as "no coverage"). The heavier API files
// (auth, account-security, trust-proxy, request-path) can be added here; each adds its run time to every mutant.
export default mutationConfig({
  name: 'mutation-auth',
  include: [
    'tests/unit/server/auth/lockout.test.ts',
    'tests/api/auth-*.api.test.ts',
  ],
  testTimeout: 30_000,
  hookTimeout: 60_000,
});
