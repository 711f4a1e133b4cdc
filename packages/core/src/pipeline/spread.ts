/**
 * Tolerance runs (`railcheck spread`, docs/spread.md): Monte Carlo over the
 * `.spread` lines, or every spread at its extremes (corners), with each
 * figure's statistics and each limit's yield at every temperature. A run's
 * sample depends only on (seed, run index), so the result does not depend
 * on the worker threads, and shards of the runs merge into exactly the
 * unsharded result ({@link mergeSpreadResults}). A run that fails (values
 * out of range, no operating point, a figure not measured) is counted
 * against the yield and listed with its sample, never dropped.
 */
import { availableParallelism } from 'node:os';
import { errorAt, RailcheckError, warningAt, type Diagnostic } from '../errors.js';
import { argumentDiagnostic, isRecord } from '../arguments.js';
import { figureEntry, figureUnit, type BenchKind, type FigureUnit } from '../figure-registry.js';
import { MAINS_CAUTION } from '../analysis/safety.js';
import { compileCircuit, revalueCircuit, type CompiledCircuit } from '../engine/compile.js';
import { benchOnCircuit } from '../measure/create-bench.js';
import type { BenchStart } from '../measure/bench.js';
import type { FlatCircuit } from '../elaborate/flat.js';
import { limitHolds, measureFiguresOn } from '../measure/figures.js';
import { parseNetlist, readNetlistFile, type ParseOptions, type ParseResult } from '../netlist/index.js';
import { cornerDesign } from '../corner-design.js';
import { summarise, wilsonInterval } from '../stats.js';
import { prepare, runParsed } from './run.js';
import { sortedRecord } from './check-run.js';
import { cornerFactors, monteCarloFactors, sampleOf, sampledCircuit, spreadVariables, type BoundVariable } from './spread-sample.js';
import { runOnWorkers, workerPath } from './worker-pool.js';
import {
  DEFAULT_MAX_CORNER_RUNS, DEFAULT_SPREAD_CONFIDENCE, DEFAULT_SPREAD_PERCENTILES, DEFAULT_SPREAD_RUNS, DEFAULT_SPREAD_SEED, SPREAD_FORMAT, SPREAD_VERSION,
  type ModelSampling, type SampleOptions, type SampleOutcome, type SpreadDesign, type SpreadFigure, type SpreadLimit, type SpreadMethod, type SpreadOptions,
  type SpreadOutcome, type SpreadResult, type SpreadRun, type SpreadRunAt, type SpreadRunRef, type SpreadStage, type SpreadTemperature,
} from './spread-types.js';

/** Most Monte Carlo runs one spread takes. */
export const MAX_SPREAD_RUNS = 1_000_000;
/** Runs a worker thread takes per message (progress is reported per message). */
const RUNS_PER_JOB = 10;

/** What every run of a spread needs: the nominal flat circuit, the variables, and how the runs are drawn. */
export interface SpreadSetup {
  readonly flat: FlatCircuit;
  readonly variables: readonly BoundVariable[];
  readonly method: SpreadMethod;
  readonly seed: number;
  readonly runCount: number;
  readonly temperatures: readonly number[];
  readonly design: SpreadDesign | null;
  /** Notes on the spreads (a model no element uses). */
  readonly notes: readonly Diagnostic[];
}

/** The options that decide the runs (and only those: a worker gets them as plain data). */
export interface RunOptions {
  readonly method?: SpreadMethod | undefined;
  readonly runs?: number | undefined;
  readonly seed?: number | undefined;
  readonly temperatures?: readonly number[] | undefined;
  readonly modelSampling?: ModelSampling | undefined;
  readonly maxCornerRuns?: number | undefined;
}

const usage = (code: string, message: string, expected: string): RailcheckError => new RailcheckError([errorAt(code, message, undefined, undefined, expected)]);

