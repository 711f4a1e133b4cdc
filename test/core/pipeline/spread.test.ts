/**
 * Tolerance runs (docs/spread.md) against outside references: a divider
 * of two resistors with uniform tolerances, whose ratio k = R2/(R1+R2)
 * is the line figure's slope (line.slope = ΔVout/ΔVin, exact for a linear
 * divider), checked against its closed-form worst case and against its
 * mean, standard deviation and the probability of a limit computed by
 * numeric integration in this file (composite Simpson rule; Abramowitz
 * and Stegun, Handbook of Mathematical Functions, 25.4.5); gaussian draws
 * against the normal distribution of @stdlib (Kolmogorov–Smirnov);
 * reproducibility over threads and shards; corners; failed runs; repeating
 * one run; model spreads in both sampling modes.
 */
import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';
import { beforeAll, describe, expect, test } from 'vitest';
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import { mergeSpreadResults, parseNetlist, runNetlist, runSampleNetlist, runSampleNetlistFile, spreadNetlist, spreadNetlistFile, type SpreadResult } from '@railcheck/core';
import { elaborate, sampledCircuit, spreadSetup } from '@railcheck/core/internal';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const divider = (extra: readonly string[]): string =>
  ['divider', 'V1 in 0 10', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', '.figure line from=9 to=11', ...extra, '.end', ''].join('\n');

async function spread(text: string, options: Parameters<typeof spreadNetlist>[1]): Promise<SpreadResult> {
  const o = await spreadNetlist(text, options);
  if (!o.ok) throw new Error(o.errors.map((e) => e.message).join('\n'));
  return o.result;
}

/** Composite Simpson rule over [a, b] with n (even) intervals (Abramowitz and Stegun 25.4.5). */
function simpson(f: (x: number) => number, a: number, b: number, n: number): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 === 1 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}

/** E[g(X, Y)] for X, Y independent uniform on [1 − r, 1 + r] (two nested Simpson rules). */
function expectUniform2(g: (x: number, y: number) => number, r: number): number {
  const lo = 1 - r;
  const hi = 1 + r;
  return simpson((x) => simpson((y) => g(x, y), lo, hi, 200), lo, hi, 200) / (4 * r * r);
}

const slopeOf = (res: SpreadResult, t = 0) => res.at[t]!.figures.find((f) => f.name === 'line.slope')!;

