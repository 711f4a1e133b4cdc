/**
 * The `.tran` analysis in the user's terms: node voltages and branch
 * currents on the output grid (every `tstep` from `tstart` to `tstop`, by
 * linear interpolation between accepted points, sampled as the points are
 * accepted so that memory does not grow with the number of steps), the
 * accepted points themselves only when asked for (`keepSteps`), and the
 * stepper's counters.
 */
import type { StressMeter } from './stress.js';
import type { LoadContext } from '@railcheck/devices';
import { JUNCTION_CMIN } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import type { CardOrigin } from '../netlist/ast.js';
import type { CompiledCircuit } from '../engine/compile.js';
import { describeTransientFailure, runTransient, transientFailureCode, type IntegrationMethod, type TransientBudgetExcess, type TransientStats, type TransientTrace } from '../engine/transient.js';
import { formatSI } from '../units.js';
import { COMPILED_CIRCUITS } from '../engine/compile.js';
import { Brand, argumentError } from '../arguments.js';

/** Waveforms of one transient run. */
export interface TransientResult {
  /** °C. */
  readonly temperature: number;
  readonly method: IntegrationMethod;
  /** True when the run started from ic= values instead of the operating point. */
  readonly fromIc: boolean;
  readonly stats: TransientStats;
  /** Output grid, s. */
  readonly times: readonly number[];
  /**
   * Node name → volts on the grid (one value per entry of `times`). A
   * Float64Array, which JSON.stringify writes as an object of indices:
   * `Array.from` gives a plain array.
   */
  readonly nodes: Readonly<Record<string, Float64Array>>;
  /** Branch-current name (voltage sources, inductors, E and H) → amps on the grid (one value per entry of `times`). */
  readonly branches: Readonly<Record<string, Float64Array>>;
  /**
   * Every accepted point (times and full solution vectors), only when the
   * run was asked to keep them (`runNetlist`'s `keepSteps`; the command's
   * `--steps`); absent otherwise, so that a long run holds only its grid.
   */
  readonly trace?: TransientTrace;
}

/** What a `.tran` card asks for. */
export interface TransientRequest {
  readonly tstep: number;
  readonly tstop: number;
  readonly tstart: number;
  readonly tmax: number | undefined;
  readonly method: IntegrationMethod;
  readonly fromIc: boolean;
  /** Keep every accepted point (`TransientResult.trace`), for `acceptedTimes` and `sampleTrace`; default false. */
  readonly keepSteps?: boolean;
}

/** The value at t on the segment from (t0, v0) to (t1, v1), or v0 when the segment has no length: the one interpolation of sampleTrace and GridSampler. */
function between(t: number, t0: number, t1: number, v0: number, v1: number): number {
  return t1 > t0 ? v0 + ((v1 - v0) * (t - t0)) / (t1 - t0) : v0;
}

/** Linear interpolation of unknown `index` of the trace at the grid times. */
function sample(trace: TransientTrace, index: number, grid: readonly number[]): number[] {
  const out: number[] = [];
  let k = 0;
  const { times, values, size, count } = trace;
  for (const t of grid) {
    while (k < count - 2 && times[k + 1]! < t) k++;
    const t0 = times[k]!;
    const t1 = times[Math.min(k + 1, count - 1)]!;
    out.push(between(t, t0, t1, values[k * size + index]!, values[Math.min(k + 1, count - 1) * size + index]!));
  }
  return out;
}

/**
 * The output grid filled as the stepper accepts points: the same linear
 * interpolation as {@link sampleTrace} (each grid time on the first
 * accepted interval that reaches it, the last interval beyond the end),
 * with the same operations, so the values are equal bit for bit; it holds
 * the two newest accepted points and the grid values, never the run.
 */
export class GridSampler {
  /** Values per sampled unknown on the grid. */
  readonly values: Float64Array[];
  /** The solution at the previous and at the newest accepted point. */
  private prev: Float64Array;
  private last: Float64Array;
  private tPrev = 0;
  private tLast = 0;
  /** Accepted points seen. */
  private count = 0;
  /** Next grid point to fill. */
  private next = 0;

  /**
   * @param grid - output times, s, ascending
   * @param indices - the unknowns to sample (indices into the solution vector)
   * @param size - length of a solution vector (unknowns + 1)
   */
  constructor(
    private readonly grid: readonly number[],
    private readonly indices: readonly number[],
    size: number,
  ) {
    this.values = indices.map(() => new Float64Array(grid.length));
    this.prev = new Float64Array(size);
    this.last = new Float64Array(size);
  }

