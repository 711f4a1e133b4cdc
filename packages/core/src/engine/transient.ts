/**
 * Transient analysis: implicit integration of the circuit's charges and
 * fluxes with Newton at every time point, warm-started from the last
 * accepted point. Backward Euler (order 1, L-stable) or the trapezoidal
 * rule (order 2, A-stable); after every breakpoint the trapezoidal rule
 * takes one backward-Euler step, the usual cure for its ringing at
 * discontinuities (Nagel 1975). Step size from a local truncation error
 * estimate ({@link SolutionHistory}); every pulse/pwl corner is landed on.
 * Nothing is allocated per step except the stored output point.
 */
import type { SharedStepBudget } from './workspace.js';
import { type IndependentSource, type LoadContext, type WaveformSpec } from '@railcheck/devices';
import type { CompiledCircuit } from './compile.js';
import { DEFAULT_NEWTON, loadAll, newtonSolve, type NewtonOptions } from './newton.js';
import { SolutionHistory } from './history.js';
import { FINAL_GMIN, solveOperatingPoint, stragglers, type Straggler } from './dcop.js';
import { match } from 'ts-pattern';
import { MAX_BREAKPOINTS, MAX_TRACE_VALUES, MAX_TRAN_STEPS } from '../budgets.js';

/** Whether each step's first Newton iterate is predicted (history.ts, predict); a switch for the benchmark's comparison and the `aids-off` test project, on by default. */
export const PREDICTOR = { on: true };

/** Whether a time point's Newton may stop on the contraction test ({@link NewtonOptions.contractionSettles}); a switch for the benchmark's comparison and the `aids-off` test project, on by default. */
export const CONTRACTION = { on: true };

/** Integration method. */
export type IntegrationMethod = 'be' | 'trap';