describe('a divider with uniform tolerances', () => {
  const r = 0.05;
  const n = 2000;
  let res: SpreadResult;
  beforeAll(async () => {
    res = await spread(divider(['.limit line.slope <= 0.505', '.spread R1 5%', '.spread R2 5%']), { runs: n, seed: 3, jobs: 1, confidence: 0.999 });
  });

  test('the extremes stay inside the closed-form worst case and come near it', () => {
    // Worst case of k = R2/(R1+R2): R1 high and R2 low, and the other way round (closed form).
    const kMin = (1 - r) / (1 - r + 1 + r);
    const kMax = (1 + r) / (1 + r + 1 - r);
    const s = slopeOf(res).summary!;
    expect(s.count).toBe(n);
    // Inside: the slope of a linear divider is k to rounding (observed at most 8.9e-16 from Y/(X+Y) over these runs); bound 2e-15.
    expect(s.min).toBeGreaterThanOrEqual(kMin - 2e-15);
    expect(s.max).toBeLessThanOrEqual(kMax + 2e-15);
    // Near: k − kMin ≤ ε needs (1+r−X) + (Y−(1−r)) ≲ 4ε (first order, ∂k/∂X = −1/4, ∂k/∂Y = 1/4 at nominal),
    // a corner triangle of probability 2ε²/r²; for ε = 10 % of the half range (0.05 r) that is 0.005, so
    // no run in 2000 gets that near with probability 0.995^2000 ≈ 4e-5. Observed 2.9 % (min) and 2.4 % (max) of the half range.
    const eps = 0.1 * (kMax - kMin) / 2;
    expect(s.min - kMin).toBeLessThan(eps);
    expect(kMax - s.max).toBeLessThan(eps);
  });

  test('mean and standard deviation against numeric integration, within 5 standard errors (CLT)', () => {
    const k = (x: number, y: number): number => y / (x + y);
    const mean = expectUniform2(k, r);
    const variance = expectUniform2((x, y) => (k(x, y) - mean) ** 2, r);
    const sigma = Math.sqrt(variance);
    const s = slopeOf(res).summary!;
    // Standard error of the mean σ/√n; of the sample standard deviation about σ/√(2n) for a normal
    // population, larger than for this flatter one (kurtosis below 3), so 5 of it is a safe bound.
    // Observed (seed 3): mean off by −1.0 SE, std by −1.1 SE. (The integral gives σ = 0.010209; the delta method
    // σ ≈ √(2·r²/3)/4 = 0.010206 agrees to first order.)
    expect(Math.abs(s.mean - mean)).toBeLessThan(5 * sigma / Math.sqrt(n));
    expect(Math.abs(s.std - sigma)).toBeLessThan(5 * sigma / Math.sqrt(2 * n));
  });

  test('the yield of line.slope <= 0.505 against the probability computed by integration, inside the Wilson interval', () => {
    // P(Y/(X+Y) ≤ L) = P(Y ≤ cX), c = L/(1 − L): for each X the uniform Y's probability, integrated over X.
    const L = 0.505;
    const c = L / (1 - L);
    const p = simpson((x) => Math.min(1, Math.max(0, (c * x - (1 - r)) / (2 * r))), 1 - r, 1 + r, 20000) / (2 * r);
    const l = res.at[0]!.limits[0]!;
    expect(l.passes + l.fails + l.notEvaluated).toBe(n);
    expect(l.yield).toBe(l.passes / n);
    // Binomial standard error √(p(1−p)/n); observed 0.29 SE (p = 0.67997, yield 0.683). The 99.9 % Wilson interval holds p.
    expect(Math.abs(l.yield - p)).toBeLessThan(5 * Math.sqrt((p * (1 - p)) / n));
    expect(l.interval.low).toBeLessThan(p);
    expect(l.interval.high).toBeGreaterThan(p);
    // The worst run of the limit is the one with the largest slope, and its sample gives that slope: k = Y/(X+Y).
    const w = l.worst!;
    expect(w.value).toBe(slopeOf(res).summary!.max);
    const [x, y] = w.sample.map((v) => v.factor) as [number, number];
    // Rounding of the solve: observed at most 8.9e-16 over the runs; bound 2e-15.
    expect(Math.abs(y / (x + y) - w.value!)).toBeLessThan(2e-15);
  });
});

describe('gaussian spreads', () => {
  test('the sampled factors are normal with σ = ratio/3: KS statistic and moments (stdlib normal CDF)', async () => {
    const n = 2000;
    const res = await spread(divider(['.spread R1 30% gauss']), { runs: n, seed: 11, jobs: 1, allRuns: true });
    const f = res.runs!.map((run) => run.factors[0]!);
    const sigma = 0.1;
    const sorted = [...f].sort((a, b) => a - b);
    let d = 0;
    for (const [i, x] of sorted.entries()) {
      const cdf = normalCdf(x, 1, sigma);
      d = Math.max(d, Math.abs((i + 1) / n - cdf), Math.abs(cdf - i / n));
    }
    // Kolmogorov–Smirnov: the asymptotic critical value at α = 0.001 is 1.95/√n (Smirnov's table, from memory). Observed D·√n = 0.53 (seed 11).
    expect(d * Math.sqrt(n)).toBeLessThan(1.95);
    const mean = f.reduce((a, b) => a + b, 0) / n;
    const std = Math.sqrt(f.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1));
    // 5 standard errors (σ/√n and σ/√(2n) for a normal sample); observed −0.11 and 0.45 SE.
    expect(Math.abs(mean - 1)).toBeLessThan(5 * sigma / Math.sqrt(n));
    expect(Math.abs(std - sigma)).toBeLessThan(5 * sigma / Math.sqrt(2 * n));
    // The figure follows the factor: k = 1/(1 + R1/R2) for every run (the divider's closed form); observed at most 8.3e-16, bound 2e-15.
    for (const run of res.runs!) expect(Math.abs(run.at[0]!.values['line.slope']! - 1 / (1 + run.factors[0]!))).toBeLessThan(2e-15);
  });
});