/** The setup of a spread of a flat circuit. Throws RailcheckError for options out of range or a netlist without `.spread`. */
export function spreadSetup(flat: FlatCircuit, o: RunOptions): SpreadSetup {
  const method = o.method ?? 'monte-carlo';
  if (method !== 'monte-carlo' && method !== 'corners') throw usage('spread-bad-method', `method ${String(method)} is not a spread method`, 'monte-carlo or corners');
  const seed = o.seed ?? DEFAULT_SPREAD_SEED;
  if (!Number.isSafeInteger(seed) || seed < 0) throw usage('spread-bad-seed', `seed ${seed} is not a whole number ≥ 0`, 'a whole number ≥ 0');
  const sampling = o.modelSampling ?? 'each';
  if (sampling !== 'each' && sampling !== 'lot') throw usage('spread-bad-sampling', `model sampling ${String(sampling)} is not a mode`, 'each or lot');
  const temperatures = o.temperatures ?? flat.temperatures;
  if (temperatures.length === 0 || temperatures.length > 100 || !temperatures.every((t) => Number.isFinite(t) && t > -273.15)) throw usage('spread-bad-temperatures', `temperatures ${temperatures.join(', ')} are not a list of temperatures`, '1 to 100 temperatures in °C, each above −273.15');
  if (flat.spreads.length === 0) {
    const where = { pos: { file: flat.file, line: 1, column: 1 }, lineText: flat.title };
    throw new RailcheckError([errorAt('spread-none', 'the netlist has no .spread line, so there is nothing to vary', where.pos, where.lineText, '.spread <element>|<model>.<PARAM> <ratio> [uniform|gauss] [each|lot] (docs/spread.md)')]);
  }
  const variables = spreadVariables(flat, sampling);
  const notes = flat.spreads.filter((sp) => !variables.some((v) => v.target === sp.target))
    .map((sp) => warningAt('spread-unused-model', `.spread ${sp.target}: no element uses this model, so the spread varies nothing`, sp.origin.pos, sp.origin.lineText));
  if (variables.length === 0) {
    const first = flat.spreads[0]!.origin;
    throw new RailcheckError([errorAt('spread-none', 'no .spread line varies a part of the circuit (each names a model no element uses)', first.pos, first.lineText, 'a .spread on an element, or on a model an element uses')]);
  }
  if (method === 'corners') {
    const max = o.maxCornerRuns ?? DEFAULT_MAX_CORNER_RUNS;
    if (!Number.isInteger(max) || max < 2) throw usage('spread-bad-corners', `max corner runs ${max} is not a whole number ≥ 2`, 'a whole number ≥ 2');
    const d = cornerDesign(variables.length, max);
    const design: SpreadDesign = { kind: d.kind, name: d.name, rows: d.rows.map((r) => [...r]) };
    return { flat, variables, method, seed, runCount: design.rows.length, temperatures, design, notes };
  }
  const runCount = o.runs ?? DEFAULT_SPREAD_RUNS;
  if (!Number.isInteger(runCount) || runCount < 1 || runCount > MAX_SPREAD_RUNS) throw usage('spread-bad-runs', `runs ${runCount} is not a whole number from 1 to ${MAX_SPREAD_RUNS}`, `a whole number from 1 to ${MAX_SPREAD_RUNS}`);
  return { flat, variables, method, seed, runCount, temperatures, design: null, notes };
}

/** The factors of run `run` of the setup. */
export function factorsOf(s: SpreadSetup, run: number): number[] {
  return s.design ? cornerFactors(s.variables, s.design.rows[run]!) : monteCarloFactors(s.variables, s.seed, run);
}

const message = (e: unknown): string => (e instanceof RailcheckError ? e.diagnostics.map((d) => d.message).join('; ') : `internal error: ${e instanceof Error ? e.message : String(e)}`);

/** What the runs of a setup share in one thread: the nominal circuit compiled once (the template every run is revalued on) and, per temperature, the nominal solve's warm start. */
interface Runner {
  readonly base: CompiledCircuit;
  readonly starts: readonly (BenchStart | undefined)[];
}

const RUNNERS = new WeakMap<SpreadSetup, Runner | string>();

/** The setup's runner (built at its first run in this thread), or why the nominal circuit does not compile. */
function runnerOf(s: SpreadSetup): Runner | string {
  const known = RUNNERS.get(s);
  if (known !== undefined) return known;
  const compiled = compileCircuit(s.flat);
  let made: Runner | string;
  if (!compiled.ok) made = compiled.errors.map((d) => d.message).join('; ');
  else {
    const base = compiled.circuit;
    const starts = s.temperatures.map((celsius): BenchStart | undefined => {
      const nominal = revalueCircuit(base, s.flat);
      if (!nominal.ok || !nominal.circuit.flat.supply) return undefined;
      try {
        const w = benchOnCircuit(nominal.circuit, celsius).warmStart;
        return { solution: new Float64Array(w.solution), start: w.start };
      } catch {
        return undefined; // the runs then start cold, and meet the nominal's failure themselves
      }
    });
    made = { base, starts };
  }
  RUNNERS.set(s, made);
  return made;
}