  /** Takes the accepted point (t s, solution x) and fills every grid time up to t. */
  accept(t: number, x: Float64Array): void {
    [this.prev, this.last] = [this.last, this.prev];
    this.last.set(x);
    this.tPrev = this.tLast;
    this.tLast = t;
    this.count++;
    if (this.count < 2) return;
    while (this.next < this.grid.length && !(this.grid[this.next]! > t)) this.fill(this.next++);
  }

  /** Fills the grid times after the last accepted point from the last interval (as sampleTrace extrapolates); returns the values. */
  finish(): Float64Array[] {
    while (this.next < this.grid.length) this.fill(this.next++);
    return this.values;
  }

  private fill(k: number): void {
    const t = this.grid[k]!;
    const single = this.count < 2;
    const t0 = single ? this.tLast : this.tPrev;
    const t1 = this.tLast;
    const p0 = single ? this.last : this.prev;
    const p1 = this.last;
    const { indices, values } = this;
    for (let j = 0; j < indices.length; j++) values[j]![k] = between(t, t0, t1, p0[indices[j]!]!, p1[indices[j]!]!);
  }
}

/** The output grid: tstart, tstart + tstep, ..., tstop. */
export function outputGrid(tstep: number, tstart: number, tstop: number): number[] {
  const n = Math.floor((tstop - tstart) / tstep + 1e-9);
  const grid = Array.from({ length: n + 1 }, (_, k) => tstart + k * tstep);
  if (tstop - grid[grid.length - 1]! > tstep * 1e-9) grid.push(tstop);
  return grid;
}

/** Transient results transient made; acceptedTimes takes only those. */
export const TRANSIENT_RESULTS: Brand<TransientResult> = new Brand<TransientResult>('a transient result as runNetlist reports it');

/** The traces of those results. */
const TRACES: Brand<TransientTrace> = new Brand<TransientTrace>("a transient result's trace");

/** Checks sampleTrace's arguments: a compiled circuit, a trace of one of its transients (one value per unknown), finite times. */
function checkTraceArguments(c: unknown, trace: unknown, grid: unknown): void {
  COMPILED_CIRCUITS.check('sampleTrace', 'c', c);
  TRACES.check('sampleTrace', 'trace', trace);
  if (trace.size !== c.unknowns.length) throw argumentError('sampleTrace', 'trace', `a trace of this circuit (${c.unknowns.length} unknowns)`, trace);
  if (!Array.isArray(grid) || !grid.every((t) => typeof t === 'number' && Number.isFinite(t))) throw argumentError('sampleTrace', 'grid', 'an array of finite times in s', grid);
}

/** The signals a transient reports, in sampleTrace's order: every node (its unknown), then every branch current. */
function outputSignals(c: CompiledCircuit): Array<{ name: string; index: number; branch: boolean }> {
  const out = c.flat.nodes.map((node) => ({ name: node.name, index: c.nodeIndex.get(node.key)!, branch: false }));
  c.unknowns.forEach((u, i) => {
    if (u.kind === 'branch') out.push({ name: u.name, index: i, branch: true });
  });
  return out;
}

/** Samples every node and branch current of a trace on a grid. Throws RailcheckError (`bad-argument`) for arguments railcheck did not make. */
export function sampleTrace(c: CompiledCircuit, trace: TransientTrace, grid: readonly number[]): { nodes: Record<string, number[]>; branches: Record<string, number[]> } {
  checkTraceArguments(c, trace, grid);
  const nodes: Record<string, number[]> = {};
  const branches: Record<string, number[]> = {};
  for (const s of outputSignals(c)) (s.branch ? branches : nodes)[s.name] = sample(trace, s.index, grid);
  return { nodes, branches };
}

/**
 * The accepted time points of a result from its output start (tstart) on,
 * s. Throws RailcheckError (`bad-argument`) for a result railcheck did not
 * make or one run without `keepSteps` (whose accepted points were not kept).
 */
export function acceptedTimes(r: TransientResult): number[] {
  TRANSIENT_RESULTS.check('acceptedTimes', 'r', r);
  const trace = r.trace;
  if (!trace) throw argumentError('acceptedTimes', 'r', 'a transient result run with keepSteps (its accepted points kept)', r);
  const start = r.times[0] ?? 0;
  return Array.from(trace.times.subarray(0, trace.count)).filter((t) => t >= start);
}