/** Options of one transient run. */
export interface TransientOptions {
  /** Output interval, s. Also the default pulse edge. */
  readonly tstep: number;
  /** End time, s. */
  readonly tstop: number;
  /** Largest internal step, s (default tstop/50). The step is also held to the shortest sine period / {@link TransientOptions.stepsPerCycle}. */
  readonly tmax?: number | undefined;
  /** Integration method (default 'trap'; see docs/transient.md for the measurement behind it). */
  readonly method?: IntegrationMethod;
  /** Start from the elements' ic= values (0 where absent) instead of the operating point. */
  readonly fromIc?: boolean;
  /**
   * Start from everything discharged (switch-on): every capacitor and
   * junction charge and every inductor flux zero, the `ic=` values ignored,
   * the sources at their t = 0 values; taken like `fromIc`.
   */
  readonly discharged?: boolean;
  /** Relative LTE tolerance (default 1e-3). */
  readonly lteReltol?: number;
  /** Absolute LTE tolerance on voltages, V (default 1e-6). */
  readonly lteVntol?: number;
  /** Least number of steps per period of any sine source (default 100 for trap, 400 for be; docs/transient.md). */
  readonly stepsPerCycle?: number;
  /** Newton tolerances per time point; `maxIterations` is not taken from here: a time point gets at most 50 iterations before its step is cut. `contractionSettles` defaults to on ({@link CONTRACTION}) for the time points, off for a `fromIc`/`discharged` initial point. */
  readonly newton?: NewtonOptions;
  /**
   * A fixed step, s: no truncation-error control, every step this long
   * (shorter only to land on a breakpoint or tstop). For studies of the
   * integration methods themselves; not offered in netlists.
   */
  readonly fixedStep?: number;
  /** More times the stepper must land on, s (e.g. whole cycles of a mains-fed stage). */
  readonly extraBreakpoints?: readonly number[];
  /**
   * Called at every accepted point with its time (s) and the load context
   * (solution in `ctx.x`, charges in `ctx.state`); returning true ends the
   * run there, successfully. For measurements that accumulate as they go.
   */
  readonly onAccept?: (timeSeconds: number, ctx: LoadContext) => boolean | void;
  /** When false, accepted points are not stored (only t = 0 and the last); default true. */
  readonly keepTrace?: boolean;
  /**
   * Start from this solution vector (unknowns + 1 entries, as the
   * workspace's) instead of the operating point; charges are evaluated at
   * it. Used to start a ripple run on its small-signal steady state.
   */
  readonly initialSolution?: Float64Array;
  /**
   * Start from this full state vector (charges and their currents, junction
   * memory) without solving a point at the start: the first step integrates
   * from these charges, with `guess` (unknowns + 1 entries) as the first
   * Newton iterate. The point stored and reported at the start time is the
   * guess. For the one-period map of the periodic-steady-state analysis.
   */
  readonly initialState?: { readonly state: Float64Array; readonly guess: Float64Array };
  /** Time at which the run starts, s (default 0); the run covers [startTime, tstop]. */
  readonly startTime?: number;
  /**
   * Take exactly these times (ascending, after startTime, the last = tstop)
   * as the accepted points, with no truncation-error control: the
   * finite-difference sensitivities of the period map need every perturbed
   * run on the step sequence of the unperturbed one. A time point whose
   * Newton iteration fails is approached in smaller steps.
   */
  readonly replayTimes?: Float64Array;
  /**
   * With `replayTimes`: the solutions of an earlier run on those times, row k
   * (stride: unknowns + 1) at replayTimes[k − 1] and row 0 at startTime. A
   * run that differs from that one by a small change of its start (a
   * perturbed period run of the shooting method) starts each step's Newton
   * from the guide's solution there plus the difference the run had from
   * the guide at the step before, and may take the first update as the
   * solution when it passes the update test (the residual test still
   * decides; {@link NewtonOptions.firstUpdateSettles}).
   */
  readonly replayGuide?: Float64Array;
  /**
   * Capacitance in farads placed across every diode junction whose model has
   * CJO = 0 (default 0). The `.tran` analysis passes JUNCTION_CMIN so that a
   * bridge of default diodes on a floating secondary can be followed; the
   * figure benches pass it too (docs/transient.md, "Minimum junction capacitance").
   */
  readonly junctionCmin?: number;
  /**
   * A step allowance shared by several runs (a figure's trials, MAX_FIGURE_STEPS):
   * every step tried takes one from `left`, and the run fails on the budget
   * `budget` when none is left.
   */
  readonly shared?: SharedStepBudget;
}

export type { SharedStepBudget } from './workspace.js';

/** Counters of one run. */
export interface TransientStats {
  accepted: number;
  /** Steps rejected for truncation error. */
  rejectedLte: number;
  /** Steps rejected because Newton did not converge. */
  rejectedNewton: number;
  newtonIterations: number;
  minStep: number;
  maxStep: number;
}

/** Every accepted time point: times and the full solution vector at each. */
export interface TransientTrace {
  /** Unknowns + 1 (index 0 is ground, always 0). */
  readonly size: number;
  /** Number of accepted points (including t = 0). */
  count: number;
  /** Times, s (first `count` entries valid). */
  times: Float64Array;
  /** Solutions, row-major `count × size`. */
  values: Float64Array;
}

/** A budget (docs/engine.md, "Budgets") that a transient run would exceed, and by how much. */
export interface TransientBudgetExcess {
  /** The budget's name in budgets.ts. */
  readonly budget: 'MAX_TRAN_STEPS' | 'MAX_BREAKPOINTS' | 'MAX_TRACE_VALUES' | 'MAX_FIGURE_STEPS' | 'MAX_BENCH_STEPS';
  /** The budget's value. */
  readonly limit: number;
  /** The count that exceeded it (an estimate made before the run, or the counter when it ran over). */
  readonly value: number;
  /** Key of the source responsible, when one is (the one with most corners, or the sine whose period sets the largest step). */
  readonly source: string | undefined;
  /** What was counted, in words ("time steps", ...). */
  readonly what: string;
}