/**
 * One run: the circuit with its values, revalued on the nominal circuit's
 * compiled structure and workspace for each temperature (revalueCircuit),
 * its nominal solve started from the nominal circuit's at that
 * temperature, then measured (measureFigures on that bench). Nothing of
 * an earlier run survives a revalue, so a run's record depends only on the
 * setup and its index, whatever this thread ran before. Never throws: a
 * failure is in the run's record.
 */
export function measureRun(s: SpreadSetup, run: number): SpreadRun {
  const factors = factorsOf(s, run);
  const failed = (reason: string): SpreadRun => ({ run, factors, at: s.temperatures.map((celsius) => ({ celsius, values: {}, notMeasured: [], failure: reason })) });
  const sampled = sampledCircuit(s.flat, s.variables, factors);
  if (!sampled.ok) return failed(sampled.reason);
  const runner = runnerOf(s);
  if (typeof runner === 'string') return failed(runner);
  const at = s.temperatures.map((celsius, t): SpreadRunAt => {
    try {
      const c = revalueCircuit(runner.base, sampled.flat);
      if (!c.ok) return { celsius, values: {}, notMeasured: [], failure: c.errors.map((d) => d.message).join('; ') };
      const r = measureFiguresOn(c.circuit, () => benchOnCircuit(c.circuit, celsius, runner.starts[t]));
      if (r.nominalFailure) return { celsius, values: {}, notMeasured: [], failure: r.nominalFailure.message };
      const notMeasured = r.figures.flatMap((f) => (f.ok ? f.notMeasured.map((v) => ({ name: v.name, reason: v.reason.message })) : [{ name: f.kind, reason: f.reason.message }]));
      return { celsius, values: sortedRecord(r.values), notMeasured, failure: null };
    } catch (e) {
      return { celsius, values: {}, notMeasured: [], failure: message(e) };
    }
  });
  return { run, factors, at };
}

/** The header of a result: everything but the runs' data and the share. */
type Header = Pick<SpreadResult, 'title' | 'file' | 'method' | 'seed' | 'modelSampling' | 'stage' | 'runCount' | 'confidence' | 'percentiles' | 'temperatures' | 'variables' | 'design' | 'warnings' | 'caution' | 'bench' | 'allRuns'>;

const byCodePoint = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/** A figure's value in a run at temperature index t (case-insensitive name), or undefined. */
function valueIn(run: SpreadRun, t: number, lowName: string): number | undefined {
  const at = run.at[t]!;
  for (const [n, v] of Object.entries(at.values)) if (n.toLowerCase() === lowName) return v;
  return undefined;
}

/** The statistics at temperature index t over `runs` (in run order). */
function temperatureStats(h: Header, flat: Pick<FlatCircuit, 'limits'>, runs: readonly SpreadRun[], t: number): SpreadTemperature {
  const ref = (r: SpreadRun, value: number | null): SpreadRunRef => ({ run: r.run, value, sample: sampleOf(h.variables, r.factors) });
  const names = [...new Set(runs.flatMap((r) => Object.keys(r.at[t]!.values)))].sort(byCodePoint);
  const figures = names.map((name): SpreadFigure => {
    const pairs = runs.flatMap((r) => {
      const v = r.at[t]!.values[name];
      return v === undefined ? [] : [{ r, v }];
    });
    const better = figureEntry(name)?.better ?? 'none';
    const unit: FigureUnit = (h.bench ? figureUnit(name, h.bench) : undefined) ?? figureEntry(name)?.units.dc ?? 'ratio';
    const lowest = pairs.reduce<(typeof pairs)[number] | undefined>((a, p) => (a === undefined || p.v < a.v ? p : a), undefined);
    const highest = pairs.reduce<(typeof pairs)[number] | undefined>((a, p) => (a === undefined || p.v > a.v ? p : a), undefined);
    const worst = !lowest || !highest ? [] : better === 'lower' ? [highest] : better === 'higher' ? [lowest] : [lowest, highest];
    return {
      name, unit, better, measured: pairs.length, notMeasured: runs.length - pairs.length,
      summary: pairs.length > 0 ? summarise(pairs.map((p) => p.v), h.percentiles) : null,
      worst: worst.map((p) => ref(p.r, p.v)),
    };
  });
  const limits = flat.limits.map((l): SpreadLimit => {
    const low = l.figure.toLowerCase();
    let passes = 0;
    let fails = 0;
    let notEvaluated = 0;
    let worst: (SpreadRunRef & { margin: number | null }) | null = null;
    let worstMargin = Infinity;
    for (const r of runs) {
      const v = valueIn(r, t, low);
      if (v === undefined) {
        notEvaluated += 1;
        if (worstMargin > -Infinity) {
          worstMargin = -Infinity;
          worst = { ...ref(r, null), margin: null };
        }
        continue;
      }
      if (limitHolds(v, l.op, l.value)) passes += 1;
      else fails += 1;
      const margin = l.op === '<' || l.op === '<=' ? l.value - v : v - l.value;
      if (margin < worstMargin) {
        worstMargin = margin;
        worst = { ...ref(r, v), margin };
      }
    }
    const n = runs.length;
    return { figure: l.figure, op: l.op, value: l.value, passes, fails, notEvaluated, yield: n > 0 ? passes / n : 0, interval: n > 0 ? wilsonInterval(passes, n, h.confidence) : { low: 0, high: 1 }, worst };
  });
  const failed = runs.flatMap((r) => (r.at[t]!.failure === null ? [] : [{ ...ref(r, null), reason: r.at[t]!.failure! }]));
  const incomplete = runs.flatMap((r) => (r.at[t]!.failure === null && r.at[t]!.notMeasured.length > 0 ? [{ ...ref(r, null), missing: r.at[t]!.notMeasured }] : []));
  return { celsius: h.temperatures[t]!, figures, limits, failed, incomplete };
}

