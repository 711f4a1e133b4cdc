/**
 * `railcheck check` and `railcheck merge` on the command line: the planted
 * regression in the text report, exit statuses (0 all pass, 1 any fails, 2
 * a usage error only), the JUnit file read back by an XML parser from the
 * npm registry (fast-xml-parser), the merge of three shards against one
 * run, and, on the built bundle in child processes, threads against a
 * serial run and a baseline write killed half-way.
 */
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { XMLParser } from 'fast-xml-parser';
import { beforeAll, describe, expect, test } from 'vitest';
import { cli, freshDir, STACK_LINE } from './support.js';
import { dividerStage, movedValues, suiteDir } from '../core/pipeline/check-support.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const bundle = join(root, 'packages/cli/dist/railcheck.mjs');

/** A suite with its baseline made from the originals, then the regression planted (the divider's R1 3 kΩ → 3.3 kΩ). */
async function planted(): Promise<{ dir: string; baseline: string }> {
  const dir = suiteDir();
  const baseline = join(dir, 'baseline.json');
  const made = await cli(['check', dir, '--baseline', baseline, '--update-baseline', '--jobs', '1']);
  // The broken netlist fails its run, so the update reports 1; the baseline is written all the same.
  expect(made.status).toBe(1);
  writeFileSync(join(dir, 'rail/divider.cir'), dividerStage(3300));
  return { dir, baseline };
}

interface JunitCase { '@_name': string; failure?: { '#text': string; '@_message': string }; skipped?: unknown }
interface JunitSuite { '@_name': string; '@_tests': string; '@_failures': string; '@_skipped': string; testcase: JunitCase[] }

/** The JUnit file parsed by fast-xml-parser (an XML parser from the npm registry, not ours). */
function readJunit(file: string): { '@_tests': string; '@_failures': string; testsuite: JunitSuite[] } {
  const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@_', isArray: (name) => name === 'testsuite' || name === 'testcase' });
  return (parser.parse(readFileSync(file, 'utf8')) as { testsuites: { '@_tests': string; '@_failures': string; testsuite: JunitSuite[] } }).testsuites;
}

