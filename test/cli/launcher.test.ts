/**
 * The command as README, "Set up and run", tells a user to start it: the
 * root `railcheck` script (directly and through a link, as on the PATH)
 * and the pnpm script's launcher (scripts/railcheck.mjs, which pnpm starts
 * at the repository root with the user's folder in INIT_CWD). Each runs
 * in a scratch folder outside the repository and reads and writes the
 * relative paths it is given there. Child processes, so only a few.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, realpathSync, symlinkSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { freshDir, STACK_LINE, writeFiles } from './support.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const launcher = join(root, 'railcheck');

// A divider with a capacitor across its foot: at the operating point the
// capacitor carries no current, so out = 5 V × 4k / (1k + 4k) = 4 V (Ohm's
// law) and the transient stays there.
const STAGE = 'Sensor rail RC filter\nV1 in 0 5\nR1 in out 1k\nC1 out 0 1u\nR2 out 0 4k\n.tran 10u 1m\n';

function run(cmd: string, args: readonly string[], cwd: string, env: NodeJS.ProcessEnv = process.env): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(cmd, args, { cwd, env, encoding: 'utf8', timeout: 60_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The scratch folder (its real path, as the child sees its working folder) with the stage in it. */
function scratch(): string {
  const dir = realpathSync(freshDir('launcher'));
  writeFiles(dir, { 'stage.cir': STAGE });
  return dir;
}

/** Largest distance of the `out` column of a CSV from `want`. */
function outError(csv: string, want: number): number {
  const [header, ...rows] = csv.trim().split('\n');
  const col = header!.split(',').indexOf('out');
  expect(col).toBeGreaterThan(0);
  return Math.max(...rows.map((r) => Math.abs(Number(r.split(',')[col]) - want)));
}

describe('the root railcheck script, from a folder outside the repository', () => {
  beforeAll(() => {
    execFileSync(process.execPath, [join(root, 'scripts/build.mjs')], { cwd: root, stdio: 'pipe', timeout: 120_000 });
  }, 130_000);

  test('run stage.cir --csv out.csv reads the netlist and writes the CSV in that folder', () => {
    const dir = scratch();
    const r = run(launcher, ['run', 'stage.cir', '--csv', 'out.csv'], dir);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('Sensor rail RC filter');
    expect(existsSync(join(root, 'out.csv'))).toBe(false);
    // Observed 2e-15 (the transient's rounding); bound 1e-12.
    expect(outError(readFileSync(join(dir, 'out.csv'), 'utf8'), 4)).toBeLessThan(1e-12);
  });

  test('a netlist that is not there: exit 2 naming the absolute path tried and the reason', () => {
    const dir = scratch();
    const r = run(launcher, ['run', 'missing.cir'], dir);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(join(dir, 'missing.cir'));
    expect(r.stderr).toContain('ENOENT: no such file or directory');
    expect(r.stderr).not.toMatch(STACK_LINE);
  });

  test('a CSV that cannot be written: exit 2 naming the absolute path and the reason', () => {
    const dir = scratch();
    const r = run(launcher, ['run', 'stage.cir', '--csv', 'no-such-folder/out.csv'], dir);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(join(dir, 'no-such-folder/out.csv'));
    expect(r.stderr).toContain('ENOENT: no such file or directory');
    expect(r.stderr).not.toMatch(STACK_LINE);
  });

  test('through a link (as when put on the PATH): --version prints the CLI package version', () => {
    const dir = scratch();
    mkdirSync(join(dir, 'bin'));
    symlinkSync(launcher, join(dir, 'bin', 'railcheck'));
    const pkg = JSON.parse(readFileSync(join(root, 'packages/cli/package.json'), 'utf8')) as { version: string };
    const r = run(join(dir, 'bin', 'railcheck'), ['--version'], dir);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout.trim()).toBe(pkg.version);
  });

  test('no arguments: the help on standard error, exit 2', () => {
    const r = run(launcher, [], scratch());
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/no command given[\s\S]*usage:[\s\S]*railcheck run FILE/);
  });

  test('the pnpm script launcher reads and writes relative to INIT_CWD, not the root it runs in', () => {
    const dir = scratch();
    const r = run(process.execPath, [join(root, 'scripts/railcheck.mjs'), 'run', 'stage.cir', '-c', 'init.csv'], root, { ...process.env, INIT_CWD: dir });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(existsSync(join(root, 'init.csv'))).toBe(false);
    // Observed 2e-15; bound 1e-12 (as above).
    expect(outError(readFileSync(join(dir, 'init.csv'), 'utf8'), 4)).toBeLessThan(1e-12);
  });
});