/** The result from its header and runs (in run order); the same for a run and a merge. */
function assemble(h: Header, limits: Pick<FlatCircuit, 'limits'>, shard: SpreadResult['shard'], runs: readonly SpreadRun[], runsPerSecond: number | null): SpreadResult {
  const keep = h.allRuns || shard.count > 1;
  return {
    format: SPREAD_FORMAT, version: SPREAD_VERSION,
    ...h,
    shard, runsDone: runs.length,
    at: h.temperatures.map((_, t) => temperatureStats(h, limits, runs, t)),
    runs: keep ? runs : null,
    runsPerSecond,
  };
}

/** The stage of the nominal circuit as plain data (SpreadStage). */
function stageOf(flat: FlatCircuit, voutNominal: number | undefined): SpreadStage | null {
  const supply = flat.supply;
  if (!supply) return null;
  const node = (key: string): string => (key === '0' ? '0' : (flat.nodes.find((n) => n.key === key)?.name ?? key));
  const input = flat.elements.find((e) => e.key === supply.input);
  const w = input?.kind === 'vsource' ? input.spec.waveform : undefined;
  const feed: SpreadStage['feed'] = input?.kind !== 'vsource' ? { kind: 'other' } : w?.kind === 'sin' ? { kind: 'sine', peakVolts: w.va, hertz: w.freq } : w === undefined ? { kind: 'dc', volts: input.spec.dc } : { kind: 'other' };
  const el = supply.load === undefined ? undefined : flat.elements.find((e) => e.key === supply.load);
  const load: SpreadStage['load'] = el === undefined ? null : el.kind === 'resistor' ? { name: el.name, kind: 'resistor', ohms: el.ohms } : el.kind === 'isource' ? { name: el.name, kind: 'isource', amps: el.spec.dc } : { name: el.name, kind: 'other' };
  return { input: input?.name ?? supply.input, feed, output: node(supply.out), reference: node(supply.ref), voutNominal: voutNominal ?? null, load };
}

/** The option checks of the spread functions: the first option of the wrong type, as a `bad-argument` diagnostic. */
function optionsProblem(fn: string, options: unknown): Diagnostic | undefined {
  if (!isRecord(options)) return argumentDiagnostic(fn, 'options', 'an options object', options);
  const num = (v: unknown): boolean => typeof v === 'number';
  const nums = (v: unknown): boolean => Array.isArray(v) && v.every(num);
  const kinds: Record<string, (v: unknown) => boolean> = {
    method: (v) => v === 'monte-carlo' || v === 'corners', runs: num, seed: num, temperatures: nums, percentiles: nums, confidence: num,
    modelSampling: (v) => v === 'each' || v === 'lot', maxCornerRuns: num, jobs: num, run: num,
    shard: (v) => isRecord(v) && num(v['index']) && num(v['count'])!, allRuns: (v) => typeof v === 'boolean',
    workerScript: (v) => (typeof v === 'string' && v !== '') || v instanceof URL, onProgress: (v) => typeof v === 'function', parse: isRecord,
  };
  for (const [k, ok] of Object.entries(kinds)) {
    const v = options[k];
    if (v !== undefined && !ok(v)) return argumentDiagnostic(fn, `options.${k}`, `a value of the documented type for ${k}`, v);
  }
  return undefined;
}

