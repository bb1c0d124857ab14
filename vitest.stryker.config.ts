import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// The unit tests of the server alone, for mutation testing (`npm run mutation`, stryker.config.json): no browser,
// no API or database tests, so each mutant costs a fraction of a second.
const root = path.dirname(fileURLToPath(import.meta.url));

export default defineConfig({
  resolve: { alias: { '@': path.resolve(root, 'src') } },
  test: {
    name: 'mutation-unit',
    environment: 'node',
    include: ['tests/unit/server/**/*.test.ts', 'tests/unit/schemas/**/*.test.ts'],
    setupFiles: ['tests/setup/node.ts'],
    // Generous: on a loaded shared machine the fast-check properties of rate-window.test.ts took over 20 s in the
    // initial run, which stops Stryker before any mutant is tried.
    testTimeout: 90_000,
    // A loaded machine (several mutation runs at once) can take longer than the default 10 s for a beforeAll that renders PDFs.
    hookTimeout: 60_000,
  },
});
