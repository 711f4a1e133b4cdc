/**
 * Regression runs (`checkNetlists`): a regression planted in a suite is
 * caught with both values and the difference, checked against the
 * voltage-divider relation; a baseline round trip; shares and their merge;
 * serial and threaded runs alike; usage errors before any run.
 */
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { checkNetlists, DEFAULT_TOLERANCES, MAINS_CAUTION, mergeCheckResults, readBaseline, type CheckResult, type NetlistCheck } from '@railcheck/core';
import { freshDir, writeFiles } from '../diagnostics/support.js';
import { bundledCheckWorker, dividerStage, movedValues, suiteDir } from './check-support.js';

async function check(paths: string[], options: Parameters<typeof checkNetlists>[1] = {}): Promise<CheckResult> {
  const outcome = await checkNetlists(paths, { jobs: 1, ...options });
  if (!outcome.ok) throw new Error(outcome.errors.map((e) => e.message).join('\n'));
  return outcome.result;
}

const byPath = (r: CheckResult, end: string): NetlistCheck => {
  const c = r.cases.find((x) => x.path.endsWith(end));
  if (!c) throw new Error(`no case ${end}`);
  return c;
};

/** Keys sorted at every level of a JSON value. */
function keysSorted(v: unknown): boolean {
  if (Array.isArray(v)) return v.every(keysSorted);
  if (typeof v !== 'object' || v === null) return true;
  const keys = Object.keys(v);
  return keys.every((k, i) => i === 0 || keys[i - 1]! < k) && Object.values(v).every(keysSorted);
}

describe('a planted regression', () => {
  let result: CheckResult;
  beforeAll(async () => {
    const dir = suiteDir(3000);
    const baseline = join(dir, 'baseline.json');
    await check([dir], { baseline, updateBaseline: true });
    // The plant: R1 of the divider stage from 3 kΩ to 3.3 kΩ.
    writeFileSync(join(dir, 'rail/divider.cir'), dividerStage(3300));
    result = await check([dir], { baseline });
  });

  test('the folder expands to its *.cir files, recursively, in sorted order', () => {
    expect(result.cases.map((c) => c.path.slice(c.path.length - 'rail/divider.cir'.length).replace(/^.*?(rail|spare)/, '$1'))).toEqual(['rail/divider.cir', 'rail/zener.cir', 'spare/broken.cir', 'spare/plain.cir']);
  });

  test('the moved node voltage fails with both values and the difference (voltage divider: Vout = Vin·R2/(R1+R2))', () => {
    const divider = byPath(result, 'rail/divider.cir');
    expect(divider.passed).toBe(false);
    const node = divider.tests.find((t) => t.name === 'node out')!;
    expect(node.status).toBe('fail');
    const v = movedValues(node.message, 'V');
    // Voltage divider (any circuits text, e.g. Horowitz & Hill, The Art of Electronics, 3rd ed., §1.2.3): 12·1k/4k and 12·1k/4.3k.
    const before = (12 * 1000) / 4000;
    const after = (12 * 1000) / 4300;
    // The message prints 6 significant digits: rounding up to 5e-6 relative; bound 1e-5 relative (twice that).
    expect(Math.abs(v.baseline - before)).toBeLessThanOrEqual(1e-5 * before);
    expect(Math.abs(v.now - after)).toBeLessThanOrEqual(1e-5 * after);
    expect(Math.abs(v.difference - (after - before))).toBeLessThanOrEqual(1e-5 * Math.abs(after - before));
  });

  test('the moved figures fail too: line.slope = R2/(R1+R2), load.rout = R1 (Thevenin resistance with the load removed)', () => {
    const divider = byPath(result, 'rail/divider.cir');
    const slope = movedValues(divider.tests.find((t) => t.name === 'figure line.slope')!.message, 'V/V');
    const rout = movedValues(divider.tests.find((t) => t.name === 'figure load.rout')!.message, 'Ω');
    // Thevenin's theorem (Horowitz & Hill, §1.2.5): the source seen from the output is R1 with the ideal input source shorted.
    // Bounds as above: the message's 6-digit rounding, 1e-5 relative.
    expect(Math.abs(slope.baseline - 0.25)).toBeLessThanOrEqual(1e-5 * 0.25);
    expect(Math.abs(slope.now - 1000 / 4300)).toBeLessThanOrEqual(1e-5 * (1000 / 4300));
    expect(Math.abs(rout.baseline - 3000)).toBeLessThanOrEqual(1e-5 * 3000);
    expect(Math.abs(rout.now - 3300)).toBeLessThanOrEqual(1e-5 * 3300);
    // Every baseline value of the divider depends on R1 except the input node, which the ideal source holds, and
    // line.pct_per_v = 100 · slope / Vout = 100 · (R2/(R1+R2)) / (Vin · R2/(R1+R2)) = 100/Vin (docs/figures.md's definition).
    const values = divider.tests.filter((t) => t.kind === 'figure' || t.kind === 'node');
    expect(values.filter((t) => t.status !== 'fail').map((t) => t.name)).toEqual(['figure line.pct_per_v', 'node in']);
  });

  test('the untouched netlists pass against the baseline; the broken one is a failed case with its message', () => {
    expect(byPath(result, 'rail/zener.cir').passed).toBe(true);
    expect(byPath(result, 'rail/zener.cir').baseline).toBe('compared');
    expect(byPath(result, 'spare/plain.cir').passed).toBe(true);
    const broken = byPath(result, 'spare/broken.cir');
    expect(broken.passed).toBe(false);
    expect(broken.tests).toHaveLength(1);
    expect(broken.tests[0]!.message).toMatch(/broken\.cir:3:1: error: model 'nomodel'/);
    expect(result.summary).toEqual({ netlists: 4, passed: 2, failed: 2 });
  });

  test('the limit still passes: a limit and a baseline value are separate tests', () => {
    const limit = byPath(result, 'rail/divider.cir').tests.find((t) => t.kind === 'limit')!;
    expect(limit).toMatchObject({ name: 'limit line.slope <= 0.3', status: 'pass' });
  });
});