describe('reproducible over threads and shards', () => {
  let worker: string;
  beforeAll(async () => {
    worker = join(mkdtempSync(join(tmpdir(), 'railcheck-spread-worker-')), 'spread-worker.mjs');
    await build({
      entryPoints: [fileURLToPath(new URL('./spread-probe-worker.ts', import.meta.url))], outfile: worker, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'warning',
      ignoreAnnotations: true, nodePaths: [join(root, 'node_modules'), join(root, 'packages/core/node_modules')],
    });
  });
  const strip = (r: SpreadResult): string => JSON.stringify({ ...r, runsPerSecond: null });

  test('jobs 1, jobs 3 and three merged shards give the same JSON', async () => {
    const text = divider(['.limit line.slope <= 0.52', '.spread R1 5%', '.spread R2 10% gauss']);
    const base = { runs: 95, seed: 5, workerScript: worker } as const;
    const one = await spread(text, { ...base, jobs: 1 });
    let progress = 0;
    const probe = mkdtempSync(join(tmpdir(), 'railcheck-spread-probe-'));
    process.env['SPREAD_PROBE_DIR'] = probe;
    const three = await spread(text, { ...base, jobs: 3, onProgress: (done) => (progress = done) });
    delete process.env['SPREAD_PROBE_DIR'];
    expect(progress).toBe(95);
    // It ran on worker threads (each left its file), not on the calling thread.
    expect(readdirSync(probe).length).toBeGreaterThanOrEqual(2);
    const shards = await Promise.all([1, 2, 3].map((index) => spread(text, { ...base, jobs: 1, shard: { index, count: 3 } })));
    expect(shards.map((s) => s.runsDone)).toEqual([32, 32, 31]);
    const merged = mergeSpreadResults(shards.reverse().map((s) => JSON.parse(JSON.stringify(s)) as unknown));
    if (!merged.ok) throw new Error(merged.errors.map((e) => e.message).join('\n'));
    expect(strip(three)).toBe(strip(one));
    expect(strip(merged.result)).toBe(strip(one));
    // A shard given twice, or one missing, is refused.
    expect(mergeSpreadResults([shards[0], shards[0], shards[1]]).ok).toBe(false);
    expect(mergeSpreadResults([shards[0], shards[1]]).ok).toBe(false);
  });
});

describe('corners', () => {
  test('a full design of 2^k runs at the closed-form extremes, bracketing every Monte Carlo run', async () => {
    const text = divider(['.spread R1 5%', '.spread R2 10%']);
    const c = await spread(text, { method: 'corners', jobs: 1 });
    expect(c.design?.kind).toBe('full');
    expect(c.runCount).toBe(4);
    const s = slopeOf(c).summary!;
    // k is monotone in each resistor, so its extremes are corners: (1−0.1)/(1.05+0.9) and (1.1)/(0.95+1.1).
    // Rounding of the solve: observed 1.1e-16 and 3.3e-16; bound 1e-15.
    expect(Math.abs(s.min - 0.9 / 1.95)).toBeLessThan(1e-15);
    expect(Math.abs(s.max - 1.1 / 2.05)).toBeLessThan(1e-15);
    const mc = await spread(text, { runs: 500, seed: 2, jobs: 1 });
    const m = slopeOf(mc).summary!;
    expect(m.min).toBeGreaterThanOrEqual(s.min);
    expect(m.max).toBeLessThanOrEqual(s.max);
  });

  test('more spreads than the run allowance: a fractional design with the all-low and all-high rows', async () => {
    const text = ['ladder', 'V1 in 0 10', 'R1 in a 1k', 'R2 a b 1k', 'R3 b out 1k', 'R4 out 0 1k', 'R5 a 0 10k', '.supply in=V1 out=out', '.figure line from=9 to=11',
      ...['R1', 'R2', 'R3', 'R4', 'R5'].map((e) => `.spread ${e} 5%`), '.end', ''].join('\n');
    const c = await spread(text, { method: 'corners', maxCornerRuns: 16, jobs: 1 });
    expect(c.design?.kind).toBe('fractional');
    expect(c.runCount).toBeLessThan(32);
    expect(c.design!.rows.some((row) => row.every((v) => v === -1))).toBe(true);
    expect(c.design!.rows.some((row) => row.every((v) => v === 1))).toBe(true);
  });
});