/** Outcome of a transient run. */
export type TransientOutcome =
  | { readonly ok: true; readonly trace: TransientTrace; readonly stats: TransientStats }
  | { readonly ok: false; readonly reason: 'initial-point' | 'step-too-small'; readonly time: number; readonly stragglers: readonly Straggler[]; readonly stats: TransientStats }
  | { readonly ok: false; readonly reason: 'budget'; readonly time: number; readonly excess: TransientBudgetExcess; readonly stragglers: readonly Straggler[]; readonly stats: TransientStats };

/** A failed transient's cause in words, for a diagnostic: where it failed, or which budget it exceeded. */
export function describeTransientFailure(outcome: Extract<TransientOutcome, { ok: false }>, formatTime: (seconds: number) => string): string {
  return match(outcome)
    .with({ reason: 'initial-point' }, () => 'at its initial point')
    .with({ reason: 'step-too-small' }, (o) => `at t = ${formatTime(o.time)}: the time step fell below its floor`)
    .with({ reason: 'budget' }, ({ time, excess: e }) => `at t = ${formatTime(time)}: it needs ${e.value.toPrecision(3)} ${e.what}, over the budget ${e.budget} = ${e.limit}`)
    .exhaustive();
}

/** Diagnostic code per transient budget. */
const BUDGET_CODES: Record<TransientBudgetExcess['budget'], string> = {
  MAX_TRAN_STEPS: 'budget-tran-steps',
  MAX_BREAKPOINTS: 'budget-breakpoints',
  MAX_TRACE_VALUES: 'budget-tran-trace',
  MAX_FIGURE_STEPS: 'budget-figure-steps',
  MAX_BENCH_STEPS: 'budget-bench-steps',
};

/** The diagnostic code of a failed transient: `transient-failed`, or `budget-…` naming the budget it exceeded. */
export function transientFailureCode(outcome: Extract<TransientOutcome, { ok: false }>): string {
  return outcome.reason === 'budget' ? BUDGET_CODES[outcome.excess.budget] : 'transient-failed';
}

/** Newton iterations allowed per time point before the step is cut. */
const TRAN_ITERATIONS = 50;
/** Loads allowed for junction limiting to reach a given initial solution (a limited load moves a junction by about nVt·ln(1 + Δ/nVt)). */
const INITIAL_LOADS = 500;
/** Step floor as a fraction of tstop (a common practice value, no source). */
const MIN_STEP_FRACTION = 1e-13;
/** Step-size change limits per step (common practice, no source). */
const GROW_LIMIT = 2;
const SHRINK_LIMIT = 0.2;
const SAFETY = 0.9;
/** Floor of an accepted step's error ratio in the predictive controller, as in the implicit Runge–Kutta code published with Hairer & Wanner, Solving ODEs II (from memory). */
const RATIO_FLOOR = 1e-2;

/**
 * Switch of the predictive step-size controller ({@link stepGrowth}), used
 * with backward Euler; the tests that compare with the elementary
 * controller turn it off and back on. On by default.
 */
export const PREDICTIVE_CONTROL = { on: true };

/**
 * Factor by which the step after an accepted step of length `h` (s) grows,
 * from its error ratio (1 = at tolerance) and the method's order p.
 * The elementary controller gives SAFETY·ratio^(−1/(p+1)); with the step
 * before, `hBefore` (s, 0 when there is none of the same order), and its
 * ratio, Gustafsson's predictive controller also extrapolates how the
 * error constant changed between the two steps,
 * (h/hBefore)·SAFETY·ratio^(−1/(p+1))·(ratioBefore/ratio)^(1/(p+1)), and
 * the smaller of the two is taken, as Hairer and Wanner's implicit Runge–Kutta code does (K. Gustafsson,
 * "Control-theoretic techniques for stepsize selection in implicit
 * Runge-Kutta methods", ACM TOMS 20 (1994) 496–517; Hairer & Wanner,
 * Solving Ordinary Differential Equations II, 2nd ed., §IV.8; the form
 * from memory). Where a diode's turn-on or turn-off makes the error
 * constant rise from step to step, the elementary controller keeps growing
 * the step into a rejection; the predictive one sees the rise
 * (docs/transient.md, "Step size", with what was measured and why the
 * trapezoidal rule keeps the elementary one). The result lies in
 * [SHRINK_LIMIT, GROW_LIMIT].
 */