/** Where the netlist comes from: text, or a file (what a worker needs to read it again). */
type Source = { readonly kind: 'text'; readonly text: string } | { readonly kind: 'file'; readonly path: string };

function parseSource(src: Source, parse: ParseOptions): ParseResult {
  return src.kind === 'text' ? parseNetlist(src.text, parse) : readNetlistFile(src.path, parse);
}

/** A worker's message: the source, its reading options (plain data only), the run options and the runs to do. */
export interface SpreadJobMessage {
  readonly source: Source;
  readonly parse: { readonly file?: string; readonly allowOutsideIncludes?: boolean };
  readonly options: RunOptions;
  readonly runs: readonly number[];
}

/** Reads, elaborates and compiles the source, then makes the setup. Throws RailcheckError. */
export function setupFrom(src: Source, parse: ParseOptions, o: RunOptions): { setup: SpreadSetup; parsed: ParseResult } {
  const parsed = parseSource(src, parse);
  const prepared = prepare(parsed);
  if (!prepared.ok) throw new RailcheckError([...prepared.errors]);
  return { setup: spreadSetup(prepared.compiled.flat, o), parsed };
}

const runOptionsOf = (o: SpreadOptions | SampleOptions): RunOptions => ({
  method: o.method, runs: o.runs, seed: o.seed, temperatures: o.temperatures, modelSampling: o.modelSampling, maxCornerRuns: o.maxCornerRuns,
});

async function spreadChecked(src: Source, options: SpreadOptions): Promise<SpreadOutcome> {
  const parse = options.parse ?? {};
  const parsed = parseSource(src, parse);
  const nominal = runParsed(parsed);
  if (!nominal.ok) return nominal;
  const setup = spreadSetup(nominal.report.circuit, runOptionsOf(options));
  const warnings = [...nominal.report.warnings.filter((w) => w.code !== 'spread-not-used'), ...setup.notes];
  const shard = options.shard ?? { index: 1, count: 1 };
  if (!Number.isInteger(shard.count) || !Number.isInteger(shard.index) || shard.count < 1 || shard.index < 1 || shard.index > shard.count) throw usage('spread-bad-shard', `shard ${shard.index}/${shard.count} is not one of the shares`, 'K/N with whole numbers 1 ≤ K ≤ N');
  const jobs = options.jobs ?? availableParallelism();
  if (!Number.isInteger(jobs) || jobs < 1) throw usage('spread-bad-jobs', `jobs ${jobs} is not a whole number of threads`, 'a whole number ≥ 1');
  const percentiles = options.percentiles ?? DEFAULT_SPREAD_PERCENTILES;
  if (percentiles.length > 100 || !percentiles.every((p) => p >= 0 && p <= 100)) throw usage('spread-bad-percentiles', `percentiles ${percentiles.join(', ')} are not percentages`, 'up to 100 numbers from 0 to 100');
  const confidence = options.confidence ?? DEFAULT_SPREAD_CONFIDENCE;
  if (!(confidence > 0 && confidence < 1)) throw usage('spread-bad-confidence', `confidence ${confidence} is not a probability between 0 and 1`, 'a number in (0, 1) such as 0.95');

  const mine = Array.from({ length: setup.runCount }, (_, r) => r).filter((r) => r % shard.count === shard.index - 1);
  const runs: (SpreadRun | undefined)[] = new Array<SpreadRun | undefined>(mine.length);
  const slot = new Map(mine.map((r, k) => [r, k]));
  let done = 0;
  const started = performance.now();
  const plain = options.parse?.readFile === undefined;
  const script = jobs > 1 && mine.length > RUNS_PER_JOB && plain ? workerPath(options.workerScript, 'spread-worker.js', import.meta.url) : undefined;
  if (script !== undefined) {
    const chunks: number[][] = [];
    for (let k = 0; k < mine.length; k += RUNS_PER_JOB) chunks.push(mine.slice(k, k + RUNS_PER_JOB));
    const parsePlain = { ...(parse.file !== undefined ? { file: parse.file } : {}), ...(parse.allowOutsideIncludes !== undefined ? { allowOutsideIncludes: parse.allowOutsideIncludes } : {}) };
    const pool = {
      jobs: chunks,
      message: (job: number[]): SpreadJobMessage => ({ source: src, parse: parsePlain, options: runOptionsOf(options), runs: job }),
      reply: (m: unknown, job: number[]): SpreadRun[] => {
        const reply = m as { runs?: SpreadRun[]; error?: string };
        return reply.runs ?? job.map((r) => ({ run: r, factors: factorsOf(setup, r), at: setup.temperatures.map((celsius) => ({ celsius, values: {}, notMeasured: [], failure: reply.error ?? 'the worker thread gave no result' })) }));
      },
      // The calling thread is one lane: yielding between runs, so that the workers' replies (and progress) are taken in promptly.
      local: async (job: number[]): Promise<SpreadRun[]> => {
        const got: SpreadRun[] = [];
        for (const r of job) {
          await new Promise((resolve) => setImmediate(resolve));
          got.push(measureRun(setup, r));
        }
        return got;
      },
      stopped: (job: number[], why: string): SpreadRun[] => job.map((r) => ({ run: r, factors: factorsOf(setup, r), at: setup.temperatures.map((celsius) => ({ celsius, values: {}, notMeasured: [], failure: `the worker thread running it stopped: ${why}` })) })),
    };
    await runOnWorkers(pool, Math.min(jobs, chunks.length), script, (_, got) => {
      for (const r of got) runs[slot.get(r.run)!] = r;
      done += got.length;
      options.onProgress?.(done, mine.length);
    });
  } else {
    for (let k = 0; k < mine.length; k++) {
      if (options.onProgress) await new Promise((r) => setImmediate(r)); // let a progress display draw
      runs[k] = measureRun(setup, mine[k]!);
      options.onProgress?.(k + 1, mine.length);
    }
  }
  const seconds = (performance.now() - started) / 1000;
  const header: Header = {
    title: setup.flat.title, file: setup.flat.file, method: setup.method, seed: setup.seed, modelSampling: options.modelSampling ?? 'each', stage: stageOf(setup.flat, nominal.report.figures?.voutNominal), runCount: setup.runCount, confidence, percentiles: [...percentiles],
    temperatures: [...setup.temperatures], variables: setup.variables.map(({ elements: _e, param: _p, ...v }) => v), design: setup.design,
    warnings, caution: warnings.some((w) => w.code === 'above-elv') ? MAINS_CAUTION : null, bench: (nominal.report.figures?.bench ?? null) as BenchKind | null, allRuns: options.allRuns === true,
  };
  return { ok: true, result: { ...assemble(header, setup.flat, shard, runs as SpreadRun[], null), runsPerSecond: seconds > 0 ? mine.length / seconds : null } };
}

