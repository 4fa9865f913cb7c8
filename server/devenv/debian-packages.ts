/**
 * The Debian packages a bare machine needs for `npm start` and `npm test`: PostgreSQL's server
 * binaries and, for the browser tests, Chromium. When one is missing and we run as root it is
 * installed from Debian's packages (as `.ci/run` always did); otherwise we stop with the exact
 * apt-get command to run (DEVELOPERS.md, decision 3 and 25). One module for start, test set-up
 * and CI; the checks are injectable so the "missing, not root" path is tested without apt-get.
 */
import { spawnSync } from 'node:child_process';
import { accessSync, constants, existsSync, readdirSync } from 'node:fs';
import path from 'node:path';

export type DebianPackage = 'postgresql' | 'chromium';

/** What each package gives us, how we know it is there, and about how long it takes to install. */
const packages: Record<DebianPackage, { what: string; present: () => boolean; takes: string }> = {
  postgresql: {
    what: "PostgreSQL's server binaries (initdb, pg_ctl, postgres)",
    present: () => {
      if (process.env.PG_BIN) return existsSync(path.join(process.env.PG_BIN, 'initdb'));
      const root = '/usr/lib/postgresql';
      return existsSync(root) && readdirSync(root).some((v) => existsSync(path.join(root, v, 'bin', 'initdb')));
    },
    takes: 'about 30 s',
  },
  chromium: {
    what: 'Chromium for the browser tests',
    present: () => isExecutable(chromiumPath()),
    takes: 'about 50 s',
  },
};

/** The browser the tests drive: CHROMIUM_PATH, else Debian's. */
export function chromiumPath(): string {
  return process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
}

function isExecutable(file: string): boolean {
  try {
    accessSync(file, constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

/** The one command a person runs (as root) to install `pkgs`; the same one we run. */
export function aptGetCommand(pkgs: readonly string[]): string {
  return `apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq ${pkgs.join(' ')}`;
}

/** Raised when a package is missing and cannot be installed here; the message names the command. */
export class MissingPackagesError extends Error {
  constructor(
    message: string,
    readonly packages: readonly DebianPackage[],
  ) {
    super(message);
    this.name = 'MissingPackagesError';
  }
}

/** The machine, as the installer sees it (injected in tests). */
export interface PackageHost {
  isPresent: (pkg: DebianPackage) => boolean;
  isRoot: () => boolean;
  hasAptGet: () => boolean;
  /** Runs one shell command with its output shown; answers the exit status. */
  run: (command: string) => number;
  log: (line: string) => void;
}

export const realHost: PackageHost = {
  isPresent: (pkg) => packages[pkg].present(),
  isRoot: () => typeof process.getuid === 'function' && process.getuid() === 0,
  hasAptGet: () => isExecutable('/usr/bin/apt-get'),
  run: (command) => spawnSync('sh', ['-c', command], { stdio: ['ignore', 'inherit', 'inherit'] }).status ?? 1,
  log: (line) => console.log(`[kerfwise] ${line}`),
};

/**
 * Makes sure `wanted` are installed: nothing to do when present; installs them as root through
 * apt-get, with a line before each step saying why we wait; else throws MissingPackagesError
 * whose message is the command to run. `alternative` is appended to that message (e.g. "or set
 * DATABASE_URL …").
 */
export function ensureDebianPackages(
  wanted: readonly DebianPackage[],
  opts: { host?: Partial<PackageHost>; alternative?: string } = {},
): void {
  const host: PackageHost = { ...realHost, ...opts.host };
  const missing = wanted.filter((pkg, i) => wanted.indexOf(pkg) === i && !host.isPresent(pkg));
  if (missing.length === 0) return;

  const what = missing.map((p) => packages[p].what).join(' and ');
  const command = aptGetCommand(missing);
  const tail = opts.alternative ? ` ${opts.alternative}` : '';
  if (!host.hasAptGet()) {
    throw new MissingPackagesError(
      `${what} ${missing.length > 1 ? 'are' : 'is'} missing and this machine has no apt-get. ` +
        `Install the Debian packages ${missing.join(', ')} (or your system's equivalent).${tail}`,
      missing,
    );
  }
  if (!host.isRoot()) {
    throw new MissingPackagesError(
      `${what} ${missing.length > 1 ? 'are' : 'is'} missing. Run as root:\n\n  ${command}\n\nthen try again.${tail}`,
      missing,
    );
  }

  host.log(
    `${what} ${missing.length > 1 ? 'are' : 'is'} missing; installing ${missing.join(', ')} from Debian's packages (${missing.map((p) => `${p}: ${packages[p].takes}`).join(', ')}).`,
  );
  host.log('Updating the package lists (apt-get update) …');
  if (host.run('apt-get update -qq') !== 0) {
    throw new MissingPackagesError(
      `apt-get update failed (see above). Fix the package sources, then run as root:\n\n  ${command}${tail}`,
      missing,
    );
  }
  host.log(`Installing ${missing.join(', ')} (apt-get install) …`);
  const started = Date.now();
  if (host.run(`DEBIAN_FRONTEND=noninteractive apt-get install -y -qq ${missing.join(' ')}`) !== 0) {
    throw new MissingPackagesError(
      `apt-get install ${missing.join(' ')} failed (see above). Fix the cause, then run as root:\n\n  ${command}${tail}`,
      missing,
    );
  }
  const still = missing.filter((p) => !host.isPresent(p));
  if (still.length > 0) {
    const overrides = [
      process.env.PG_BIN && `PG_BIN=${process.env.PG_BIN}`,
      process.env.CHROMIUM_PATH && `CHROMIUM_PATH=${process.env.CHROMIUM_PATH}`,
    ].filter(Boolean);
    throw new MissingPackagesError(
      `apt-get installed ${still.join(', ')} but ${still.map((p) => packages[p].what).join(' and ')} still cannot be found` +
        `${overrides.length ? ` (the environment sets ${overrides.join(', ')}; unset it to use Debian's)` : ''}.`,
      still,
    );
  }
  host.log(`Installed ${missing.join(', ')} in ${Math.round((Date.now() - started) / 1000)} s.`);
}

// `tsx server/devenv/debian-packages.ts postgresql chromium` — what .ci/run calls after `npm ci`.
if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.dirname ?? '', 'debian-packages.ts')) {
  const wanted = process.argv.slice(2) as DebianPackage[];
  const unknown = wanted.filter((p) => !(p in packages));
  if (unknown.length > 0) {
    console.error(`Unknown package ${unknown.join(', ')}; known: ${Object.keys(packages).join(', ')}.`);
    process.exit(2);
  }
  try {
    ensureDebianPackages(wanted);
  } catch (err) {
    console.error(err instanceof Error ? err.message : String(err));
    process.exit(1);
  }
}
