import type { Reporter, TestModule, TestSpecification } from 'vitest/node';

/** Totals of one run; a failed module never reads as passed or skipped. */
export interface Totals {
  passed: number;
  failed: number;
  skipped: number;
}

/**
 * Counts the tests of a run. A module that failed — it did not load, or a beforeAll/afterAll hook
 * threw — counts every test of it that did not pass as failed (a test skipped because its setup
 * failed was never run, which is a failure, not a skip); a failed module whose tests all passed
 * (or that has none) counts as one failure. Unhandled errors count one each.
 */
export function countTotals(testModules: ReadonlyArray<TestModule>, unhandledErrors: ReadonlyArray<unknown>): Totals {
  const totals: Totals = { passed: 0, failed: 0, skipped: 0 };
  for (const mod of testModules) {
    const moduleFailed = mod.state() === 'failed';
    let notPassed = 0;
    for (const t of mod.children.allTests()) {
      const state = t.result().state;
      if (state === 'passed') totals.passed++;
      else if (state === 'failed' || moduleFailed) notPassed++;
      else totals.skipped++;
    }
    totals.failed += moduleFailed ? Math.max(notPassed, 1) : notPassed;
  }
  totals.failed += unhandledErrors.length;
  return totals;
}

export const formatTotals = ({ passed, failed, skipped }: Totals) => `${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`;

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
