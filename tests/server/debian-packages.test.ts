/**
 * The installer of Debian packages with the machine injected: no apt-get runs here. The command
 * text is the one apt-get(8) documents (`update`, `install -y`, `-qq` quiet level 2) with
 * debconf(7)'s DEBIAN_FRONTEND=noninteractive; common practice for unattended installs, no source
 * beyond those manual pages.
 */
import { describe, expect, it } from 'vitest';
import {
  aptGetCommand,
  ensureDebianPackages,
  MissingPackagesError,
  type DebianPackage,
  type PackageHost,
} from '../../server/devenv/debian-packages';

function fakeHost(opts: { present: DebianPackage[]; root: boolean; aptGet?: boolean; exit?: number; installs?: boolean }) {
  const present = new Set(opts.present);
  const ran: string[] = [];
  const logged: string[] = [];
  const host: Partial<PackageHost> = {
    isPresent: (p) => present.has(p),
    isRoot: () => opts.root,
    hasAptGet: () => opts.aptGet ?? true,
    run: (command) => {
      ran.push(command);
      if ((opts.installs ?? true) && command.includes('install'))
        for (const p of ['postgresql', 'chromium'] as const) if (command.includes(p)) present.add(p);
      return opts.exit ?? 0;
    },
    log: (line) => logged.push(line),
  };
  return { host, ran, logged };
}

const thrown = (fn: () => void): MissingPackagesError => {
  try {
    fn();
  } catch (err) {
    if (err instanceof MissingPackagesError) return err;
    throw err;
  }
  throw new Error('expected a MissingPackagesError');
};

describe('ensureDebianPackages', () => {
  it('does nothing when every package is there', () => {
    const { host, ran, logged } = fakeHost({ present: ['postgresql', 'chromium'], root: true });
    ensureDebianPackages(['postgresql', 'chromium'], { host });
    expect(ran).toEqual([]);
    expect(logged).toEqual([]);
  });

  it('stops a user who is not root with the exact command to run, and runs nothing', () => {
    const { host, ran } = fakeHost({ present: [], root: false });
    const err = thrown(() =>
      ensureDebianPackages(['postgresql'], { host, alternative: 'Or set DATABASE_URL to an existing PostgreSQL server.' }),
    );
    expect(err.packages).toEqual(['postgresql']);
    expect(err.message).toContain('Run as root:');
    expect(err.message).toContain('apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql');
    expect(err.message).toContain('Or set DATABASE_URL');
    expect(ran).toEqual([]);
  });

  it('names only the missing packages, each once', () => {
    const { host } = fakeHost({ present: ['postgresql'], root: false });
    const err = thrown(() => ensureDebianPackages(['postgresql', 'chromium', 'chromium'], { host }));
    expect(err.packages).toEqual(['chromium']);
    expect(err.message).toContain('apt-get install -y -qq chromium\n');
    expect(err.message).not.toMatch(/install -y -qq .*postgresql/);
  });

  it('says what to do on a machine without apt-get', () => {
    const { host, ran } = fakeHost({ present: [], root: true, aptGet: false });
    const err = thrown(() => ensureDebianPackages(['chromium'], { host }));
    expect(err.message).toMatch(/no apt-get/);
    expect(err.message).toContain('chromium');
    expect(ran).toEqual([]);
  });

  it('installs as root: update, then install, with a line before each step', () => {
    const { host, ran, logged } = fakeHost({ present: [], root: true });
    ensureDebianPackages(['postgresql', 'chromium'], { host });
    expect(ran).toEqual(['apt-get update -qq', 'DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql chromium']);
    expect(logged[0]).toMatch(/missing; installing postgresql, chromium/);
    expect(logged.some((l) => /apt-get update/.test(l))).toBe(true);
    expect(logged.some((l) => /apt-get install/.test(l))).toBe(true);
    expect(logged.at(-1)).toMatch(/^Installed postgresql, chromium in \d+ s\.$/);
  });

  it('stops with the command when apt-get fails, and when the package still cannot be found', () => {
    const failing = fakeHost({ present: [], root: true, exit: 100 });
    expect(thrown(() => ensureDebianPackages(['chromium'], { host: failing.host })).message).toContain(aptGetCommand(['chromium']));
    expect(failing.ran).toEqual(['apt-get update -qq']);
    const empty = fakeHost({ present: [], root: true, installs: false });
    expect(thrown(() => ensureDebianPackages(['chromium'], { host: empty.host })).message).toMatch(/still cannot be found/);
  });
});