/**
 * What a failed step most likely means, naming the least-settled unknowns:
 * a node held by little more than gmin (1e-12 S) while a junction with no
 * capacitance switches (docs/transient.md), then the rarer causes.
 */
function stepHint(names: readonly string[]): string {
  const at = names.length > 0 ? `${names.join(', ')}` : 'a node';
  return `${at} held by little more than gmin (1e-12 S) while a junction with no capacitance switches (a floating node between transistor junctions, or a diode string with no DC path); give the node a DC path (a winding resistance or bleeder) or the junctions a capacitance (CJO, CJE/CJC); else look for switching with no series resistance or a source edge of zero duration`;
}

/** What would fit, per transient budget. */
const BUDGET_EXPECTED: Record<TransientBudgetExcess['budget'], string> = {
  MAX_TRAN_STEPS: 'a shorter run, a larger tmax, slower sources, or damping for a lightly damped resonance (the steps follow its ringing)',
  MAX_BREAKPOINTS: 'fewer pulse periods or pwl points in the run',
  MAX_TRACE_VALUES: 'a shorter run or a smaller circuit',
  MAX_FIGURE_STEPS: 'a figure asking for fewer steps',
  MAX_BENCH_STEPS: 'fewer figures, or a stage that settles in fewer cycles',
};

/**
 * Runs a transient at the present temperature; throws RailcheckError when it
 * cannot complete. A budget it would exceed is reported at the source
 * responsible when there is one, else at the `.tran` card (the run's
 * output as a whole is checked against MAX_OUTPUT_VALUES in pipeline/run.ts).
 * With `meter`, the peaks of part stress over the run are kept (analysis/stress.ts).
 * The grid is sampled as the points are accepted ({@link GridSampler});
 * the accepted points themselves are kept only with `req.keepSteps`.
 */
export function transient(c: CompiledCircuit, temperature: number, req: TransientRequest, origin?: CardOrigin, meter?: StressMeter): TransientResult {
  // Peaks over the whole run: a mean over a switch-on is no rated quantity (docs/stress.md).
  meter?.begin(`the transient at ${temperature} °C`, false);
  const grid = outputGrid(req.tstep, req.tstart, req.tstop);
  const signals = outputSignals(c);
  const sampler = new GridSampler(grid, signals.map((s) => s.index), c.ws.size);
  const keepSteps = req.keepSteps === true;
  const onAccept = (t: number, ctx: LoadContext): void => {
    sampler.accept(t, ctx.x);
    meter?.sample(t, ctx.x, ctx.state);
  };
  const outcome = runTransient(c, { tstep: req.tstep, tstop: req.tstop, tmax: req.tmax, method: req.method, fromIc: req.fromIc, junctionCmin: JUNCTION_CMIN, keepTrace: keepSteps, onAccept });
  meter?.end();
  if (!outcome.ok && outcome.reason === 'budget') {
    const e = outcome.excess;
    const element = e.source === undefined ? undefined : c.flat.elements.find((el) => el.key === e.source);
    const at = element?.origin ?? origin;
    const by = element ? ` (${element.name}'s waveform${e.budget === 'MAX_TRAN_STEPS' ? ' sets the largest step' : ' has the most corners'})` : '';
    throw new RailcheckError([errorAt(transientFailureCode(outcome), `transient at ${temperature} °C failed ${describeTransientFailure(outcome, (t) => formatSI(t, 's'))}${by}`, at?.pos, at?.lineText, BUDGET_EXPECTED[e.budget])]);
  }
  if (!outcome.ok) {
    const where = describeTransientFailure(outcome, (t) => formatSI(t, 's'));
    const worst = outcome.stragglers.map((s) => `${s.name} = ${formatSI(s.value, '')} (last update ${formatSI(s.update, '')})`).join('; ');
    throw new RailcheckError([errorAt('transient-failed', `transient at ${temperature} °C failed ${where}${worst ? `. Least settled: ${worst}` : ''}`, origin?.pos, origin?.lineText, stepHint(outcome.stragglers.map((st) => st.name)))]);
  }
  const values = sampler.finish();
  const nodes: Record<string, Float64Array> = {};
  const branches: Record<string, Float64Array> = {};
  signals.forEach((s, j) => ((s.branch ? branches : nodes)[s.name] = values[j]!));
  return TRANSIENT_RESULTS.mark({ temperature, method: req.method, fromIc: req.fromIc, stats: outcome.stats, times: grid, nodes, branches, ...(keepSteps ? { trace: TRACES.mark(outcome.trace) } : {}) });
}
