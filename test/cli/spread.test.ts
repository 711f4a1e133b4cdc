/**
 * `railcheck spread FILE` on the command line, on a small divider whose
 * two resistors are spread: help and usage errors (exit 2), the yield line
 * and its Wilson interval against the JSON and against Newcombe's published
 * worked examples, the worst unit against the divider relation, seed
 * reproducibility, three shards merged by `railcheck merge` against one
 * run (text and JSON byte for byte), `run FILE --sample RUN --seed S`
 * against the worst unit, `--all-runs`, the histogram's counts, `--corners`
 * with 2^k runs, the mains caution, and `run`'s note on `.spread` lines.
 * Threads against one thread run on the built bundle in child processes.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, test } from 'vitest';
import { cli, freshDir, netlistFile, STACK_LINE } from './support.js';
import { progressLine } from '../../packages/cli/src/commands/spread.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const bundle = join(root, 'packages/cli/dist/railcheck.mjs');

/** A divider, out = 12 V · R2/(R1 + R2), with R1 and R2 spread ±5 % uniform, its line regulation and a limit on its slope. */
function divider(limit = 'line.slope <= 0.26', extra = ''): string {
  return `Spread divider\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.supply in=V1 out=out load=R2\n.figure line\n.spread R1 5%\n.spread R2 5%\n${extra}.limit ${limit}\n.end\n`;
}

/** The parts of the JSON the tests read. */
interface SpreadJson {
  format: string;
  runCount: number;
  seed: number;
  method: string;
  design: { kind: string; name: string; rows: number[][] } | null;
  variables: { name: string; nominal: number }[];
  runs: { run: number; factors: number[]; at: { celsius: number; values: Record<string, number> }[] }[] | null;
  at: {
    celsius: number;
    figures: { name: string; measured: number; summary: { min: number; max: number } | null; worst: { run: number; value: number; sample: { name: string; value: number }[] }[] }[];
    limits: { figure: string; passes: number; fails: number; notEvaluated: number; yield: number; interval: { low: number; high: number }; worst: { run: number; value: number | null } | null }[];
  }[];
}

const json = (text: string): SpreadJson => JSON.parse(text) as SpreadJson;

/** A limit bound between the k-th and (k+1)-th smallest slope of the runs, so that exactly k runs pass `line.slope <= bound`. */
function boundPassing(values: readonly number[], k: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return (sorted[k - 1]! + sorted[k]!) / 2;
}

/** The report's repeat line for `run`, run again with --json: its exit status and values at the first temperature. */
async function repeatLine(report: string, run: number): Promise<{ line: string; status: number; values: Record<string, number> }> {
  const line = report.split('\n').find((l) => l.includes(`--sample ${run} `))!;
  const words = line.trim().replace(/^repeat\s+/, '').split(/\s+/);
  const again = await cli([...words.slice(1), '--json']);
  return { line, status: again.status, values: (JSON.parse(again.out) as { at: { values: Record<string, number> }[] }).at[0]!.values };
}

/** The slopes of every run, from `--json --all-runs`. */
async function slopes(file: string, runs: number): Promise<number[]> {
  const r = await cli(['spread', file, '--runs', String(runs), '--json', '--all-runs', '--jobs', '1']);
  expect(r.status).toBeLessThanOrEqual(1);
  return json(r.out).runs!.map((run) => run.at[0]!.values['line.slope']!);
}

/** The yield row of `limit` in the text report: `limit  passes/runs  yield  low – high  fails  not measured`. */
function yieldRow(text: string, limit: string): { passes: number; runs: number; yieldPct: number; low: number; high: number } {
  const line = text.split('\n').find((l) => l.trimStart().startsWith(limit) && l.includes('/'));
  const m = line && /(\d+)\/(\d+)\s+([\d.]+) %\s+([\d.]+) % – ([\d.]+) %/.exec(line);
  if (!m) throw new Error(`no yield row for ${limit} in:\n${text}`);
  return { passes: Number(m[1]), runs: Number(m[2]), yieldPct: Number(m[3]), low: Number(m[4]), high: Number(m[5]) };
}