describe('the baseline file', () => {
  test('round trip: update, then check passes; keys sorted at every level, one trailing newline; overrides kept', async () => {
    const dir = suiteDir();
    const baseline = join(dir, 'baseline.json');
    const first = await check([join(dir, 'rail')], { baseline, updateBaseline: true });
    expect(first.baseline).toEqual({ file: baseline, mode: 'updated' });
    const text = readFileSync(baseline, 'utf8');
    expect(text.endsWith('}\n')).toBe(true);
    expect(text.endsWith('\n\n')).toBe(false);
    const data = JSON.parse(text) as { format: string; version: number; netlists: Record<string, { nodes: Record<string, number> }> };
    expect(keysSorted(data)).toBe(true);
    expect(data.format).toBe('railcheck-baseline');
    expect(data.version).toBe(1);
    // Keys are paths relative to the baseline's folder, with forward slashes.
    expect(Object.keys(data.netlists)).toEqual(['rail/divider.cir', 'rail/zener.cir']);
    // Voltage divider: 12 V · 1k / 4k = 3 V. Observed error 0 (exact); bound 4 ulp.
    expect(Math.abs(data.netlists['rail/divider.cir']!.nodes['out']! - 3)).toBeLessThanOrEqual(4 * Number.EPSILON * 3);
    const again = await check([join(dir, 'rail')], { baseline });
    expect(again.summary).toEqual({ netlists: 2, passed: 2, failed: 0 });
    expect(again.cases.flatMap((c) => c.tests).filter((t) => t.kind === 'figure' || t.kind === 'node').every((t) => t.status === 'pass')).toBe(true);

    // A hand-written override of a figure's tolerance survives an update.
    const withOverride = JSON.parse(text) as Record<string, Record<string, Record<string, unknown>>>;
    withOverride['netlists']!['rail/divider.cir']!['tolerances'] = { 'node:out': { rel: 0.1, abs: 0 } };
    writeFileSync(baseline, JSON.stringify(withOverride));
    await check([join(dir, 'rail')], { baseline, updateBaseline: true });
    const read = readBaseline(baseline);
    expect(read.ok && read.baseline.netlists['rail/divider.cir']!.tolerances).toEqual({ 'node:out': { rel: 0.1, abs: 0 } });
    expect(readFileSync(baseline, 'utf8')).toBe(text.replace('"nodes": {\n        "in": 12,\n        "out": 3\n      }\n    },', '"nodes": {\n        "in": 12,\n        "out": 3\n      },\n      "tolerances": {\n        "node:out": {\n          "abs": 0,\n          "rel": 0.1\n        }\n      }\n    },'));
  });

  test('an override wide enough lets the planted move pass; the default band does not (3 V → 2.79 V is 7 %)', async () => {
    const dir = suiteDir();
    const baseline = join(dir, 'baseline.json');
    await check([join(dir, 'rail/divider.cir')], { baseline, updateBaseline: true });
    const data = JSON.parse(readFileSync(baseline, 'utf8')) as { netlists: Record<string, Record<string, unknown>> };
    data.netlists['rail/divider.cir']!['tolerances'] = { 'node:out': { rel: 0.08, abs: 0 } };
    writeFileSync(baseline, JSON.stringify(data));
    writeFileSync(join(dir, 'rail/divider.cir'), dividerStage(3300));
    const r = await check([join(dir, 'rail/divider.cir')], { baseline });
    const tests = r.cases[0]!.tests;
    expect(tests.find((t) => t.name === 'node out')!.status).toBe('pass');
    expect(tests.find((t) => t.name === 'figure line.slope')!.status).toBe('fail');
    expect(DEFAULT_TOLERANCES.V.rel).toBeLessThan(0.07);
  });

  test('a new netlist and a new figure are reported as new; a gone netlist and a gone figure as gone', async () => {
    const dir = suiteDir();
    const baseline = join(dir, 'baseline.json');
    await check([join(dir, 'rail')], { baseline, updateBaseline: true });
    // The divider loses its load figure; zener.cir is not checked; plain.cir is new.
    writeFileSync(join(dir, 'rail/divider.cir'), dividerStage(3000).replace('.figure load\n', ''));
    const r = await check([join(dir, 'rail/divider.cir'), join(dir, 'spare/plain.cir')], { baseline });
    expect(r.gone).toEqual(['rail/zener.cir']);
    const divider = r.cases[0]!;
    const gone = divider.tests.filter((t) => t.message.startsWith('gone'));
    expect(gone.map((t) => t.name)).toEqual(['figure load.delta', 'figure load.pct', 'figure load.rout']);
    expect(gone.every((t) => t.status === 'fail')).toBe(true);
    expect(r.cases[1]!.baseline).toBe('new');
    expect(r.cases[1]!.passed).toBe(true);
  });
});