describe('failed runs', () => {
  test('a run whose value leaves the valid range is counted against the yield and listed with its sample', async () => {
    // 90 % as 3σ: a factor ≤ 0 (z < −3.33, probability 4.3e-4 per run) gives R1 no value; seed 28 has such runs in its 400.
    const res = await spread(divider(['.limit line.slope <= 0.9', '.spread R1 90% gauss']), { runs: 400, seed: 28, jobs: 1 });
    const at = res.at[0]!;
    expect(at.failed.length).toBeGreaterThan(0);
    for (const f of at.failed) {
      expect(f.sample[0]!.factor).toBeLessThanOrEqual(0);
      expect(f.reason).toMatch(/R1: factor/);
    }
    const l = at.limits[0]!;
    expect(l.notEvaluated).toBe(at.failed.length);
    expect(l.passes + l.fails + l.notEvaluated).toBe(400);
    expect(l.yield).toBe(l.passes / 400);
    expect(l.worst?.margin).toBeNull();
    expect(slopeOf(res).measured).toBe(400 - at.failed.length);
  });
});

describe('repeating one run', () => {
  test('runSampleNetlist gives the run the spread recorded, bit for bit', async () => {
    const text = divider(['.spread R1 5%', '.spread R2 5% gauss']);
    const res = await spread(text, { runs: 40, seed: 9, jobs: 1, allRuns: true });
    const worst = slopeOf(res).worst[0]!.run;
    const again = runSampleNetlist(text, { run: worst, seed: 9, runs: 40 });
    if (!again.ok) throw new Error(again.errors.map((e) => e.message).join('\n'));
    expect(again.run).toStrictEqual(res.runs![worst]);
  });

  test('on the weather-station example (diode and transistor model spreads, three temperatures)', async () => {
    const file = join(root, 'examples/sensor-rail-spread.cir');
    const o = await spreadNetlistFile(file, { runs: 6, seed: 4, jobs: 1, allRuns: true });
    if (!o.ok) throw new Error(o.errors.map((e) => e.message).join('\n'));
    expect(o.result.temperatures).toEqual([-20, 27, 60]);
    expect(o.result.at[0]!.failed).toEqual([]);
    const again = runSampleNetlistFile(file, { run: 5, seed: 4, runs: 6 });
    if (!again.ok) throw new Error(again.errors.map((e) => e.message).join('\n'));
    expect(again.run).toStrictEqual(o.result.runs![5]);
  });
});

describe('model spreads: each element its own factor, or one for the lot', () => {
  const twoDiodes = (line: string): string => ['two diodes', 'V1 in 0 5', 'R1 in a 1k', 'D1 a 0 dm', 'D2 a 0 dm', '.model dm D (IS=1e-14)', line, '.op', '.end', ''].join('\n');
  const modelsIn = (text: string, sampling?: 'each' | 'lot'): number[] => {
    const p = parseNetlist(text);
    if (!p.ok) throw new Error(p.errors.map((e) => e.message).join('\n'));
    const e = elaborate(p.netlist);
    if (!e.ok) throw new Error(e.errors.map((d) => d.message).join('\n'));
    const setup = spreadSetup(e.circuit, { runs: 3, seed: 1, modelSampling: sampling });
    const factors = setup.variables.map((_, i) => 1 + 0.01 * (i + 1)); // distinct per variable
    const s = sampledCircuit(e.circuit, setup.variables, factors);
    if (!s.ok) throw new Error(s.reason);
    return s.flat.elements.flatMap((el) => (el.kind === 'diode' ? [el.model.IS] : []));
  };

  test('lot on the line: both diodes get the same factor', () => {
    const [a, b] = modelsIn(twoDiodes('.spread dm.IS 20% gauss lot'));
    expect(a).toBe(b);
    expect(a).toBeCloseTo(1.01e-14, 28);
  });

  test('each (the default, and on the line over a lot option): different factors', () => {
    const [a, b] = modelsIn(twoDiodes('.spread dm.IS 20%'));
    expect(a).not.toBe(b);
    const [c, d] = modelsIn(twoDiodes('.spread dm.IS 20% each'), 'lot');
    expect(c).not.toBe(d);
    const [e, f] = modelsIn(twoDiodes('.spread dm.IS 20%'), 'lot');
    expect(e).toBe(f);
  });

  test('each/lot on an element spread is a located error', () => {
    const p = parseNetlist(divider(['.spread R1 5% lot']));
    expect(p.ok).toBe(false);
    if (!p.ok) expect(p.errors[0]!.message).toMatch(/applies to model spreads only/);
  });
});