describe('railcheck spread: help and usage errors', () => {
  test('spread --help and help spread print the usage with the exit statuses; exit 0', async () => {
    for (const args of [['spread', '--help'], ['help', 'spread']]) {
      const r = await cli(args);
      expect(r.status).toBe(0);
      expect(r.out).toMatch(/^usage: railcheck spread FILE/);
      expect(r.out).toContain('--runs N');
      expect(r.out).toContain('Wilson score interval');
      expect(r.out).toMatch(/exit status: 0 every limit passes in every run/);
    }
    expect((await cli(['help'])).out).toContain('railcheck spread FILE');
  });

  test.each([
    [[], /expected one netlist FILE/],
    [['a.cir', 'b.cir'], /expected one netlist FILE, got 2/],
    [['FILE', '--runs', '0'], /--runs 0: expected a whole number of runs/],
    [['FILE', '--runs', '2.5'], /--runs 2.5/],
    [['FILE', '--seed', 'x'], /--seed x: expected a whole number/],
    [['FILE', '--jobs', '0'], /--jobs 0: expected a whole number of threads/],
    [['FILE', '--shard', '4/3'], /--shard 4\/3: expected K\/N/],
    [['FILE', '--temp', '27,hot'], /--temp 27,hot: 'hot' is not a temperature/],
    [['FILE', '--temp', '-300'], /--temp -300|needs a value/],
    [['FILE', '--percentiles', '1,101'], /'101' is not a percentile/],
    [['FILE', '--model-sampling', 'both'], /--model-sampling both: expected each or lot/],
    [['FILE', '--histograms', 'some'], /--histograms some: expected limits or all/],
    [['FILE', '--corners', '--runs', '5'], /--runs cannot be given with --corners/],
    [['FILE', '--all-runs'], /--all-runs needs --json/],
    [['FILE', '--frobnicate'], /unknown option '--frobnicate'/],
    [['FILE', '--runs', '2000000'], /runs 2000000 is not a whole number from 1 to 1000000/],
  ])('railcheck spread %j is a usage error: exit 2, a message, nothing on standard output', async (args, message) => {
    const file = netlistFile(divider());
    const r = await cli(['spread', ...args.map((a) => (a === 'FILE' ? file : a))]);
    expect(r.status).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toMatch(message);
    expect(r.err).not.toMatch(STACK_LINE);
  });

  test('a netlist that does not read is exit 2 with its place; a netlist without .spread lines is exit 2', async () => {
    const broken = netlistFile('Broken\nV1 in 0 12\nD1 in 0 nomodel\n.spread V1 5%\n.end\n');
    const r = await cli(['spread', broken, '--runs', '3']);
    expect(r.status).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toContain(`${broken}:3:1`);
    const plain = netlistFile('Plain\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.op\n.end\n');
    const p = await cli(['spread', plain, '--runs', '3']);
    expect(p.status).toBe(2);
    expect(p.err).toMatch(/\.spread/);
    expect(p.err).not.toMatch(STACK_LINE);
  });

  test('run: the --sample options without --sample, and --csv with --sample, are usage errors', async () => {
    const file = netlistFile(divider());
    for (const [args, message] of [
      [['--seed', '3'], /--seed goes with --sample RUN/],
      [['--corners'], /--corners goes with --sample RUN/],
      [['--sample', 'x'], /--sample x: expected a run number/],
      [['--sample', '1', '--csv', 'w.csv'], /--csv, --steps and --plot do not go with --sample/],
    ] as const) {
      const r = await cli(['run', file, ...args]);
      expect(r.status).toBe(2);
      expect(r.err).toMatch(message);
    }
  });
});

