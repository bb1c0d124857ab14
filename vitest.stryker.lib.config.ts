import { mutationConfig } from './vitest.stryker.shared';

// Mutation testing of server/lib and of server/auth's pure files (`npm run mutation:lib`, stryker.lib.config.json;
// `npm run mutation:lib -- --mutate 'server/auth/session-cache.ts'`): the unit tests of server/lib and
// server/auth and the child-process test of the logged stack, so a mutant there does not wait for every unit test
// that imports these files indirectly.
export default mutationConfig({
  name: 'mutation-lib',
  include: [
    'tests/unit/server/lib/**/*.test.ts',
    'tests/unit/server/auth/**/*.test.ts',
    'tests/unit/server/ops/source-mapped-stack.test.ts',
  ],
  testTimeout: 20_000,
});
