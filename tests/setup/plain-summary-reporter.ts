import type { Reporter, TestModule } from 'vitest/node';

/** Ends the run with one plain line, "N passed, N failed[, N skipped]", that any CI log reader understands. */
export default class PlainSummaryReporter implements Reporter {
  onTestRunEnd(testModules: ReadonlyArray<TestModule>): void {
    let passed = 0;
    let failed = 0;
    let skipped = 0;
    for (const mod of testModules) {
      if (mod.state() === 'failed' && [...mod.children.allTests()].length === 0) failed++;
      for (const test of mod.children.allTests()) {
        const state = test.result().state;
        if (state === 'passed') passed++;
        else if (state === 'failed') failed++;
        else skipped++;
      }
    }
    process.stdout.write(`\n${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}\n`);
  }
}