describe('shares, threads and merge', () => {
  let dir: string;
  let baseline: string;
  let worker: string;
  beforeAll(async () => {
    dir = suiteDir();
    baseline = join(dir, 'baseline.json');
    writeFiles(dir, { 'spare/more/a.cir': 'Plain A\nV1 in 0 5\nR1 in o 1k\nR2 o 0 1k\n.op\n.end\n', 'spare/more/b.cir': 'Plain B\nV1 in 0 9\nR1 in o 2k\nR2 o 0 1k\n.op\n.end\n' });
    await check([dir], { baseline, updateBaseline: true });
    writeFileSync(join(dir, 'rail/divider.cir'), dividerStage(3300));
    worker = await bundledCheckWorker();
  });

  test('shares: place p goes to share (p mod N) + 1; the three shares together hold every netlist once', async () => {
    const shares = await Promise.all([1, 2, 3].map((index) => check([dir], { baseline, shard: { index, count: 3 } })));
    expect(shares.map((s) => s.cases.map((c) => c.index))).toEqual([[0, 3], [1, 4], [2, 5]]);
    expect(shares.every((s) => JSON.stringify(s.netlists) === JSON.stringify(shares[0]!.netlists))).toBe(true);
  });

  test('the merge of 3 shards (any order) is the unsharded result, byte for byte as JSON', async () => {
    const whole = await check([dir], { baseline });
    const shares = await Promise.all([1, 2, 3].map((index) => check([dir], { baseline, shard: { index, count: 3 } })));
    const merged = mergeCheckResults([shares[2], shares[0], shares[1]].map((s) => JSON.parse(JSON.stringify(s)) as unknown));
    expect(merged.ok).toBe(true);
    if (merged.ok) expect(JSON.stringify(merged.result, null, 2)).toBe(JSON.stringify(whole, null, 2));
  });

  test('merge refuses a missing, a repeated and a foreign shard', async () => {
    const shares = await Promise.all([1, 2, 3].map((index) => check([dir], { baseline, shard: { index, count: 3 } })));
    const two = await check([dir], { baseline, shard: { index: 1, count: 2 } });
    const m1 = mergeCheckResults([shares[0], shares[1]]);
    expect(!m1.ok && m1.errors[0]!.message).toMatch(/shard 3\/3 missing/);
    const m2 = mergeCheckResults([shares[0], shares[1], shares[1]]);
    expect(!m2.ok && m2.errors[0]!.message).toMatch(/shard 2\/3 is given twice/);
    const m3 = mergeCheckResults([shares[0], shares[1], two]);
    expect(!m3.ok && m3.errors[0]!.message).toMatch(/not shares of one run/);
    const m4 = mergeCheckResults([{ format: 'something-else' }]);
    expect(!m4.ok && m4.errors[0]!.message).toMatch(/not a railcheck-check/);
  });

  test('--jobs 1 and --jobs 4 give the same result; the threaded run ran on worker threads', async () => {
    const probe = freshDir('check-probe');
    process.env['CHECK_PROBE_DIR'] = probe;
    const order: number[] = [];
    const serial = await check([dir], { baseline, jobs: 1 });
    const threaded = await check([dir], { baseline, jobs: 4, workerScript: worker, onNetlist: (c) => order.push(c.index) });
    delete process.env['CHECK_PROBE_DIR'];
    expect(JSON.stringify(threaded)).toBe(JSON.stringify(serial));
    // Six netlists on four lanes: four threads started (a probe file each), and the outcomes heard in run order.
    expect(readdirSync(probe).filter((f) => f.startsWith('thread-'))).toHaveLength(4);
    expect(order).toEqual([0, 1, 2, 3, 4, 5]);
  });
});