function stepGrowth(ratio: number, order: 1 | 2, h: number, hBefore: number, ratioBefore: number): number {
  if (ratio === 0) return GROW_LIMIT;
  const k = order + 1;
  const elementary = SAFETY * Math.pow(ratio, -1 / k);
  if (!(hBefore > 0)) return Math.min(GROW_LIMIT, elementary);
  const r = Math.max(ratio, RATIO_FLOOR);
  const predictive = (h / hBefore) * SAFETY * Math.pow(r, -1 / k) * Math.pow(Math.max(ratioBefore, RATIO_FLOOR) / r, 1 / k);
  return Math.min(GROW_LIMIT, elementary, Math.max(SHRINK_LIMIT, predictive));
}

/** Stores an accepted point; false (nothing stored) when the trace would exceed MAX_TRACE_VALUES. */
function pushPoint(trace: TransientTrace, t: number, x: Float64Array): boolean {
  if (trace.count === trace.times.length) {
    const rows = Math.min(trace.times.length * 2, Math.floor(MAX_TRACE_VALUES / trace.size));
    if (rows <= trace.count) return false;
    const times = new Float64Array(rows);
    times.set(trace.times);
    const values = new Float64Array(rows * trace.size);
    values.set(trace.values);
    trace.times = times;
    trace.values = values;
  }
  trace.times[trace.count] = t;
  trace.values.set(x, trace.count * trace.size);
  trace.count++;
  return true;
}

/**
 * Counts the sources' corners in (tstart, tstop] without generating them;
 * the budget excess when they are more than MAX_BREAKPOINTS, naming the
 * source with the most.
 */
function breakpointExcess(sources: ReadonlyMap<string, IndependentSource>, tstart: number, tstop: number, extra: number): TransientBudgetExcess | undefined {
  let total = extra;
  let worst: { key: string; count: number } | undefined;
  for (const [key, s] of sources) {
    const n = s.cornerCount(tstart, tstop);
    total += n;
    if (n > 0 && (!worst || n > worst.count)) worst = { key, count: n };
  }
  return total <= MAX_BREAKPOINTS ? undefined : { budget: 'MAX_BREAKPOINTS', limit: MAX_BREAKPOINTS, value: total, source: worst?.key, what: 'source corners (breakpoints)' };
}

function collectBreakpoints(sources: Iterable<IndependentSource>, tstart: number, tstop: number, extra: readonly number[]): Float64Array {
  const all: number[] = [...extra];
  for (const s of sources) s.breakpoints(tstart, tstop, all, MAX_BREAKPOINTS + extra.length);
  all.push(tstop);
  all.sort((a, b) => a - b);
  const out: number[] = [];
  const gap = tstop * 1e-12;
  for (const t of all) if (t > tstart + gap && t <= tstop && (out.length === 0 || t - out[out.length - 1]! > gap)) out.push(t);
  return Float64Array.from(out);
}

function sinePeriod(w: WaveformSpec | undefined): number {
  if (!w) return Infinity;
  if ((w.kind === 'sin' || w.kind === 'modulated') && w.freq > 0) return 1 / w.freq;
  if (w.kind === 'sum') return Math.min(...w.parts.map(sinePeriod));
  return Infinity;
}

/** The shortest sine period of the sources, s, and the key of the source that has it. */
function smallestSinePeriod(sources: ReadonlyMap<string, IndependentSource>): { period: number; source: string | undefined } {
  let period = Infinity;
  let source: string | undefined;
  for (const [key, s] of sources) {
    const p = sinePeriod(s.waveform);
    if (p < period) [period, source] = [p, key];
  }
  return { period, source };
}