async function spreadGuarded(fn: string, src: Source, options: SpreadOptions): Promise<SpreadOutcome> {
  try {
    const wrong = optionsProblem(fn, options);
    if (wrong) return { ok: false, errors: [wrong], warnings: [] };
    return await spreadChecked(src, options);
  } catch (e) {
    if (e instanceof RailcheckError) return { ok: false, errors: e.diagnostics, warnings: [] };
    return { ok: false, errors: [errorAt('internal', `internal error: ${e instanceof Error ? e.message : String(e)}`)], warnings: [] };
  }
}

/**
 * A tolerance run of netlist text: Monte Carlo over its `.spread` lines
 * (uniform ± ratio, or gaussian with the ratio as 3σ), or `method:
 * 'corners'`, measured at every temperature; each figure's statistics and
 * each limit's yield with its Wilson score interval (stats.ts). The
 * result depends only on the netlist and the options (seed, runs, ...),
 * not on `jobs` (docs/spread.md). Usage errors, and a netlist that does
 * not read, elaborate or run at its nominal values, come back as
 * `ok: false`.
 *
 * @example
 * ```ts
 * import { spreadNetlist } from '@railcheck/core';
 * const text = ['divider', 'V1 in 0 10', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out load=R2',
 *   '.figure load', '.limit load.rout <= 600', '.spread R1 5%', '.spread R2 5%', '.end'].join('\n');
 * const outcome = await spreadNetlist(text, { runs: 200, seed: 7, jobs: 1 });
 * if (outcome.ok) for (const l of outcome.result.at[0]!.limits) console.log(l.figure, l.yield, l.interval);
 * ```
 */
export async function spreadNetlist(text: string, options: SpreadOptions = {}): Promise<SpreadOutcome> {
  if (typeof text !== 'string') return { ok: false, errors: [argumentDiagnostic('spreadNetlist', 'text', 'netlist text', text)], warnings: [] };
  return spreadGuarded('spreadNetlist', { kind: 'text', text }, options);
}

