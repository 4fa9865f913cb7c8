import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';

/** Inputs of the client build: if any is newer than dist/index.html, the build is stale. */
const inputs = ['src', 'shared', 'index.html', 'vite.config.ts', 'tailwind.config.ts', 'package-lock.json'];

function newestMtime(p: string): number {
  if (!existsSync(p)) return 0;
  const st = statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  return readdirSync(p).reduce((m, name) => Math.max(m, newestMtime(path.join(p, name))), st.mtimeMs);
}

export function clientBuildIsStale(root = '.'): boolean {
  const built = path.join(root, 'dist', 'index.html');
  if (!existsSync(built)) return true;
  const builtAt = statSync(built).mtimeMs;
  return inputs.some((i) => newestMtime(path.join(root, i)) > builtAt);
}

/** Runs `vite build` through node directly (not npx, which does not pass signals on). */
export function buildClient(root = '.'): void {
  const r = spawnSync(process.execPath, [path.join(root, 'node_modules/vite/bin/vite.js'), 'build', '--logLevel', 'warn'], {
    cwd: root,
    stdio: 'inherit',
    // A production build whoever runs it (vitest sets NODE_ENV=test, which would give React's
    // development build and no service worker registration — decision 42).
    env: { ...process.env, NODE_ENV: 'production' },
  });
  if (r.status !== 0) throw new Error('The client build failed (see above).');
}

export function ensureClientBuilt(root = '.', log: (l: string) => void = () => {}): void {
  if (clientBuildIsStale(root)) {
    log('Building the client …');
    buildClient(root);
  }
}
