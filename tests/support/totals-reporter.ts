import type { Reporter, TestModule } from 'vitest/node';

/** Prints the plain closing line CI reads: `N passed, N failed` (and skipped, when any). */
export default class TotalsReporter implements Reporter {
  onTestRunEnd(testModules: ReadonlyArray<TestModule>, unhandledErrors: ReadonlyArray<unknown>) {
    let passed = 0;
    let failed = 0;
    let skipped = 0;
    for (const mod of testModules) {
      // A file that failed to load has no tests but is still a failure.
      if (mod.state() === 'failed' && [...mod.children.allTests()].length === 0) failed++;
      for (const t of mod.children.allTests()) {
        const state = t.result().state;
        if (state === 'passed') passed++;
        else if (state === 'failed') failed++;
        else skipped++;
      }
    }
    failed += unhandledErrors.length;
    console.log(`\n${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
  }
}
