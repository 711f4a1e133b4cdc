/**
 * The packages as another project gets them: `pnpm pack` each of
 * packages/{devices,core,cli} (after `node scripts/build.mjs` when a source is
 * newer than its declarations), `npm install` the three tarballs in a scratch
 * project under os.tmpdir() (outside the workspace, so nothing resolves to the
 * sources), then:
 * - a consumer .ts type-checks under strict settings a consuming project may
 *   choose (noPropertyAccessFromIndexSignature, exactOptionalPropertyTypes,
 *   noUncheckedIndexedAccess, skipLibCheck false), and a deliberate
 *   index-signature access fails there (the settings are really applied);
 * - compiled with tsc and run with node, it prints a divider's output voltage,
 *   checked by Ohm's law;
 * - the installed `railcheck demo` exits 0;
 * - examples/library/check-rail.mjs runs against the installed packages;
 * - the parts library ships in core and the CLI, and `.include "parts:zeners"`
 *   works from both.
 * Needs the npm registry for ts-pattern and @types/node.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';

const root = fileURLToPath(new URL('../../', import.meta.url));
const PACKAGES = ['devices', 'core', 'cli'] as const;
const tsc = join(root, 'node_modules', 'typescript', 'bin', 'tsc');
const npm = process.platform === 'win32' ? 'npm.cmd' : 'npm';
let scratch = '';

function newestSource(dir: string): number {
  let t = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    t = Math.max(t, e.isDirectory() ? newestSource(p) : statSync(p).mtimeMs);
  }
  return t;
}

function stale(): boolean {
  return PACKAGES.some((p) => {
    const dts = join(root, 'packages', p, 'dist', 'index.d.ts');
    return !existsSync(dts) || statSync(dts).mtimeMs < newestSource(join(root, 'packages', p, 'src'));
  });
}

function run(cmd: string, args: readonly string[], cwd: string): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(cmd, args, { cwd, encoding: 'utf8', timeout: 120_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

const CONSUMER = `import { formatSI, runNetlist, type RunResult } from '@railcheck/core';

const result: RunResult = runNetlist('Bench divider\\nV1 in 0 12\\nR1 in out 3k\\nR2 out 0 1k\\n.op\\n', { file: 'divider.cir' });
if (!result.ok) {
  console.error(result.errors.map((e) => e.message).join('\\n'));
  process.exit(1);
}
const out = result.report.operatingPoints[0]?.nodes['out'];
console.log(JSON.stringify({ out, text: out === undefined ? '' : formatSI(out, 'V') }));
`;

const STRICT = {
  compilerOptions: {
    target: 'ES2022', module: 'NodeNext', moduleResolution: 'NodeNext', lib: ['ES2022'], types: ['node'],
    strict: true, noPropertyAccessFromIndexSignature: true, exactOptionalPropertyTypes: true, noUncheckedIndexedAccess: true,
    noImplicitOverride: true, noUnusedLocals: true, verbatimModuleSyntax: true, skipLibCheck: false, outDir: 'out',
  },
};

describe('the packed packages in a project of their own', () => {
  beforeAll(() => {
    if (stale()) execFileSync(process.execPath, [join(root, 'scripts/build.mjs')], { cwd: root, stdio: 'pipe', timeout: 120_000 });
    scratch = mkdtempSync(join(tmpdir(), 'railcheck-consumer-'));
    const packs = join(scratch, 'packs');
    for (const p of PACKAGES) {
      execFileSync('npx', ['-y', 'pnpm@10.34.9', 'pack', '--pack-destination', packs], { cwd: join(root, 'packages', p), stdio: 'pipe', timeout: 60_000 });
    }
    const project = join(scratch, 'project');
    execFileSync('mkdir', ['-p', join(project, 'src')]);
    writeFileSync(join(project, 'package.json'), JSON.stringify({ name: 'consumer', private: true, type: 'module' }));
    const tarballs = readdirSync(packs).map((f) => join(packs, f));
    execFileSync(npm, ['install', '--no-audit', '--no-fund', '--loglevel=error', ...tarballs, '@types/node@20.19.25'], { cwd: project, stdio: 'pipe', timeout: 120_000 });
  }, 180_000);

  afterAll(() => {
    if (scratch) rmSync(scratch, { recursive: true, force: true });
  });

  const project = (): string => join(scratch, 'project');

  test('each tarball holds dist, README.md and LICENSE, no sources, and real version ranges', () => {
    for (const p of PACKAGES) {
      const dir = join(project(), 'node_modules', '@railcheck', p);
      expect(existsSync(join(dir, 'README.md')), p).toBe(true);
      expect(existsSync(join(dir, 'LICENSE')), p).toBe(true);
      expect(existsSync(join(dir, 'dist', 'index.d.ts')), p).toBe(true);
      expect(existsSync(join(dir, 'src')), p).toBe(false);
      expect(readFileSync(join(dir, 'package.json'), 'utf8')).not.toContain('workspace:');
    }
    expect(existsSync(join(project(), 'node_modules', '@railcheck', 'cli', 'examples', 'sensor-rail-follower.cir'))).toBe(true);
    // The parts library ships in core and in the CLI (docs/parts.md): its README and the four files.
    for (const p of ['core', 'cli']) {
      for (const f of ['README.md', 'zeners.lib', 'rectifiers.lib', 'transistors.lib', 'leds.lib']) {
        expect(existsSync(join(project(), 'node_modules', '@railcheck', p, 'parts', f)), `${p}/parts/${f}`).toBe(true);
      }
    }
  });

  test('the installed railcheck and the installed core both find the parts library by name', () => {
    writeFileSync(join(project(), 'shunt.cir'), 'Weather-station sensor rail: shunt reference\n.include "parts:zeners"\nV1 in 0 12\nR1 in out 1k\nD1 0 out zener_5v6_500mw\n.op\n');
    const cli = run(join(project(), 'node_modules', '.bin', 'railcheck'), ['run', 'shunt.cir'], project());
    expect(cli.stderr).toBe('');
    expect(cli.status).toBe(0);
    writeFileSync(join(project(), 'shunt.mjs'), "import { runNetlistFile } from '@railcheck/core';\nconst r = runNetlistFile('shunt.cir');\nconsole.log(JSON.stringify(r.ok ? r.report.operatingPoints[0].nodes : r.errors));\n");
    const lib = run(process.execPath, ['shunt.mjs'], project());
    expect(lib.stderr).toBe('');
    const nodes = JSON.parse(lib.stdout) as { out?: number };
    // A 5.6 V Zener fed 6.4 mA: within 0.1 V of its nominal voltage (zeners.lib: VZ 5.6 V at 5 mA, ZZT 25 Ω).
    expect(Math.abs((nodes.out ?? 0) - 5.6)).toBeLessThan(0.1);
  });

  test('a consumer type-checks under strict settings, and a deliberate index-signature access is refused', () => {
    writeFileSync(join(project(), 'src', 'consumer.ts'), CONSUMER);
    writeFileSync(join(project(), 'tsconfig.json'), JSON.stringify({ ...STRICT, include: ['src/**/*.ts'] }));
    const good = run(process.execPath, [tsc, '-p', 'tsconfig.json'], project());
    expect(good.stdout + good.stderr).toBe('');
    expect(good.status).toBe(0);

    // The control: `nodes.out` on an index signature is TS4111 under
    // noPropertyAccessFromIndexSignature (TypeScript handbook, tsconfig reference).
    writeFileSync(join(project(), 'bad.ts'), "import { runNetlist } from '@railcheck/core';\nconst r = runNetlist('x\\n');\nif (r.ok) console.log(r.report.operatingPoints[0]?.nodes.out);\n");
    writeFileSync(join(project(), 'tsconfig.bad.json'), JSON.stringify({ ...STRICT, compilerOptions: { ...STRICT.compilerOptions, noEmit: true }, files: ['bad.ts'] }));
    const bad = run(process.execPath, [tsc, '-p', 'tsconfig.bad.json'], project());
    expect(bad.status).not.toBe(0);
    expect(bad.stdout).toContain('TS4111');
  });

  test('the compiled consumer prints the divider voltage Ohm\'s law gives', () => {
    const r = run(process.execPath, [join(project(), 'out', 'consumer.js')], project());
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const { out } = JSON.parse(r.stdout) as { out: number };
    // Ohm's law: 12 V across 3k + 1k is 3 mA, so out = 1k x 3 mA = 3 V.
    // Bound 2 eps |value| (exact in the solver's arithmetic, as test/cli/bundle.test.ts observes).
    expect(Math.abs(out - 3)).toBeLessThanOrEqual(2 * Number.EPSILON * 3);
  });

  test('the installed railcheck demo exits 0', () => {
    const r = run(join(project(), 'node_modules', '.bin', 'railcheck'), ['demo'], project());
    expect(r.stderr).not.toMatch(/cannot|ENOENT/i);
    expect(r.status).toBe(0);
    // The title line of the demo netlist, packages/cli/examples/sensor-rail-follower.cir.
    expect(r.stdout).toContain('Weather-station sensor rail');
  });

  test('examples/library/check-rail.mjs runs against the installed packages', () => {
    copyFileSync(join(root, 'examples', 'library', 'check-rail.mjs'), join(project(), 'check-rail.mjs'));
    writeFileSync(join(project(), 'divider.cir'), 'Bench divider\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.op\n');
    const divider = run(process.execPath, ['check-rail.mjs', 'divider.cir'], project());
    expect(divider.status).toBe(0);
    // Ohm's law as above: out = 12 V x 1k / (3k + 1k) = 3 V.
    const m = /^node out: (\S+) V/m.exec(divider.stdout);
    expect(m).not.toBeNull();
    expect(Math.abs(Number(m![1]) - 3)).toBeLessThanOrEqual(2 * Number.EPSILON * 3);

    const demo = run(process.execPath, ['check-rail.mjs'], project());
    expect(demo.stderr).toBe('');
    expect(demo.status).toBe(0);
    expect(demo.stdout).toMatch(/^figure \S+: -?\d/m);
  });
});
