/**
 * `npm run lint` and `npm run typecheck` inside `npm test`, so the CI totals line counts a lint,
 * formatting or type failure: ESLint (the project's eslint.config.js), Prettier (.prettierrc.json)
 * and the TypeScript compiler (tsconfig.json and the service worker's tsconfig.sw.json).
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { ESLint } from 'eslint';
import * as prettier from 'prettier';
import { expect, it } from 'vitest';

it('ESLint finds no errors', async () => {
  const eslint = new ESLint();
  const results = await eslint.lintFiles(['.']);
  const errors = results.flatMap((r) =>
    r.messages.filter((m) => m.severity === 2).map((m) => `${r.filePath}:${m.line}:${m.column} ${m.message} (${m.ruleId})`),
  );
  expect(errors).toEqual([]);
}, 300_000);

it('every file is formatted as Prettier writes it', async () => {
  const files = execFileSync('git', ['ls-files', '--cached', '--others', '--exclude-standard'], { encoding: 'utf8' })
    .split('\n')
    .filter(Boolean);
  const unformatted: string[] = [];
  for (const file of files) {
    const info = await prettier.getFileInfo(file, { ignorePath: '.prettierignore' });
    if (info.ignored || !info.inferredParser) continue;
    let source: string;
    try {
      source = readFileSync(file, 'utf8');
    } catch {
      continue; // deleted in the working tree
    }
    const options = await prettier.resolveConfig(file);
    if (!(await prettier.check(source, { ...options, filepath: file }))) unformatted.push(file);
  }
  expect(unformatted, 'run `npm run format`').toEqual([]);
}, 300_000);

it('TypeScript finds no type errors (app, server, tests and the service worker)', () => {
  const errors: string[] = [];
  for (const project of ['tsconfig.json', 'tsconfig.sw.json']) {
    try {
      execFileSync(process.execPath, ['node_modules/typescript/bin/tsc', '--noEmit', '-p', project], { encoding: 'utf8', stdio: 'pipe' });
    } catch (e) {
      const { stdout, stderr } = e as { stdout?: string; stderr?: string };
      errors.push(`${project}:\n${stdout ?? ''}${stderr ?? ''}`);
    }
  }
  expect(errors).toEqual([]);
}, 300_000);