describe('arguments and usage errors', () => {
  test('junk arguments and options come back as ok: false with a located or bad-argument error, never a throw', async () => {
    const text = divider(['.spread R1 5%']);
    const cases: [unknown, unknown][] = [
      [undefined, {}], [42, {}], [text, null], [text, { runs: 0 }], [text, { runs: 1.5 }], [text, { seed: -1 }], [text, { method: 'sideways' }],
      [text, { shard: { index: 3, count: 2 } }], [text, { jobs: 0 }], [text, { percentiles: [101] }], [text, { confidence: 1 }], [text, { temperatures: [] }],
      [divider([]), {}],
    ];
    for (const [t, o] of cases) {
      const r = await spreadNetlist(t as string, o as never);
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.errors.length).toBeGreaterThan(0);
        expect(r.errors.some((e) => e.code === 'internal')).toBe(false);
      }
    }
    // The file form too: options null or a number once threw before the guard saw them (found by the library fuzz test).
    for (const o of [null, 3, 'x']) {
      const r = await spreadNetlistFile(fileURLToPath(new URL('../../../examples/sensor-rail-spread.cir', import.meta.url)), o as never);
      expect(!r.ok && r.errors[0]!.code).toBe('bad-argument');
    }
    const none = await spreadNetlist(divider([]), {});
    expect(!none.ok && none.errors[0]!.code).toBe('spread-none');
    const late = runSampleNetlist(text, { run: 5, runs: 5 });
    expect(!late.ok && late.errors[0]!.code).toBe('spread-bad-sample');
  });
});

describe('a spread on a model no element uses', () => {
  test('varies nothing, with a note at its line; alone it is an error', async () => {
    const unused = ['.model dz D (BV=5)', '.spread dz.BV 5%'];
    const res = await spread(divider([...unused, '.spread R1 5%']), { runs: 3, jobs: 1 });
    expect(res.variables.map((v) => v.name)).toEqual(['R1']);
    expect(res.warnings.filter((w) => w.code === 'spread-unused-model').map((w) => w.pos?.line)).toEqual([8]);
    const alone = await spreadNetlist(divider(unused), { runs: 3, jobs: 1 });
    expect(!alone.ok && alone.errors[0]!.code).toBe('spread-none');
  });
});

describe('a spread on a model in its datasheet form (docs/models.md)', () => {
  const lines = (model: string, spread: string): string => ['t', 'V1 a 0 12', 'R1 a k 1k', 'D1 0 k Z', model, spread, '.op', '.end', ''].join('\n');

  test('is checked on the parameter the datasheet keys resolve to: BV = VZ − IZT·RS is there to spread, and its ends within range', () => {
    expect(runNetlist(lines('.model Z D (VZ=5.6 IZT=5m ZZT=10)', '.spread Z.BV 5%')).ok).toBe(true);
    // A model of forward points only has no BV: a spread of it is refused, as on a model written with IS and N.
    const none = runNetlist(lines('.model Z D (VF=0.7 IF=10m)', '.spread Z.BV 5%'));
    expect(!none.ok && none.errors.map((e) => e.code)).toEqual(['bad-spread-target']);
  });

  test('a datasheet line with an error is that one error, not a second one about the spread', () => {
    const r = runNetlist(lines('.model Z D (VZ={nope} IZT=5m)', '.spread Z.BV 5%'));
    expect(!r.ok && r.errors.map((e) => e.code)).toEqual(['undefined-parameter']);
  });
});
