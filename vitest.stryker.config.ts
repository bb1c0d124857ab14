import { mutationConfig } from './vitest.stryker.shared';

// The unit tests of the server alone, for mutation testing (`npm run mutation`, stryker.config.json): no browser,
// no API or database tests, so each mutant costs a fraction of a second.
export default mutationConfig({
  name: 'mutation-unit',
  include: ['tests/unit/server/**/*.test.ts', 'tests/unit/schemas/**/*.test.ts'],
  // Generous: on a loaded shared machine the fast-check properties of rate-window.test.ts took over 20 s in the
  // initial run, which stops Stryker before any mutant is tried.
  testTimeout: 90_000,
  // A loaded machine (several mutation runs at once) can take longer than the default 10 s for a beforeAll that renders PDFs.
  hookTimeout: 60_000,
});
