import { mutationConfig } from './vitest.stryker.shared';

// Stryker over a chosen few unit test files (comma-separated paths in STRYKER_TESTS; default: the report-pdf folder).
// Every report-pdf mutant is "static" (the tests render in beforeAll), so each one re-runs every test file that
// imports the mutated code; naming one or two files makes a run end in minutes instead of hours. The score is then a
// lower bound (docs/testing.md, "server/domain/report-pdf, third pass").
export default mutationConfig({
  name: 'mutation-subset',
  include: (process.env.STRYKER_TESTS ?? 'tests/unit/server/report-pdf/*.test.ts').split(','),
  testTimeout: 300_000,
  hookTimeout: 300_000,
});