/**
 * Runs a transient from 0 to `tstop`. The circuit's temperature and source
 * values are taken as they are set. Returns every accepted point.
 */
export function runTransient(c: CompiledCircuit, opts: TransientOptions): TransientOutcome {
  const method = opts.method ?? 'trap';
  const newton: NewtonOptions = { ...(opts.newton ?? DEFAULT_NEWTON), maxIterations: TRAN_ITERATIONS, contractionSettles: opts.newton?.contractionSettles ?? CONTRACTION.on };
  const reltol = opts.lteReltol ?? 1e-3;
  const vntol = opts.lteVntol ?? 1e-6;
  const stepsPerCycle = opts.stepsPerCycle ?? (method === 'trap' ? 100 : 400);
  const { ws } = c;
  const { ctx, x } = ws;
  const [state, statePrev] = [ws.states[0]!, ws.states[1]!];
  ctx.state = state;
  ctx.statePrev = statePrev;
  const stats: TransientStats = { accepted: 0, rejectedLte: 0, rejectedNewton: 0, newtonIterations: 0, minStep: Infinity, maxStep: 0 };
  const overBudget = (time: number, excess: TransientBudgetExcess): TransientOutcome => ({ ok: false, reason: 'budget', time, excess, stragglers: [], stats });
  const sources = [...c.sources.values()];
  const savedEdges = sources.map((s) => s.defaultEdge);
  for (const s of sources) s.defaultEdge = opts.tstep;
  try {
    const tstop = opts.tstop;
    const t0 = opts.startTime ?? 0;
    const sine = smallestSinePeriod(c.sources);
    const hMax = Math.min(opts.tmax ?? (tstop - t0) / 50, sine.period / stepsPerCycle);
    const hMin = tstop * MIN_STEP_FRACTION;
    // Budgets, before anything is solved or allocated: the corners to land on, and the fewest steps
    // the run can take (its span over the largest step, or the replayed times, or one per corner).
    const extra = opts.extraBreakpoints ?? [];
    const corners = breakpointExcess(c.sources, t0, tstop, extra.length);
    if (corners) return overBudget(t0, corners);
    const fewest = opts.replayTimes ? opts.replayTimes.length : (tstop - t0) / (opts.fixedStep ?? hMax);
    // A largest step that is not positive (a sag edge of 0) is left to the loop, which reports it as a step below its floor.
    if (hMax > 0 && !(fewest <= MAX_TRAN_STEPS)) {
      const bySine = opts.fixedStep === undefined && !opts.replayTimes && sine.period / stepsPerCycle < (opts.tmax ?? Infinity);
      return overBudget(t0, { budget: 'MAX_TRAN_STEPS', limit: MAX_TRAN_STEPS, value: fewest, source: bySine ? sine.source : undefined, what: 'time steps at the least (the run over its largest step)' });
    }
    const isVoltage = Uint8Array.from(c.unknowns, (u) => (u.kind === 'branch' ? 0 : 1));
    const trace: TransientTrace = { size: ws.size, count: 0, times: new Float64Array(1024), values: new Float64Array(1024 * ws.size) };
    const fail = (reason: 'initial-point' | 'step-too-small', time: number): TransientOutcome => ({ ok: false, reason, time, stragglers: stragglers(c), stats });

    // Initial point.
    ctx.gmin = FINAL_GMIN;
    ctx.sourceScale = 1;
    ctx.junctionCmin = opts.junctionCmin ?? 0;
    if (opts.fromIc || opts.discharged) {
      // A backward-Euler step of vanishing length from the ic= state (or from zero charge): capacitors
      // act as voltage sources at their ic (0 if absent or discharged), inductors as current sources.
      x.fill(0);
      state.fill(0);
      if (!opts.discharged) for (const d of c.devices) d.seedInitialCondition?.(state);
      statePrev.set(state);
      ctx.mode = 'tran';
      ctx.time = 0;
      ctx.coefficients.a0 = 1 / (hMin * 1e-3);
      ctx.coefficients.a1 = 0;
      ctx.initJunctions = true;
      // The initial point, like an operating point, on the update test alone.
      const r = newtonSolve(c, { ...newton, maxIterations: DEFAULT_NEWTON.maxIterations, contractionSettles: false });
      stats.newtonIterations += r.iterations;
      if (!r.converged) return fail('initial-point', 0);
      state.set(statePrev);
    } else if (opts.initialState) {
      x.set(opts.initialState.guess);
      x[0] = 0;
      state.set(opts.initialState.state);
      statePrev.set(opts.initialState.state);
      ctx.mode = 'tran';
      ctx.time = t0;
      ctx.initJunctions = false;
    } else if (opts.initialSolution) {
      x.set(opts.initialSolution);
      x[0] = 0;
      ctx.mode = 'tran';
      ctx.time = t0;
      ctx.coefficients.a0 = 0;
      ctx.coefficients.a1 = 0;
      ctx.initJunctions = false;
      // With zero coefficients a load only records every charge at the given solution. Junctions
      // limit their voltage step from the last one they saw (kept in the state), so a solution far
      // from it takes several loads before the charges are those of the solution itself.
      for (let k = 0; k < INITIAL_LOADS; k++) {
        loadAll(c);
        if (!ctx.limited) break;
      }
      statePrev.set(state);
    } else {
      const op = solveOperatingPoint(c);
      if (!op.ok) return fail('initial-point', 0);
      stats.newtonIterations += op.iterations;
      statePrev.set(state);
    }
    ctx.mode = 'tran';
    pushPoint(trace, t0, x);
    opts.onAccept?.(t0, ctx);
    const history = new SolutionHistory(ws.size, 3);
    history.reset(t0, x);
    const breakpoints = collectBreakpoints(sources, t0, tstop, extra);
    const keep = opts.keepTrace ?? true;
    const replay = opts.replayTimes;
    const guide = replay && opts.replayGuide && opts.replayGuide.length === (replay.length + 1) * ws.size ? opts.replayGuide : undefined;
    const guidedNewton: NewtonOptions = guide ? { ...newton, firstUpdateSettles: true } : newton;
    // Row of the guide at the present accepted time (0 at the start), or −1 when t is not on the guide.
    let guideRow = guide ? 0 : -1;
    let nextReplay = 0;
    let nextBreak = 0;
    let t = t0;
    const fixed = opts.fixedStep;
    let h = replay ? replay[0]! - t0 : (fixed ?? Math.min(hMax, opts.tstep, (breakpoints[0] ?? tstop) - t0) / 100);
    let firstAfterBreak = true;
    // The last accepted step (s) and its error ratio, for the predictive controller (stepGrowth); 0 when there is none.
    let hAccepted = 0;
    let ratioAccepted = 0;
    // Every step tried, accepted or rejected, counts against MAX_TRAN_STEPS: no input keeps the loop going.
    let tried = 0;
    const shared = opts.shared;
    const bench = c.ws.stepAllowance;
    const traceFull = (): TransientOutcome => overBudget(t, { budget: 'MAX_TRACE_VALUES', limit: MAX_TRACE_VALUES, value: (trace.count + 1) * trace.size, what: 'stored values (accepted points × unknowns)', source: undefined });
    while (t < tstop) {
      if (++tried > MAX_TRAN_STEPS) return overBudget(t, { budget: 'MAX_TRAN_STEPS', limit: MAX_TRAN_STEPS, value: tried, source: undefined, what: 'time steps or more (accepted and rejected)' });
      if (shared && --shared.left < 0) return overBudget(t, { budget: shared.budget, limit: shared.limit, value: shared.limit + 1, source: undefined, what: 'time steps or more over its runs together' });
      if (bench && --bench.left < 0) return overBudget(t, { budget: bench.budget, limit: bench.limit, value: bench.limit + 1, source: undefined, what: 'time steps or more over all the figures of the stage together' });
      // A step that is not a number, or not positive, would never reach tstop.
      if (!(h > 0)) return fail('step-too-small', t);
      const target = breakpoints[nextBreak]!;
      let tNew = t + h;
      if (replay && tNew >= replay[nextReplay]! - hMin) tNew = replay[nextReplay]!;
      let landing = false;
      if (tNew >= target - (fixed === undefined ? hMin : fixed * 1e-6)) {
        tNew = target;
        landing = true;
      }
      const hStep = tNew - t;
      const order: 1 | 2 = method === 'be' || firstAfterBreak ? 1 : 2;
      ctx.coefficients.a0 = order === 1 ? 1 / hStep : 2 / hStep;
      ctx.coefficients.a1 = order === 1 ? 0 : -1;
      ctx.time = tNew;
      ctx.initJunctions = false;
      // Newton starts from the line through the last two accepted points (a predictor), not from the last point alone.
      const guided = guideRow >= 0 && tNew === replay![nextReplay]!;
      if (guided) {
        // The guide's solution at tNew plus this run's difference from the guide at t.
        const size = ws.size;
        const at = (nextReplay + 1) * size;
        const before = guideRow * size;
        for (let k = 1; k < size; k++) x[k] = guide![at + k]! + (x[k]! - guide![before + k]!);
      } else if (!firstAfterBreak && PREDICTOR.on) history.predict(tNew, x);
      const r = newtonSolve(c, guided ? guidedNewton : newton);
      stats.newtonIterations += r.iterations;
      if (!r.converged) {
        stats.rejectedNewton++;
        x.set(history.last);
        state.set(statePrev);
        h = hStep / 8;
        if (h < hMin) return fail('step-too-small', tNew);
        continue;
      }
      const ratio = fixed === undefined && !replay ? history.errorRatio(tNew, x, order, isVoltage, reltol, vntol) : 0;
      if (ratio > 1 && hStep > hMin * 16) {
        stats.rejectedLte++;
        x.set(history.last);
        state.set(statePrev);
        h = hStep * Math.max(SHRINK_LIMIT, SAFETY * Math.pow(ratio, -1 / (order + 1)));
        continue;
      }
      // Accept.
      t = tNew;
      stats.accepted++;
      stats.minStep = Math.min(stats.minStep, hStep);
      stats.maxStep = Math.max(stats.maxStep, hStep);
      statePrev.set(state);
      if ((keep || t >= tstop) && !pushPoint(trace, t, x)) return traceFull();
      if (opts.onAccept?.(t, ctx) === true) {
        if (!keep && t < tstop && !pushPoint(trace, t, x)) return traceFull();
        break;
      }
      // The predictive controller for backward Euler only (every step of order 1, so the step before is always of the
      // same order): with the trapezoidal rule it moved the errors against the references both ways (docs/transient.md, "Step size").
      const predictive = PREDICTIVE_CONTROL.on && method === 'be';
      const grow = stepGrowth(ratio, order, hStep, predictive ? hAccepted : 0, ratioAccepted);
      hAccepted = hStep;
      ratioAccepted = ratio;
      h = fixed ?? Math.min(hMax, hStep * grow);
      if (landing && fixed === undefined) {
        nextBreak++;
        history.reset(t, x);
        firstAfterBreak = true;
        h = Math.min(h, opts.tstep / 10, hMax);
      } else {
        if (landing) nextBreak++;
        history.accept(t, x);
        firstAfterBreak = false;
      }
      if (replay) {
        if (guide) guideRow = t === replay[nextReplay]! ? nextReplay + 1 : -1;
        while (nextReplay < replay.length - 1 && replay[nextReplay]! <= t + hMin) nextReplay++;
        h = replay[nextReplay]! - t;
      }
    }
    return { ok: true, trace, stats };
  } finally {
    sources.forEach((s, i) => (s.defaultEdge = savedEdges[i]!));
    ctx.mode = 'dc';
    ctx.junctionCmin = 0;
    ctx.time = 0;
    ctx.coefficients.a0 = 0;
    ctx.coefficients.a1 = 0;
  }
}