describe('railcheck spread on a divider', () => {
  test('the yield row, the JSON and the Wilson interval: Newcombe\'s worked examples 81/263, 1/29 (as 28/29 passing) and 0/20 (as 20/20)', async () => {
    // Newcombe, R. G., "Two-sided confidence intervals for the single proportion: comparison of seven
    // methods", Statistics in Medicine 17 (1998) 857–872, Table II, method 3 (Wilson score, no continuity
    // correction): 81/263 → 0.2553–0.3662; 1/29 → 0.0061–0.1718; 0/20 → 0.0000–0.1611 (from memory; each
    // agrees to 4 places with Wilson's formula worked by hand for this test). The score interval of a
    // proportion of passes is one minus that of the fails (Wilson 1927: the interval is symmetric in p and 1 − p).
    const cases = [
      { runs: 263, passes: 81, low: 0.2553, high: 0.3662 },
      { runs: 29, passes: 28, low: 1 - 0.1718, high: 1 - 0.0061 },
      { runs: 20, passes: 20, low: 1 - 0.1611, high: 1 },
    ];
    for (const c of cases) {
      const probe = netlistFile(divider('line.slope <= 1'));
      const values = await slopes(probe, c.runs);
      const bound = c.passes === c.runs ? 1 : boundPassing(values, c.passes);
      const file = netlistFile(divider(`line.slope <= ${bound}`));
      const text = await cli(['spread', file, '--runs', String(c.runs), '--jobs', '1']);
      const j = await cli(['spread', file, '--runs', String(c.runs), '--json', '--jobs', '1']);
      expect(text.status).toBe(c.passes === c.runs ? 0 : 1);
      expect(j.status).toBe(text.status);
      const limit = json(j.out).at[0]!.limits[0]!;
      expect(limit.passes).toBe(c.passes);
      expect(limit.passes + limit.fails + limit.notEvaluated).toBe(c.runs);
      // Observed up to 4.5e-5 (28/29 low end), which is the table's rounding to four decimals; bound 5e-5, half a
      // unit in the table's last place, the most a correct interval can differ from it.
      expect(Math.abs(limit.interval.low - c.low)).toBeLessThanOrEqual(5e-5);
      expect(Math.abs(limit.interval.high - c.high)).toBeLessThanOrEqual(5e-5);
      const row = yieldRow(text.out, `line.slope <= ${bound}`);
      expect(row.passes).toBe(limit.passes);
      expect(row.runs).toBe(c.runs);
      // The text shows percentages with one decimal (more only near 0 % and 100 %): within 0.05 points of the JSON.
      expect(Math.abs(row.yieldPct - 100 * limit.yield)).toBeLessThanOrEqual(0.05);
      expect(Math.abs(row.low - 100 * limit.interval.low)).toBeLessThanOrEqual(0.05);
      expect(Math.abs(row.high - 100 * limit.interval.high)).toBeLessThanOrEqual(0.05);
      expect(text.out).toContain('95 % Wilson interval');
    }
  });

  test('the worst unit: its slope is the divider relation of its printed sample; run --sample --seed repeats it exactly', async () => {
    const file = netlistFile(divider());
    const text = await cli(['spread', file, '--runs', '200', '--seed', '42', '--jobs', '1']);
    const j = json((await cli(['spread', file, '--runs', '200', '--seed', '42', '--json', '--jobs', '1'])).out);
    expect(text.status).toBe(1); // some runs exceed 0.26: R2/(R1 + R2) reaches 1.05/(0.95·3 + 1.05) = 0.269
    const worst = j.at[0]!.figures.find((f) => f.name === 'line.slope')!.worst[0]!;
    const r1 = worst.sample.find((s) => s.name === 'R1')!.value;
    const r2 = worst.sample.find((s) => s.name === 'R2')!.value;
    // Voltage divider (Horowitz & Hill, The Art of Electronics, 3rd ed., §1.2.3): d out / d in = R2/(R1 + R2).
    // Observed 6.2e-16 relative here, at most 1.5e-15 over all 1600 runs of 8 seeds; bound 4e-15 relative.
    expect(Math.abs(worst.value - r2 / (r1 + r2))).toBeLessThanOrEqual(4e-15 * worst.value);
    // Within the spread's ends: the largest slope is 1.05k/(2.85k + 1.05k) (R2 high, R1 low).
    expect(worst.value).toBeLessThanOrEqual(1.05 / 3.9);
    // The text names the run and the command that repeats it.
    const repeat = text.out.split('\n').find((l) => l.includes(`--sample ${worst.run} `))!;
    expect(repeat).toBeDefined();
    const words = repeat.trim().replace(/^repeat\s+/, '').split(/\s+/);
    expect(words.slice(0, 3)).toEqual(['railcheck', 'run', file]);
    expect(words).toContain('--seed');
    const again = await cli(words.slice(1));
    expect(again.status).toBe(1);
    // The same figure value in the same units and digits as the spread's worst-unit line.
    // The limit's worst run is the figure's highest (lower is better, one limit from above), named once on the limit's line.
    expect(j.at[0]!.limits[0]!.worst!.run).toBe(worst.run);
    const printed = /line\.slope <= 0\.26: (\S+ \S+), /.exec(text.out)![1]!;
    expect(again.out).toMatch(new RegExp(`line\\.slope\\s+${printed.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}`));
    const againJson = JSON.parse((await cli([...words.slice(1), '--json'])).out) as { at: { values: Record<string, number> }[]; sample: { name: string; value: number }[] };
    expect(againJson.at[0]!.values['line.slope']).toBe(worst.value);
    expect(againJson.sample).toEqual(worst.sample);
  });

  test('a run that does not run counts against the yield and is listed with its sample; run --sample repeats the failure (exit 2)', async () => {
    // R1 spread 99 % as 3σ: a factor 1 + 0.33·z is ≤ 0 for z ≤ −3.03, about 1.2 in 1000 runs (normal tail,
    // Abramowitz & Stegun, Handbook of Mathematical Functions, table 26.1), so 2000 runs hold a few such runs.
    const file = netlistFile(divider('line.slope <= 1').replace('.spread R1 5%\n.spread R2 5%\n', '.spread R1 99% gauss\n'));
    const j = json((await cli(['spread', file, '--runs', '2000', '--json', '--jobs', '1'])).out);
    const text = await cli(['spread', file, '--runs', '2000', '--jobs', '1']);
    expect(text.status).toBe(1);
    const at = j.at[0]! as SpreadJson['at'][number] & { failed: { run: number; reason: string; sample: { name: string; value: number }[] }[] };
    expect(at.failed.length).toBeGreaterThan(0);
    const limit = at.limits[0]!;
    expect(limit.passes + limit.fails + limit.notEvaluated).toBe(2000);
    expect(limit.notEvaluated).toBeGreaterThanOrEqual(at.failed.length);
    for (const f of at.failed) {
      // Each failed run is a negative resistance: nominal 3 kΩ times a factor ≤ 0.
      expect(f.sample[0]!.value).toBeLessThanOrEqual(0);
      expect(text.out).toContain(`run ${f.run}: did not run: `);
      expect(text.out).toContain(`--sample ${f.run} --seed 1 --temp 27`);
    }
    const again = await cli(['run', file, '--sample', String(at.failed[0]!.run), '--seed', '1']);
    expect(again.status).toBe(2);
    expect(again.out).toContain('did not run: ');
  });

  test('--temp with a temperature below 0 °C: a section per temperature, and the repeat line at -20 °C runs', async () => {
    const file = netlistFile(divider());
    const text = await cli(['spread', file, '--runs', '30', '--temp=-20,27', '--jobs', '1']);
    expect(text.out).toContain('At -20 °C');
    expect(text.out).toContain('At 27 °C');
    const repeat = text.out.split('\n').find((l) => l.includes('--temp=-20'))!;
    const again = await cli(repeat.trim().replace(/^repeat\s+/, '').split(/\s+/).slice(1));
    expect(again.err).not.toMatch(/needs a value/);
    expect(again.out).toContain('Figures at -20 °C');
    expect(again.out).not.toContain('Figures at 27 °C');
  });

  test('--seed: the same seed gives the same report, another seed another one', async () => {
    const file = netlistFile(divider());
    const a = await cli(['spread', file, '--runs', '50', '--seed', '7', '--jobs', '1']);
    const b = await cli(['spread', file, '--runs', '50', '--seed', '7', '--jobs', '1']);
    const c = await cli(['spread', file, '--runs', '50', '--seed', '8', '--jobs', '1']);
    expect(a.out).toBe(b.out);
    expect(a.out).not.toBe(c.out);
    expect(a.out).toContain('Monte Carlo, 50 runs drawn from seed 7');
  });

  test('three --shard K/3 JSONs merged equal one run: text and JSON byte for byte, with and without --all-runs', async () => {
    const file = netlistFile(divider());
    const dir = freshDir('spread-shards');
    const shards: string[] = [];
    for (const k of [1, 2, 3]) {
      const r = await cli(['spread', file, '--runs', '40', '--seed', '5', '--shard', `${k}/3`, '--json', '--jobs', '1']);
      expect(r.status).toBeLessThanOrEqual(1);
      const p = join(dir, `shard-${k}.json`);
      writeFileSync(p, r.out);
      shards.push(p);
    }
    const whole = await cli(['spread', file, '--runs', '40', '--seed', '5', '--jobs', '1']);
    const merged = await cli(['merge', shards[2]!, shards[0]!, shards[1]!]);
    expect(merged.out).toBe(whole.out);
    expect(merged.status).toBe(whole.status);
    for (const extra of [[], ['--all-runs']]) {
      const wholeJson = await cli(['spread', file, '--runs', '40', '--seed', '5', '--json', '--jobs', '1', ...extra]);
      const mergedJson = await cli(['merge', ...shards, '--json', ...extra]);
      expect(mergedJson.out).toBe(wholeJson.out);
    }
    // A shard missing is a usage error.
    const short = await cli(['merge', shards[0]!, shards[1]!]);
    expect(short.status).toBe(2);
    expect(short.out).toBe('');
  });

  test('--all-runs: one entry per run, numbered 0..N-1, each with the factors of both spreads', async () => {
    const file = netlistFile(divider());
    const r = json((await cli(['spread', file, '--runs', '30', '--json', '--all-runs', '--jobs', '1'])).out);
    expect(r.runs!.map((x) => x.run)).toEqual(Array.from({ length: 30 }, (_, i) => i));
    for (const run of r.runs!) {
      expect(run.factors).toHaveLength(2);
      // Uniform ±5 %: every factor within [0.95, 1.05].
      for (const f of run.factors) expect(Math.abs(f - 1)).toBeLessThanOrEqual(0.05);
    }
    const plain = json((await cli(['spread', file, '--runs', '30', '--json', '--jobs', '1'])).out);
    expect(plain.runs).toBeNull();
  });

  test('the histogram of the limited figure: one row per bin, its counts sum to the run count, the limit marked on its bin', async () => {
    const file = netlistFile(divider());
    const r = await cli(['spread', file, '--runs', '120', '--jobs', '1']);
    const lines = r.out.split('\n');
    const start = lines.findIndex((l) => l.startsWith('  line.slope — '));
    const rows = lines.slice(start).filter((l, i, all) => /^ {6}\S.* – /.test(l) && all.slice(0, i).every((p) => p !== ''));
    const counts = rows.map((l) => Number(/\s(\d+)(?: {2}◀ .*)?$/.exec(l)![1]));
    // Sturges' rule (Sturges, J. Am. Stat. Assoc. 21, 1926): ⌈log2 120⌉ + 1 = 8 bins.
    expect(rows).toHaveLength(8);
    expect(counts.reduce((a, b) => a + b, 0)).toBe(120);
    expect(rows.filter((l) => l.includes('◀ limit <= 260 mV/V'))).toHaveLength(1);
    // --histograms all: also the figures without a limit (line.delta), with the same bins; line.pct_per_v, the same
    // in every run (the divider's ratio cancels), has none.
    const all = await cli(['spread', file, '--runs', '120', '--histograms', 'all', '--jobs', '1']);
    const drawn = all.out.split('\n').filter((l) => /^ {6}\S.* – .*\s\d+(?: {2}◀ .*)?$/.test(l));
    expect(drawn).toHaveLength(16);
    expect(all.out).toMatch(/line\.pct_per_v — 120 runs, 8\.333 %\/V in every run/);
  });

  test('the plain progress line reads as the issue asks: runs done, rate, time left', () => {
    // 400 of 1000 runs in 400/38 s: 38 runs/s, 600 runs left take 15.8 s, said as about 16 s.
    expect(progressLine(400, 1000, 400 / 38)).toBe('spread: 400/1000 runs, 38 runs/s, about 16 s left');
    expect(progressLine(0, 1000, 0)).toBe('spread: 0/1000 runs, 0 runs/s, time left not known yet');
  });

  test('--corners: 2^2 = 4 runs for two spreads, 2^3 = 8 for three, the design named, each row at the ends', async () => {
    const two = netlistFile(divider());
    const r = await cli(['spread', two, '--corners', '--json', '--all-runs', '--jobs', '1']);
    const j = json(r.out);
    expect(j.method).toBe('corners');
    expect(j.runCount).toBe(4);
    expect(j.design?.kind).toBe('full');
    // Every factor at an end, 1 − 5 % or 1 + 5 % (observed exact).
    for (const run of j.runs!) for (const f of run.factors) expect([1 - 0.05, 1 + 0.05]).toContain(f);
    const text = await cli(['spread', two, '--corners', '--jobs', '1']);
    expect(text.out).toContain('corners: all 2^2 = 4 combinations');
    const three = netlistFile(divider('line.slope <= 0.26', '.spread V1 1%\n'));
    const t = await cli(['spread', three, '--corners', '--jobs', '1']);
    expect(t.out).toContain('corners: all 2^3 = 8 combinations');
    expect(text.out).toContain(j.design!.name);
  });

  test('a model spread: each part its own value by default, one per model with --model-sampling lot, and the repeat line carries the mode', async () => {
    // A consistency check of the command line (sampling modes and the repeat line), not of a figure.
    const file = netlistFile('Two-Zener stack\nV1 in 0 24\nRS in out 1k\nD2 mid out ZX\nD1 0 mid ZX\nRL out 0 10k\n.model ZX D (IS=1e-14 BV=5.6 IBV=5m RS=3)\n.supply in=V1 out=out load=RL\n.figure line\n.spread ZX.BV 2% gauss\n.spread RS 5%\n.end\n');
    const each = json((await cli(['spread', file, '--runs', '20', '--json', '--jobs', '1'])).out);
    expect(each.variables.map((v) => v.name)).toEqual(['ZX.BV@D2', 'ZX.BV@D1', 'RS']);
    const lotText = await cli(['spread', file, '--runs', '20', '--model-sampling', 'lot', '--jobs', '1']);
    const lot = json((await cli(['spread', file, '--runs', '20', '--model-sampling', 'lot', '--json', '--jobs', '1'])).out);
    expect(lot.variables.map((v) => v.name)).toEqual(['ZX.BV', 'RS']);
    const worst = lot.at[0]!.figures.find((f) => f.name === 'line.slope')!.worst[0]!;
    const again = await repeatLine(lotText.out, worst.run);
    expect(again.line).toContain('--model-sampling lot');
    expect(again.values['line.slope']).toBe(worst.value);
  });

  test('mixed modes: a line that says each, the option lot; the repeat line carries the option, and the repeated run equals the spread\'s record', async () => {
    // A consistency check of the result's modelSampling and the repeat line, not of a figure.
    const file = netlistFile('Two-Zener stack, mixed\nV1 in 0 24\nRS in out 1k\nD2 mid out ZX\nD1 0 mid ZX\nRL out 0 10k\n.model ZX D (IS=1e-14 BV=5.6 IBV=5m RS=3)\n.supply in=V1 out=out load=RL\n.figure line\n.spread ZX.RS 30% each\n.spread ZX.BV 2% gauss\n.spread RS 5%\n.end\n');
    const args = ['spread', file, '--runs', '20', '--model-sampling', 'lot', '--jobs', '1'];
    const j = JSON.parse((await cli([...args, '--json'])).out) as SpreadJson & { modelSampling: string };
    expect(j.modelSampling).toBe('lot');
    expect(j.variables.map((v) => v.name)).toEqual(['ZX.RS@D2', 'ZX.RS@D1', 'ZX.BV', 'RS']);
    const worst = j.at[0]!.figures.find((f) => f.name === 'line.slope')!.worst[0]!;
    const again = await repeatLine((await cli(args)).out, worst.run);
    expect(again.line).toContain('--model-sampling lot');
    expect(again.values['line.slope']).toBe(worst.value);
  });

  test('--corners: the repeat line names --corners and reruns that corner', async () => {
    const file = netlistFile(divider());
    const j = json((await cli(['spread', file, '--corners', '--json', '--jobs', '1'])).out);
    const worst = j.at[0]!.figures.find((f) => f.name === 'line.slope')!.worst[0]!;
    const again = await repeatLine((await cli(['spread', file, '--corners', '--jobs', '1'])).out, worst.run);
    expect(again.line).toMatch(/ --corners /);
    expect(again.status).toBeLessThanOrEqual(1); // 1 when that corner fails the limit
    expect(again.values['line.slope']).toBe(worst.value);
  });

  test('the report names the stage, and the default JSON lists the runs that missed a figure, with their samples', async () => {
    // Divider arithmetic (Thevenin): out = (V1/R1 + 5 V/1 kΩ)/(1/R1 + 1/1 kΩ + 1/10 kΩ), so with V1 falling from 12 V to 0
    // the output falls by 12 V·(1 kΩ ∥ 10 kΩ)/R1 (about 109 mV at R1 = 100 kΩ): with R1 spread ±50 % some runs fall by less than
    // dropout's 100 mV (those with R1 > 109 kΩ) and miss the figure, the others measure it.
    const file = netlistFile('Stage with a second feed\nV1 in 0 12\nR1 in out 100k\nV2 aux 0 5\nR2 aux out 1k\nRL out 0 10k\n.supply in=V1 out=out load=RL\n.figure line\n.figure dropout\n.spread R1 50%\n.limit line.slope <= 0.26\n.end\n');
    const text = await cli(['spread', file, '--runs', '10', '--jobs', '1']);
    expect(text.out).toMatch(/Stage\n─+\n {2}input +V1, 12 V d\.c\.\n {2}output +out against 0: [\d.]+ V at nominal values\n {2}load +RL, 10 kΩ resistor \(nominal\)/);
    const j = JSON.parse((await cli(['spread', file, '--runs', '10', '--json', '--jobs', '1'])).out) as {
      runs: unknown; stage: { input: string; load: unknown };
      at: { incomplete: { run: number; sample: { name: string; value: number }[]; missing: { name: string }[] }[] }[];
    };
    expect(j.runs).toBeNull();
    expect(j.stage.input).toBe('V1');
    expect(j.stage.load).toEqual({ name: 'RL', kind: 'resistor', ohms: 10e3 });
    const incomplete = j.at[0]!.incomplete;
    const fall = (r1: number): number => (12 * (1 / (1 / 1e3 + 1 / 10e3))) / (r1 + 1 / (1 / 1e3 + 1 / 10e3));
    expect(incomplete.length).toBeGreaterThan(0);
    expect(incomplete.length).toBeLessThan(10);
    for (const run of incomplete) {
      expect(run.missing.map((m) => m.name)).toEqual(['dropout']);
      expect(fall(run.sample[0]!.value)).toBeLessThan(0.1); // the hand formula says it cannot fall by 100 mV
      expect(text.out).toContain(`run ${run.run}: not measured: dropout`);
    }
  });

  test('merge refuses shards of check and spread mixed, and --junit on spread shards: exit 2', async () => {
    const file = netlistFile(divider());
    const dir = freshDir('spread-mixed');
    const spreadShard = join(dir, 'spread-1.json');
    writeFileSync(spreadShard, (await cli(['spread', file, '--runs', '10', '--shard', '1/2', '--json', '--jobs', '1'])).out);
    const checkShard = join(dir, 'check-1.json');
    writeFileSync(checkShard, (await cli(['check', file, '--shard', '1/2', '--json', '--jobs', '1'])).out);
    const mixed = await cli(['merge', spreadShard, checkShard]);
    expect(mixed.status).toBe(2);
    expect(mixed.err).toMatch(/different commands \(railcheck-spread, railcheck-check\)/);
    const junit = await cli(['merge', spreadShard, '--junit', join(dir, 'j.xml')]);
    expect(junit.status).toBe(2);
    expect(junit.err).toMatch(/--junit is for the shards of railcheck check/);
  });

  test('--corners with 9 spreads (2^9 = 512 > 256): a fractional design named in the report, balanced and orthogonal columns', async () => {
    const ladder = ['Ladder', 'V1 in 0 12', ...Array.from({ length: 8 }, (_, i) => `R${i + 1} ${i === 0 ? 'in' : `n${i}`} n${i + 1} 100`), 'RL n8 0 1k', '.supply in=V1 out=n8 load=RL', '.figure line',
      ...Array.from({ length: 8 }, (_, i) => `.spread R${i + 1} 5%`), '.spread RL 5%', '.end', ''].join('\n');
    const file = netlistFile(ladder);
    const j = json((await cli(['spread', file, '--corners', '--json', '--all-runs', '--jobs', '1'])).out);
    const text = await cli(['spread', file, '--corners', '--jobs', '1']);
    expect(j.design!.kind).toBe('fractional');
    expect(j.runCount).toBeLessThan(512);
    expect(text.out).toContain(`corners: ${j.design!.name}, ${j.runCount} runs instead of all 2^9 corners`);
    // A two-level fractional factorial design has balanced, pairwise orthogonal columns
    // (Box, Hunter & Hunter, Statistics for Experimenters, 2nd ed., ch. 6; from memory): every column sums to 0
    // and every two columns have a zero dot product. Integer arithmetic: exact.
    const rows = j.design!.rows;
    for (let a = 0; a < 9; a++) {
      expect(rows.reduce((sum, r) => sum + r[a]!, 0)).toBe(0);
      for (let b = a + 1; b < 9; b++) expect(rows.reduce((sum, r) => sum + r[a]! * r[b]!, 0)).toBe(0);
    }
    // Each run's factors are its row's ends, 1 ± 5 % (observed exact: one product and one sum of the same doubles).
    j.runs!.forEach((run, k) => run.factors.forEach((f, i) => expect(f).toBe(1 + 0.05 * rows[k]![i]!)));
  });

  test('a stage above extra-low voltage carries the mains caution at the top', async () => {
    const file = netlistFile('Mains divider\nV1 in 0 325\nR1 in out 3k\nR2 out 0 1k\n.supply in=V1 out=out load=R2\n.figure line\n.spread R1 5%\n.end\n');
    const r = await cli(['spread', file, '--runs', '5', '--jobs', '1']);
    expect(r.status).toBe(0);
    const head = r.out.split('\n').slice(0, 4).join('\n');
    expect(head).toMatch(/caution: .*extra-low voltage/);
    // The repeat of one run carries it too, under its header.
    const again = await cli(['run', file, '--sample', '0']);
    expect(again.out.split('\n').slice(0, 6).join('\n')).toMatch(/caution: .*extra-low voltage/);
    const below = await cli(['run', netlistFile(divider()), '--sample', '0']);
    expect(below.out).not.toContain('caution');
  });

  test('run on a netlist with .spread lines notes that railcheck spread reads them', async () => {
    const file = netlistFile(divider());
    const r = await cli(['run', file]);
    expect(r.out).toContain(`railcheck spread ${file}`);
  });
});

describe('railcheck spread on the built bundle', () => {
  beforeAll(() => {
    execFileSync(process.execPath, [join(root, 'scripts/build.mjs')], { cwd: root, stdio: 'pipe', timeout: 120_000 });
  }, 130_000);

  test('--jobs 1 and --jobs 3 print the same report and JSON (worker threads: spread-worker.js beside the bundle)', () => {
    expect(existsSync(join(root, 'packages/cli/dist/spread-worker.js'))).toBe(true);
    const file = netlistFile(divider());
    const run = (jobs: string, extra: string[] = []): { status: number | null; stdout: string; stderr: string } =>
      spawnSync(process.execPath, [bundle, 'spread', file, '--runs', '60', '--seed', '3', '--jobs', jobs, ...extra], { encoding: 'utf8', timeout: 120_000 });
    const one = run('1');
    const three = run('3');
    expect(one.status).toBe(1);
    expect(three.status).toBe(1);
    expect(three.stdout).toBe(one.stdout);
    expect(run('3', ['--json', '--all-runs']).stdout).toBe(run('1', ['--json', '--all-runs']).stdout);
    expect(three.stderr).not.toMatch(STACK_LINE);
  });
});