/**
 * A tolerance run of a netlist file; as {@link spreadNetlist}.
 *
 * @example
 * ```ts
 * import { spreadNetlistFile } from '@railcheck/core';
 * const outcome = await spreadNetlistFile('examples/sensor-rail-spread.cir', { runs: 1000, seed: 1 });
 * if (outcome.ok) console.log(outcome.result.at.map((t) => `${t.celsius} °C: ${t.limits.map((l) => `${l.figure} ${(100 * l.yield).toFixed(1)} %`).join(', ')}`));
 * ```
 */
export async function spreadNetlistFile(path: string, options: SpreadOptions = {}): Promise<SpreadOutcome> {
  if (typeof path !== 'string' || path === '') return { ok: false, errors: [argumentDiagnostic('spreadNetlistFile', 'path', 'a file path', path)], warnings: [] };
  // Options of the wrong type (null, a number) are the guard's to report, not to crash on here.
  if (typeof options !== 'object' || options === null) return spreadGuarded('spreadNetlistFile', { kind: 'file', path }, options);
  const parse = options.parse ?? {};
  return spreadGuarded('spreadNetlistFile', { kind: 'file', path }, { ...options, parse: { ...parse } });
}

/** Whether a value has the shape of a spread result, as far as a merge reads it. */
function isSpreadResult(s: unknown): s is SpreadResult {
  if (!isRecord(s) || s['format'] !== SPREAD_FORMAT || s['version'] !== SPREAD_VERSION) return false;
  const shard = s['shard'];
  return isRecord(shard) && Number.isInteger(shard['index']) && Number.isInteger(shard['count']) && (shard['count'] as number) >= 1 && (shard['index'] as number) >= 1
    && (shard['index'] as number) <= (shard['count'] as number) && Number.isInteger(s['runCount']) && Array.isArray(s['runs']) && Array.isArray(s['temperatures']) && Array.isArray(s['variables'])
    && Array.isArray(s['percentiles']) && typeof s['confidence'] === 'number' && typeof s['allRuns'] === 'boolean' && Array.isArray(s['at'])
    && (s['at'] as unknown[]).every((t) => isRecord(t) && Array.isArray(t['limits']))
    && (s['runs'] as unknown[]).every((r) => isRecord(r) && Number.isInteger(r['run']) && Array.isArray(r['factors']) && Array.isArray(r['at']) && (r['at'] as unknown[]).length === (s['temperatures'] as unknown[]).length);
}

const headerOf = (r: SpreadResult): Header => ({
  title: r.title, file: r.file, method: r.method, seed: r.seed, modelSampling: r.modelSampling, stage: r.stage, runCount: r.runCount, confidence: r.confidence, percentiles: r.percentiles, temperatures: r.temperatures,
  variables: r.variables, design: r.design, warnings: r.warnings, caution: r.caution, bench: r.bench, allRuns: r.allRuns,
});

/**
 * Combines the JSON results of shards 1..N of one spread (each exactly
 * once, any order) into the result of the unsharded spread: every run in
 * run order and the statistics recomputed from them, the same numbers
 * one unsharded run reports (`runsPerSecond` null: a merge times nothing).
 * Anything else (a missing, repeated or foreign shard, different spreads)
 * is an error saying which.
 *
 * @example
 * ```ts
 * import { readFileSync } from 'node:fs';
 * import { mergeSpreadResults } from '@railcheck/core';
 * const merged = mergeSpreadResults(['s1.json', 's2.json'].map((f) => JSON.parse(readFileSync(f, 'utf8')) as unknown));
 * if (merged.ok) console.log(merged.result.at[0]!.limits.map((l) => l.yield));
 * ```
 */
