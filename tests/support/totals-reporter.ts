import type { Reporter, TestCase, TestModule, TestSpecification, TestSuite } from 'vitest/node';

/** Totals of one run; a failed module never reads as passed or skipped. */
export interface Totals {
  passed: number;
  failed: number;
  skipped: number;
}

/**
 * Counts the tests of a run. A test that did not run because a set-up around it failed — its
 * file did not load, or a beforeAll/afterAll of its file or of a describe around it threw — is a
 * failure, not a skip. A failed module with no such test (e.g. it has no tests, or only its last
 * afterAll threw) counts as one failure. Tests skipped on purpose (`it.skip`, `-t` filters) stay
 * skipped. Unhandled errors count one each.
 */
export function countTotals(testModules: ReadonlyArray<TestModule>, unhandledErrors: ReadonlyArray<unknown>): Totals {
  const totals: Totals = { passed: 0, failed: 0, skipped: 0 };
  for (const mod of testModules) {
    let failedHere = 0;
    for (const t of mod.children.allTests()) {
      const state = t.result().state;
      if (state === 'passed') totals.passed++;
      else if (state === 'failed' || setUpFailed(t)) failedHere++;
      else totals.skipped++;
    }
    totals.failed += mod.state() === 'failed' ? Math.max(failedHere, 1) : failedHere;
  }
  totals.failed += unhandledErrors.length;
  return totals;
}

/** True when the test's module or a describe around it carries an error of its own (load or hook). */
function setUpFailed(test: TestCase): boolean {
  for (let parent: TestSuite | TestModule = test.parent; ; parent = parent.parent) {
    if (parent.errors().length > 0) return true;
    if (parent.type === 'module') return false;
  }
}

export const formatTotals = ({ passed, failed, skipped }: Totals) =>
  `${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`;

/** Where the run's file list is left for the global set-up (same process; module instances may differ). */
const BROWSER_TESTS_KEY = Symbol.for('kerfwise.runIncludesBrowserTests');

/** True when the current run includes a browser test (tests/e2e); read by tests/support/global-setup.ts. */
export function runIncludesBrowserTests(): boolean {
  return (globalThis as Record<symbol, unknown>)[BROWSER_TESTS_KEY] === true;
}

/** Prints the plain closing line CI reads: `N passed, N failed` (and skipped, when any). */
export default class TotalsReporter implements Reporter {
  // Runs before the global set-up, so it can tell it whether Chromium is needed.
  onTestRunStart(specifications: ReadonlyArray<TestSpecification>) {
    (globalThis as Record<symbol, unknown>)[BROWSER_TESTS_KEY] = specifications.some((s) => /[\\/]tests[\\/]e2e[\\/]/.test(s.moduleId));
  }

  onTestRunEnd(testModules: ReadonlyArray<TestModule>, unhandledErrors: ReadonlyArray<unknown>) {
    console.log(`\n${formatTotals(countTotals(testModules, unhandledErrors))}`);
  }
}