describe('a limit not evaluated', () => {
  test('is a failed test with the reason (its figure was not measured); the netlist fails, the run goes on', async () => {
    const dir = freshDir('check-ne');
    // An ideal current source sets the output (Ohm's law: 1 mA into 1 kΩ is 1 V) whatever the input, so the output never
    // falls and there is no dropout to measure (as in test/core/measure/not-measured.test.ts).
    writeFiles(dir, {
      'a.cir': 'output set by a current source\nV1 in 0 12\nI1 in out 1m\nR4 out 0 1k\n.supply in=V1 out=out\n.figure line\n.figure dropout\n.limit line.delta <= 1m\n.limit dropout.vin < 5\n.end\n',
      'b.cir': 'Plain\nV1 in 0 10\nR1 in mid 2k\nR2 mid 0 3k\n.op\n.end\n',
    });
    const r = await check([dir]);
    const [a, b] = r.cases;
    expect(a!.passed).toBe(false);
    expect(a!.tests.map((t) => [t.name, t.status])).toEqual([['run', 'pass'], ['limit line.delta <= 0.001', 'pass'], ['limit dropout.vin < 5', 'fail']]);
    expect(a!.tests[2]!.message).toMatch(/^not evaluated: the figure was not measured: .*a\.cir:5:1\)$/);
    expect(b!.passed).toBe(true);
  });
});

describe('the caution and the usage errors', () => {
  test('stages above extra-low voltage earn the caution once, and only then', async () => {
    const dir = freshDir('check-hot');
    // 200 V d.c. exceeds the 120 V ripple-free d.c. limit of IEC 61140 (from memory).
    writeFiles(dir, { 'hot1.cir': 'Hot divider one\nV1 in 0 200\nR1 in out 3k\nR2 out 0 1k\n.op\n.end\n', 'hot2.cir': 'Hot divider two\nV1 in 0 200\nR1 in out 1k\nR2 out 0 1k\n.op\n.end\n', 'cold.cir': 'Cold divider\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.op\n.end\n' });
    const hot = await check([dir]);
    expect(hot.caution).toBe(MAINS_CAUTION);
    expect(hot.cases.map((c) => c.run.aboveElv)).toEqual([false, true, true]);
    const cold = await check([join(dir, 'cold.cir')]);
    expect(cold.caution).toBeNull();
  });

  test.each([
    [['/nonexistent/railcheck-check'], {}, 'check-path-missing'],
    [['.'], { shard: { index: 4, count: 3 } }, 'check-bad-shard'],
    [['.'], { jobs: 0 }, 'check-bad-jobs'],
    [['.'], { updateBaseline: true }, 'check-update-without-baseline'],
  ] as const)('checkNetlists(%j, %j) is refused with %s before any run', async (paths, options, code) => {
    const outcome = await checkNetlists([...paths], options);
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.errors[0]!.code).toBe(code);
  });

  test.each([
    [null, {}], ['rail', {}], [[1], {}], [[''], {}], [['.'], null], [['.'], { jobs: '2' }], [['.'], { shard: '1/2' }], [['.'], { onNetlist: 1 }], [['.'], { baseline: 7 }],
  ] as const)('checkNetlists(%j, %j) is a bad-argument result, never a throw', async (paths, options) => {
    const outcome = await checkNetlists(paths as unknown as string[], options as unknown as Parameters<typeof checkNetlists>[1]);
    expect(!outcome.ok && outcome.errors[0]!.code).toBe('bad-argument');
  });

  test('a missing or malformed baseline is refused; an empty folder has no netlists', async () => {
    const dir = suiteDir();
    const missing = await checkNetlists([dir], { baseline: join(dir, 'none.json') });
    expect(!missing.ok && missing.errors[0]!.code).toBe('baseline-missing');
    writeFileSync(join(dir, 'bad.json'), '{"format":"railcheck-baseline","version":2,"netlists":{}}');
    const bad = await checkNetlists([dir], { baseline: join(dir, 'bad.json') });
    expect(!bad.ok && bad.errors[0]!.message).toMatch(/version 2/);
    const empty = join(dir, 'empty');
    mkdirSync(empty);
    const none = await checkNetlists([empty]);
    expect(!none.ok && none.errors[0]!.code).toBe('check-no-netlists');
  });
});
