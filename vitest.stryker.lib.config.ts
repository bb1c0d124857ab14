import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// Mutation testing of server/lib alone (`npm run mutation:lib`, stryker.lib.config.json): the unit tests of
// server/lib and the child-process test of the logged stack, so a mutant of the request-path helpers, the error
// mapping or the log does not wait for every unit test that imports them indirectly.
const root = path.dirname(fileURLToPath(import.meta.url));

export default defineConfig({
  resolve: { alias: { '@': path.resolve(root, 'src') } },
  test: {
    name: 'mutation-lib',
    environment: 'node',
    include: ['tests/unit/server/lib/**/*.test.ts', 'tests/unit/server/ops/source-mapped-stack.test.ts'],
    setupFiles: ['tests/setup/node.ts'],
    testTimeout: 20_000,
  },
});