describe('railcheck check', () => {
  test('catches the planted regression: the per-file lines, both values and the difference, the summary; exit 1', async () => {
    const { dir, baseline } = await planted();
    const run = await cli(['check', dir, '--baseline', baseline, '--jobs', '1']);
    expect(run.status).toBe(1);
    expect(run.err).toBe('');
    const lines = run.out.split('\n');
    expect(lines.filter((l) => /^(pass|FAIL) {2}/.test(l)).map((l) => l.slice(0, 4) + l.replace(/^.*?(rail|spare)\//, ' $1/').replace(/ {2}\(.*$/, ''))).toEqual(['FAIL rail/divider.cir', 'pass rail/zener.cir', 'FAIL spare/broken.cir', 'pass spare/plain.cir']);
    const node = lines.find((l) => l.trim().startsWith('node out: moved'))!;
    const v = movedValues(node, 'V');
    // Voltage divider (Horowitz & Hill, The Art of Electronics, 3rd ed., §1.2.3): 12 V · 1k/4k before, 12 V · 1k/4.3k after.
    // Six printed digits: rounding up to 5e-6 relative; bound 1e-5 relative.
    expect(Math.abs(v.baseline - 3)).toBeLessThanOrEqual(3e-5);
    expect(Math.abs(v.now - 12 / 4.3)).toBeLessThanOrEqual(1e-5 * (12 / 4.3));
    expect(Math.abs(v.difference - (12 / 4.3 - 3))).toBeLessThanOrEqual(1e-5 * (3 - 12 / 4.3));
    expect(lines.at(-1)).toBe('4 netlists, 2 passed, 2 failed');
    expect(run.out).not.toMatch(STACK_LINE);
  });

  test('exit 0 when every netlist passes; the summary line last', async () => {
    const dir = suiteDir();
    const baseline = join(dir, 'b.json');
    expect((await cli(['check', join(dir, 'rail'), '--baseline', baseline, '--update-baseline'])).status).toBe(0);
    const run = await cli(['check', join(dir, 'rail'), '--baseline', baseline, '--jobs', '1']);
    expect(run.status).toBe(0);
    expect(run.out.split('\n').at(-1)).toBe('2 netlists, 2 passed, 0 failed');
  });

  test.each([
    [[], /expected one or more netlist files or folders/],
    [['/nonexistent/railcheck-x.cir'], /no such file or folder/],
    [['.', '--jobs', '0'], /--jobs 0: expected a whole number/],
    [['.', '--jobs', 'two'], /--jobs two/],
    [['.', '--shard', '4/3'], /--shard 4\/3: expected K\/N/],
    [['.', '--shard', '1'], /--shard 1: expected K\/N/],
    [['.', '--update-baseline'], /--update-baseline needs --baseline FILE/],
    [['.', '--baseline', 'b.json', '--update-baseline', '--shard', '1/2'], /cannot be given with --shard/],
    [['.', '--baseline', '/nonexistent/railcheck-b.json'], /no such baseline file/],
    [['.', '--frobnicate'], /unknown option '--frobnicate'/],
  ])('railcheck check %j is a usage error: exit 2 with a message', async (args, message) => {
    const run = await cli(['check', ...args]);
    expect(run.status).toBe(2);
    expect(run.err).toMatch(message);
    expect(run.err).not.toMatch(STACK_LINE);
  });

  test('help: railcheck check --help and railcheck help check; the usage lists check and merge', async () => {
    for (const argv of [['check', '--help'], ['help', 'check']]) {
      const run = await cli(argv);
      expect(run.status).toBe(0);
      expect(run.out).toMatch(/usage: railcheck check PATH\.\.\./);
      expect(run.out).toContain('--update-baseline');
    }
    expect((await cli(['help', 'merge'])).out).toMatch(/usage: railcheck merge SHARD\.json/);
    expect((await cli(['help'])).out).toMatch(/railcheck check PATH[\s\S]*railcheck merge SHARD/);
  });

  test('the JUnit file, read by an XML parser: a suite per netlist, tests and failures per suite as planted', async () => {
    const { dir, baseline } = await planted();
    const junit = join(dir, 'out.xml');
    await cli(['check', dir, '--baseline', baseline, '--junit', junit, '--jobs', '1']);
    const doc = readJunit(junit);
    const suites = Object.fromEntries(doc.testsuite.map((s) => [s['@_name'].replace(/^.*?(rail|spare)\//, '$1/'), s]));
    expect(Object.keys(suites)).toEqual(['rail/divider.cir', 'rail/zener.cir', 'spare/broken.cir', 'spare/plain.cir']);
    // The divider: run + 1 limit + 6 figures (line ×3, load ×3) + 2 nodes = 10 tests; planted failures: every value
    // that depends on R1, i.e. all but node in and line.pct_per_v (= 100/Vin), so 6.
    // The Zener example: run + 4 limits + 16 figures + 2 nodes, none moved. broken: its run only, failed. plain: run + 2 nodes.
    const counts = Object.fromEntries(Object.entries(suites).map(([k, s]) => [k, [Number(s['@_tests']), Number(s['@_failures']), s.testcase.length, s.testcase.filter((c) => c.failure).length]]));
    expect(counts).toEqual({ 'rail/divider.cir': [10, 6, 10, 6], 'rail/zener.cir': [23, 0, 23, 0], 'spare/broken.cir': [1, 1, 1, 1], 'spare/plain.cir': [3, 0, 3, 0] });
    expect([Number(doc['@_tests']), Number(doc['@_failures'])]).toEqual([37, 7]);
    const moved = suites['rail/divider.cir']!.testcase.find((c) => c['@_name'] === 'node out')!.failure!;
    expect(moved['#text']).toMatch(/^moved: now 2\.7907 V, baseline 3 V, difference -209\.302 mV/);
    expect(suites['spare/broken.cir']!.testcase[0]!.failure!['#text']).toMatch(/model 'nomodel' of D1 is not defined/);
  });
});

describe('the examples end to end', () => {
  test('a sine-fed stage is checked on its cycle means, as run --json reports op; the caution once, naming the stage above extra-low voltage', async () => {
    const examples = join(root, 'examples');
    const check = await cli(['check', examples, '--json', '--jobs', '1']);
    const result = JSON.parse(check.out) as { cases: { path: string; passed: boolean; tests: { name: string; status: string }[]; run: { nodes: Record<string, number>; aboveElv: boolean } }[] };
    // Every shipped example passes its limits except the modified copy made to show compare, which fails
    // dropout.v <= 1.9 by design (README, "Comparing a change"): so the status is 1 and that is the one failure.
    expect(check.status).toBe(1);
    const failed = result.cases.filter((c) => !c.passed);
    expect(failed.map((c) => c.path.replace(/^.*\//, ''))).toEqual(['sensor-rail-follower-modified.cir']);
    expect(failed[0]!.tests.filter((t) => t.status !== 'pass').map((t) => t.name)).toEqual(['limit dropout.v <= 1.9']);
    const follower = result.cases.find((c) => c.path.endsWith('railway-transformer-follower.cir'))!;
    const run = JSON.parse((await cli(['run', join(examples, 'railway-transformer-follower.cir'), '--json'])).out) as { op: { basis: string; nodes: Record<string, number> } };
    // Consistency check between two of our own presenters (no outside reference): the same cycle means.
    expect(run.op.basis).toBe('cycle-average');
    expect(follower.run.nodes).toEqual(run.op.nodes);
    const hot = result.cases.filter((c) => c.run.aboveElv).map((c) => c.path.replace(/^.*\//, ''));
    expect(hot.length).toBeGreaterThan(0);
    const cautions = check.err.split('\n').filter((l) => l.startsWith('caution'));
    expect(cautions).toHaveLength(1);
    for (const name of hot) expect(cautions[0]).toContain(name);
    expect(cautions[0]).toMatch(/can kill[\s\S]*local electrical codes/);
  });
});

describe('railcheck merge', () => {
  test('the merge of 3 shards is what one run reports: the text, the JSON and the JUnit file byte for byte, the status', async () => {
    const { dir, baseline } = await planted();
    const out = freshDir('check-merge');
    const whole = await cli(['check', dir, '--baseline', baseline, '--jobs', '1', '--junit', join(out, 'whole.xml')]);
    const wholeJson = await cli(['check', dir, '--baseline', baseline, '--jobs', '1', '--json']);
    const shards: string[] = [];
    for (const k of [1, 2, 3]) {
      const s = await cli(['check', dir, '--baseline', baseline, '--jobs', '1', '--json', '--shard', `${k}/3`]);
      expect(s.err).toMatch(new RegExp(`shard ${k}/3 of 4 netlists`));
      const file = join(out, `shard-${k}.json`);
      writeFileSync(file, s.out);
      shards.push(file);
    }
    const merged = await cli(['merge', shards[1]!, shards[2]!, shards[0]!, '--junit', join(out, 'merged.xml')]);
    const mergedJson = await cli(['merge', ...shards, '--json']);
    expect(merged.out).toBe(whole.out);
    expect(merged.status).toBe(whole.status);
    expect(whole.status).toBe(1);
    expect(mergedJson.out).toBe(wholeJson.out);
    expect(readFileSync(join(out, 'merged.xml'), 'utf8')).toBe(readFileSync(join(out, 'whole.xml'), 'utf8'));
  });

  test('a shard missing or given twice, or a file that is not a shard result, is a usage error (exit 2)', async () => {
    const dir = suiteDir();
    const out = freshDir('check-merge-bad');
    const files = [1, 2].map((k) => join(out, `s${k}.json`));
    for (const [i, f] of files.entries()) writeFileSync(f, (await cli(['check', join(dir, 'rail'), '--json', '--jobs', '1', '--shard', `${i + 1}/2`])).out);
    expect(await cli(['merge', files[0]!])).toMatchObject({ status: 2, err: expect.stringMatching(/shard 2\/2 missing/) as unknown });
    expect(await cli(['merge', files[0]!, files[0]!, files[1]!])).toMatchObject({ status: 2, err: expect.stringMatching(/given twice/) as unknown });
    writeFileSync(join(out, 'x.json'), 'not json');
    expect(await cli(['merge', join(out, 'x.json')])).toMatchObject({ status: 2, err: expect.stringMatching(/not JSON/) as unknown });
    expect((await cli(['merge'])).status).toBe(2);
  });
});

describe('the bundled command in child processes', () => {
  beforeAll(() => {
    execFileSync(process.execPath, [join(root, 'scripts/build.mjs')], { cwd: root, stdio: 'pipe', timeout: 120_000 });
  }, 130_000);

  test('--jobs 1 and --jobs 4 print the same report, in input order', async () => {
    const { dir, baseline } = await planted();
    const run = (jobs: string): { status: number | null; stdout: string; stderr: string } => spawnSync(process.execPath, [bundle, 'check', dir, '--baseline', baseline, '--jobs', jobs], { encoding: 'utf8', timeout: 120_000 });
    const one = run('1');
    const four = run('4');
    expect(one.status).toBe(1);
    expect(four.status).toBe(1);
    expect(four.stderr).toBe('');
    expect(four.stdout).toBe(one.stdout);
    expect(readdirSync(join(root, 'packages/cli/dist'))).toContain('check-worker.js');
  });

  test('a baseline write killed after the temporary file is written (SIGKILL) leaves the old baseline intact', async () => {
    const { dir, baseline } = await planted();
    const before = readFileSync(baseline, 'utf8');
    // The test hook RAILCHECK_TEST_HOLD_BASELINE_WRITE=1 stops the writer between writing the temporary file and renaming it.
    const child = spawn(process.execPath, [bundle, 'check', dir, '--baseline', baseline, '--update-baseline', '--jobs', '1'], { env: { ...process.env, RAILCHECK_TEST_HOLD_BASELINE_WRITE: '1' }, stdio: 'ignore' });
    const exited = new Promise<NodeJS.Signals | null>((resolve) => child.on('exit', (_code, signal) => resolve(signal)));
    const isTemp = (f: string): boolean => /^\.baseline\.json\.\d+\.tmp$/.test(f);
    let temp: string | undefined;
    // Waits for the temporary file to be complete (it ends with the closing brace and newline); no time limit of its own.
    while (temp === undefined) {
      await new Promise((r) => setTimeout(r, 50));
      const found = readdirSync(dir).find(isTemp);
      if (found && readFileSync(join(dir, found), 'utf8').endsWith('}\n')) temp = found;
    }
    child.kill('SIGKILL');
    expect(await exited).toBe('SIGKILL');
    expect(readFileSync(baseline, 'utf8')).toBe(before);
    // The new text was there, complete, and was never renamed over the old: it differs (R1 moved the divider's values).
    expect(readFileSync(join(dir, temp), 'utf8')).not.toBe(before);
    expect(JSON.parse(readFileSync(join(dir, temp), 'utf8'))).toHaveProperty('format', 'railcheck-baseline');
  });
});
