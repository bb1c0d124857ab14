import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// Mutation testing of server/auth's database-bound code (`npm run mutation:auth`, stryker.auth.config.json):
// sign-in, passport, ending sessions and the lock-out counter run only behind the HTTP layer and a database, so
// besides the lock-out unit test this runs the focused API tests of signing in (tests/api/auth-*.api.test.ts:
// cheap password hashes, one migrated in-memory database per file). Stryker 9.6's vitest runner recorded no
// per-test coverage for code these tests reach through supertest (every such mutant came out "no coverage"), so
// stryker.auth.config.json uses coverageAnalysis "off": every mutant runs this whole small set, stopping at the
// first failure. The heavier API files (auth, account-security, trust-proxy, request-path) can be added here; each
// adds its run time to every mutant.
const root = path.dirname(fileURLToPath(import.meta.url));

export default defineConfig({
  resolve: { alias: { '@': path.resolve(root, 'src') } },
  test: {
    name: 'mutation-auth',
    environment: 'node',
    include: [
      'tests/unit/server/auth/lockout.test.ts',
      'tests/api/auth-*.api.test.ts',
    ],
    setupFiles: ['tests/setup/node.ts'],
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