export function mergeSpreadResults(shards: readonly unknown[]): SpreadOutcome {
  const bad = (m: string): SpreadOutcome => ({ ok: false, errors: [errorAt('merge-shards', m, undefined, undefined, 'the --json results of railcheck spread --shard K/N, for every K from 1 to N once')], warnings: [] });
  if (!Array.isArray(shards) || shards.length === 0) return bad('no shard results to merge');
  const parts: SpreadResult[] = [];
  for (const [i, s] of shards.entries()) {
    if (!isSpreadResult(s)) return bad(`shard result ${i + 1} is not a ${SPREAD_FORMAT} version ${SPREAD_VERSION} result with its runs (railcheck spread --shard K/N --json)`);
    parts.push(s);
  }
  const first = parts[0]!;
  const count = first.shard.count;
  const same = JSON.stringify(headerOf(first));
  const seen = new Map<number, number>();
  for (const [i, p] of parts.entries()) {
    if (p.shard.count !== count) return bad(`shard result ${i + 1} is shard ${p.shard.index}/${p.shard.count}, the first is of ${count}: they are not shares of one spread`);
    if (JSON.stringify(headerOf(p)) !== same) return bad(`shard result ${i + 1} is of another netlist or other options than the first: they are not shares of one spread`);
    const dup = seen.get(p.shard.index);
    if (dup !== undefined) return bad(`shard ${p.shard.index}/${count} is given twice (results ${dup + 1} and ${i + 1})`);
    seen.set(p.shard.index, i);
  }
  const missing = Array.from({ length: count }, (_, k) => k + 1).filter((k) => !seen.has(k));
  if (missing.length > 0) return bad(`shard${missing.length === 1 ? '' : 's'} ${missing.map((k) => `${k}/${count}`).join(', ')} missing: give every shard of the spread once`);
  const runs = parts.flatMap((p) => p.runs ?? []).sort((a, b) => a.run - b.run);
  if (runs.length !== first.runCount || runs.some((r, k) => r.run !== k)) return bad('the shard results do not hold each run of the spread exactly once');
  // The limits are the ones of the shards' results (every share lists all of them, in netlist order).
  const limits = { limits: (first.at[0]?.limits ?? []).map((l) => ({ figure: l.figure, op: l.op, value: l.value, origin: { pos: { file: first.file, line: 0, column: 0 }, lineText: '' } })) };
  return { ok: true, result: assemble(headerOf(first), limits, { index: 1, count: 1 }, runs, null) };
}

function sampleGuarded(fn: string, src: Source, options: SampleOptions): SampleOutcome {
  try {
    const wrong = optionsProblem(fn, options);
    if (wrong) return { ok: false, errors: [wrong], warnings: [] };
    if (!isRecord(options) || !Number.isSafeInteger(options.run) || options.run < 0) return { ok: false, errors: [argumentDiagnostic(fn, 'options.run', 'a run index, a whole number ≥ 0', options.run)], warnings: [] };
    const { setup, parsed } = setupFrom(src, options.parse ?? {}, runOptionsOf(options));
    if (options.run >= setup.runCount) throw usage('spread-bad-sample', `run ${options.run} is not one of the ${setup.runCount} runs of this spread`, `a run index from 0 to ${setup.runCount - 1}`);
    const run = measureRun(setup, options.run);
    const variables = setup.variables.map(({ elements: _e, param: _p, ...v }) => v);
    return { ok: true, title: setup.flat.title, variables, sample: sampleOf(variables, run.factors), run, warnings: parsed.warnings };
  } catch (e) {
    if (e instanceof RailcheckError) return { ok: false, errors: e.diagnostics, warnings: [] };
    return { ok: false, errors: [errorAt('internal', `internal error: ${e instanceof Error ? e.message : String(e)}`)], warnings: [] };
  }
}

/**
 * Repeats one run of a spread of netlist text: the values of run
 * `options.run` (the same sample the spread drew with the same seed,
 * method and options), measured at every temperature; its figures equal
 * the spread's record of that run bit for bit (`railcheck run FILE
 * --sample RUN --seed S`).
 *
 * @example
 * ```ts
 * import { runSampleNetlistFile } from '@railcheck/core';
 * const one = runSampleNetlistFile('examples/sensor-rail-spread.cir', { run: 17, seed: 1 });
 * if (one.ok) console.log(one.sample, one.run.at[0]!.values);
 * ```
 */
export function runSampleNetlist(text: string, options: SampleOptions): SampleOutcome {
  if (typeof text !== 'string') return { ok: false, errors: [argumentDiagnostic('runSampleNetlist', 'text', 'netlist text', text)], warnings: [] };
  return sampleGuarded('runSampleNetlist', { kind: 'text', text }, options);
}

/** Repeats one run of a spread of a netlist file; as {@link runSampleNetlist}. */
export function runSampleNetlistFile(path: string, options: SampleOptions): SampleOutcome {
  if (typeof path !== 'string' || path === '') return { ok: false, errors: [argumentDiagnostic('runSampleNetlistFile', 'path', 'a file path', path)], warnings: [] };
  return sampleGuarded('runSampleNetlistFile', { kind: 'file', path }, options);
}
