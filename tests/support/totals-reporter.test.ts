/**
 * The totals line CI reads never hides a failure: the reporter runs in a child vitest on three
 * tiny files (tests/fixtures/totals): one whose beforeAll throws (2 tests never run), one that
 * throws while loading, one with a passing and a deliberately skipped test. Expected counts are
 * counted by hand from those files (derived, no outside source); the reporter before this fix
 * printed "1 passed, 1 failed, 3 skipped" for the same run.
 */
import { spawnSync } from 'node:child_process';
import { expect, it } from 'vitest';

it('counts a file whose set-up failed, and a file that did not load, as failed', () => {
  const run = spawnSync(process.execPath, ['node_modules/vitest/vitest.mjs', 'run', '--config', 'tests/fixtures/totals/vitest.config.ts'], {
    encoding: 'utf8',
    env: { ...process.env, NODE_ENV: 'test' },
    timeout: 120_000,
  });
  const lines = run.stdout.trim().split('\n');
  expect(lines.at(-1), run.stdout + run.stderr).toBe('1 passed, 3 failed, 1 skipped');
  expect(run.status).not.toBe(0);
}, 130_000);
