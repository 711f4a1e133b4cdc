/**
 * Periodic steady state of a circuit whose sources repeat with one period,
 * by the shooting method (Aprille and Trick, "Steady-state analysis of
 * nonlinear circuits with periodic inputs", Proc. IEEE 60(1), 1972): Newton
 * on the one-period map P of the circuit's state s (capacitor and junction
 * charges, inductor fluxes), solving P(s) − s = 0. The sensitivity
 * Φ = ∂P/∂s (the monodromy matrix) is found by finite differences of the
 * state, each perturbed period run on exactly the step sequence of the
 * unperturbed one, so that the differences see the perturbation and not a
 * changed discretisation. When shooting does not converge, whole cycles are
 * simulated until the state's change over a cycle, and the change still to
 * come extrapolated from its geometric decay, are both within tolerance.
 *
 * Settled (both methods, docs/transient.md): for every state entry j, with
 * r_j its range over the cycle and m_j its largest magnitude, the change
 * over one period is at most tol_j = SETTLE_RATIO·r_j + STATE_RELTOL·m_j,
 * and the remaining distance to the fixed point at most SETTLE_RATIO·r_j +
 * DISTANCE_RELTOL·m_j. The first term protects the ripple (the cycle's
 * peak-to-peak is then right to 0.1 %), the second the mean (to 1e-6 of the
 * state's own size). A rule such as "two cycles' means
 * agree within 1 %" protects neither: a filter settling with a time
 * constant of a hundred periods changes its mean by under 1 % per cycle
 * while still far from steady.
 */
import { JUNCTION_CMIN } from '@railcheck/devices';
import { DEFAULT_NEWTON, type NewtonOptions } from '../engine/newton.js';
import { createLuWorkspace, luFactor, luSolve } from '../engine/lu.js';
import { runTransient, type TransientOptions, type TransientOutcome } from '../engine/transient.js';

/** A failed transient run. */
type TransientFailure = Extract<TransientOutcome, { ok: false }>;
import type { CompiledCircuit } from '../engine/compile.js';
import type { LoadContext } from '@railcheck/devices';

/** Ripple share of the settling tolerance: the state's change per period stays under 0.1 % of its range over the cycle. */
export const SETTLE_RATIO = 1e-3;
/** Size share of the settling tolerance: 1e-7 of the state's largest magnitude. */
export const STATE_RELTOL = 1e-7;
/**
 * Size share of the tolerance on the distance still to go, (I − Φ)⁻¹·F:
 * 1e-6 of the state's largest magnitude. Coarser than the change per period
 * because (I − Φ)⁻¹ multiplies the period map's noise (the adaptive step
 * sequence differs from run to run; measured at about 2e-7 of the state on a
 * filter whose slowest mode decays by 0.5 % a period) by 1/(1 − λ).
 */
export const DISTANCE_RELTOL = 1e-6;
/**
 * Newton tolerances inside the period runs: the analysis default. Tighter
 * ones were tried (reltol 1e-8, vntol 1e-11): they bought nothing, since the
 * floor of the period map's noise is the change of the adaptive step
 * sequence between runs, and on a floating bridge they stalled the stepper.
 */
const PERIOD_NEWTON: NewtonOptions = DEFAULT_NEWTON;
/** Relative size of a finite-difference perturbation of a state entry (of its largest magnitude), with a floor of its range. */
const PERTURBATION = 1e-5;
/**
 * Whether the perturbed period runs of the sensitivity are guided by the
 * unperturbed run's solutions (TransientOptions.replayGuide); switched off
 * only by the tests that compare both ways.
 */
export const GUIDED: { on: boolean } = { on: true };
/** Largest number of step halvings of one Newton correction (backtracking) before taking it anyway. */
const MAX_BACKTRACKS = 4;

/** How the periodic steady state was found. */
export type SteadyStateMethod = 'shooting' | 'cycles';

/** Options of {@link findPeriodicSteadyState}. */
export interface SteadyStateOptions {
  /** Period of every source, s. */
  readonly period: number;
  /** Time origin of the cycles, s (default 0); every period run covers [start + k·period, start + (k+1)·period]. */
  readonly start?: number;
  /** Solution at `start` to begin from (default: the operating point of the sources at `start`). */
  readonly initialSolution?: Float64Array;
  /** Transient settings of every period run (method, truncation-error tolerances, steps per cycle, extra breakpoints). */
  readonly transient?: Partial<Pick<TransientOptions, 'method' | 'lteReltol' | 'lteVntol' | 'stepsPerCycle' | 'tmax' | 'extraBreakpoints'>>;
  /** Plain cycles simulated before shooting starts (default 2: a rectifier's reservoir charges in the first). */
  readonly warmupCycles?: number;
  /** Newton iterations of the shooting method before falling back to cycles (default 12). */
  readonly maxIterations?: number;
  /** Period runs the fallback may simulate (default 4000). */
  readonly maxCycles?: number;
  /** Use whole-cycle simulation only (for comparisons; default false). */
  readonly cyclesOnly?: boolean;
  /**
   * Called at every accepted point of the settled cycle (the last run, from
   * the steady solution at `steady.start` to one period later), with the time
   * in seconds and the load context (solution in `ctx.x`, charges in `ctx.state`).
   */
  readonly onCycle?: (timeSeconds: number, ctx: LoadContext) => void;
}

/** A periodic steady state. */
export interface SteadyState {
  readonly method: SteadyStateMethod;
  /** Newton iterations of the shooting method (0 for cycles). */
  readonly iterations: number;
  /** Periods simulated in all: warm-up, unperturbed and perturbed runs, the settled cycle. */
  readonly periods: number;
  /**
   * Largest ratio, over the state entries, of the change over the settled
   * cycle to that entry's tolerance (≤ 1 when settled; see the module note).
   */
  readonly residual: number;
  /** Number of state entries (charges and fluxes) that were solved for. */
  readonly states: number;
  /** Start time of the settled cycle, s. */
  readonly start: number;
  /** Solution at `start` (unknowns + 1 entries, consistent with the state). */
  readonly solution: Float64Array;
  /** The full state vector at `start`. */
  readonly state: Float64Array;
}

/** Outcome of {@link findPeriodicSteadyState}. */
export type SteadyStateOutcome =
  | { readonly ok: true; readonly steady: SteadyState }
  | { readonly ok: false; readonly reason: 'transient-failed'; readonly time: number; /** The period run's own failure (a step at its floor, a budget). */ readonly failure: TransientFailure }
  | {
      readonly ok: false;
      readonly reason: 'not-settled';
      readonly periods: number;
      readonly residual: number;
      /** The element whose charge or flux was furthest from settling (e.g. a capacitor with no discharge path). */
      readonly slowest: string | undefined;
      /**
       * Why the whole-cycle fallback stopped: its cycle budget ran out, the
       * change per cycle did not decay over {@link STALLED_WINDOWS} windows of
       * {@link DECAY_WINDOW} cycles, or its decay projected settling far
       * beyond the budget (`projected` periods in all).
       */
      readonly stop: { readonly kind: 'budget' } | { readonly kind: 'not-decaying' } | { readonly kind: 'too-slow'; readonly projected: number };
    };

/**
 * Cycles per window of the whole-cycle fallback's decay watch: every
 * window, the worst change per cycle (against its tolerance) is compared
 * with the one a window earlier. A change that has not fallen over three
 * windows in a row is not settling (numerical noise or a state with no
 * restoring path); a change falling by a factor ρ per cycle needs
 * ln(ratio)/(−ln ρ) more cycles, and one that cannot reach the tolerance
 * within ten times the budget is given up at once (geometric decay of a linear
 * system's slowest mode; common practice, no source).
 */
export const DECAY_WINDOW = 25;
/** Windows in a row without decay after which the fallback gives up. */
export const STALLED_WINDOWS = 3;
/** The fallback gives up as too slow when its projection exceeds the cycle budget by this factor. */
const TOO_SLOW_MARGIN = 10;

/** Offsets of every stored charge and flux in the state vector, and the name of the element each belongs to. */
function chargeSlots(c: CompiledCircuit): { slots: Int32Array; owners: string[] } {
  const out: number[] = [];
  const owners: string[] = [];
  for (const d of c.devices) {
    for (const s of d.chargeSlots?.() ?? []) {
      out.push(s);
      owners.push(d.name);
    }
  }
  return { slots: Int32Array.from(out), owners };
}

/** One period run: the state and solution at its end, the extent of every slot over it, and (when asked) its accepted times. */
interface PeriodRun {
  readonly endState: Float64Array;
  readonly endX: Float64Array;
  readonly qMin: Float64Array;
  readonly qMax: Float64Array;
  readonly times: Float64Array | undefined;
  /** With `times`: the solution at the run's start and at each of its accepted times (rows of unknowns + 1), the guide of perturbed runs on them. */
  readonly guide: Float64Array | undefined;
}

type RunStart = { readonly solution: Float64Array } | { readonly state: Float64Array; readonly guess: Float64Array } | undefined;

class PeriodRunner {
  readonly slots: Int32Array;
  readonly owners: readonly string[];
  periods = 0;
  private readonly times: number[] = [];
  private readonly solutions: number[] = [];

  constructor(
    private readonly c: CompiledCircuit,
    private readonly period: number,
    private readonly opts: SteadyStateOptions,
  ) {
    const found = chargeSlots(c);
    this.slots = found.slots;
    this.owners = found.owners;
  }

  /** Runs `count` periods from `t0`; returns undefined (and the failure time) when the transient fails. */
  run(t0: number, from: RunStart, count: number, record: boolean, replay?: { readonly times: Float64Array; readonly guide: Float64Array | undefined }, onPoint?: (t: number, ctx: LoadContext) => void): PeriodRun | { failedAt: number; failure: TransientFailure } {
    const { c, period, slots } = this;
    const m = slots.length;
    const qMin = new Float64Array(m).fill(Infinity);
    const qMax = new Float64Array(m).fill(-Infinity);
    const tEnd = t0 + count * period;
    this.times.length = 0;
    this.solutions.length = 0;
    const boundaries: number[] = [];
    for (let k = 1; k <= count; k++) boundaries.push(t0 + k * period);
    const lastStart = tEnd - period * (1 + 1e-9);
    const base = this.opts.transient ?? {};
    const outcome = runTransient(c, {
      tstep: period / 50,
      tstop: tEnd,
      startTime: t0,
      stepsPerCycle: base.stepsPerCycle ?? 200,
      ...(base.method ? { method: base.method } : {}),
      ...(base.lteReltol !== undefined ? { lteReltol: base.lteReltol } : {}),
      ...(base.lteVntol !== undefined ? { lteVntol: base.lteVntol } : {}),
      ...(base.tmax !== undefined ? { tmax: base.tmax } : {}),
      newton: PERIOD_NEWTON,
      junctionCmin: JUNCTION_CMIN,
      extraBreakpoints: [...(base.extraBreakpoints ?? []).filter((t) => t > t0 && t < tEnd), ...boundaries],
      keepTrace: false,
      ...(from === undefined ? {} : 'solution' in from ? { initialSolution: from.solution } : { initialState: from }),
      ...(replay ? { replayTimes: replay.times, ...(replay.guide ? { replayGuide: replay.guide } : {}) } : {}),
      onAccept: (t, ctx) => {
        if (record) {
          if (t > t0) this.times.push(t);
          const x = ctx.x;
          for (let k = 0; k < x.length; k++) this.solutions.push(x[k]!);
        }
        if (t >= lastStart) {
          const st = ctx.state;
          for (let k = 0; k < m; k++) {
            const q = st[slots[k]!]!;
            if (q < qMin[k]!) qMin[k] = q;
            if (q > qMax[k]!) qMax[k] = q;
          }
        }
        onPoint?.(t, ctx);
      },
    });
    this.periods += count;
    if (!outcome.ok) return { failedAt: outcome.time, failure: outcome };
    return {
      endState: new Float64Array(c.ws.states[0]!),
      endX: new Float64Array(c.ws.x),
      qMin,
      qMax,
      times: record ? Float64Array.from(this.times) : undefined,
      guide: record ? Float64Array.from(this.solutions) : undefined,
    };
  }

  /** Tolerance of each slot from a run's extent (module note). */
  tolerances(r: PeriodRun, sizeShare = STATE_RELTOL): Float64Array {
    const m = this.slots.length;
    const tol = new Float64Array(m);
    for (let k = 0; k < m; k++) {
      const range = r.qMax[k]! - r.qMin[k]!;
      const size = Math.max(Math.abs(r.qMax[k]!), Math.abs(r.qMin[k]!));
      tol[k] = SETTLE_RATIO * range + sizeShare * size + 1e-300;
    }
    return tol;
  }

  /** Change of every slot over a run that started from `start`. */
  change(start: Float64Array, r: PeriodRun): Float64Array {
    const m = this.slots.length;
    const f = new Float64Array(m);
    for (let k = 0; k < m; k++) f[k] = r.endState[this.slots[k]!]! - start[this.slots[k]!]!;
    return f;
  }
}

function worstRatio(v: Float64Array, tol: Float64Array): number {
  let worst = 0;
  for (let k = 0; k < v.length; k++) worst = Math.max(worst, Math.abs(v[k]!) / tol[k]!);
  return worst;
}

/** The state vector `base` with its charge slots set to base's plus `step`·`scale`. */
function stepped(base: Float64Array, slots: Int32Array, step: Float64Array, scale: number): Float64Array {
  const s = new Float64Array(base);
  for (let k = 0; k < slots.length; k++) s[slots[k]!] = s[slots[k]!]! + scale * step[k]!;
  return s;
}

/**
 * Finds the periodic steady state by shooting, falling back to whole
 * cycles, and runs the settled cycle once more for `onCycle`. The sources
 * must repeat with `period` from `start` on (a sine, or a sine on a DC value).
 */
export function findPeriodicSteadyState(c: CompiledCircuit, opts: SteadyStateOptions): SteadyStateOutcome {
  const period = opts.period;
  const runner = new PeriodRunner(c, period, opts);
  const slots = runner.slots;
  const m = slots.length;
  const warm = Math.max(1, opts.warmupCycles ?? 2);
  const t0 = (opts.start ?? 0) + warm * period;
  const first = runner.run(opts.start ?? 0, opts.initialSolution ? { solution: opts.initialSolution } : undefined, warm, false);
  if ('failedAt' in first) return { ok: false, reason: 'transient-failed', time: first.failedAt, failure: first.failure };

  let state = first.endState;
  let guess = first.endX;
  let method: SteadyStateMethod = 'shooting';
  let iterations = 0;
  let settled: { state: Float64Array; guess: Float64Array } | undefined;

  if (!opts.cyclesOnly && m > 0) {
    const lu = createLuWorkspace(m);
    const size = lu.size;
    const rhs = new Float64Array(size);
    const delta = new Float64Array(size);
    const correction = new Float64Array(m);
    let haveJacobian = false;
    const maxIterations = opts.maxIterations ?? 12;
    let base = runner.run(t0, { state, guess }, 1, true);
    for (let iter = 0; !('failedAt' in base); iter++) {
      const tol = runner.tolerances(base);
      const f = runner.change(state, base);
      const ratio = worstRatio(f, tol);
      if (haveJacobian) {
        // Distance still to go by the last sensitivity: (I − Φ)⁻¹·F.
        for (let k = 0; k < m; k++) rhs[k + 1] = -f[k]!;
        luSolve(lu, rhs, delta);
        for (let k = 0; k < m; k++) correction[k] = delta[k + 1]!;
        if (ratio <= 1 && worstRatio(correction, runner.tolerances(base, DISTANCE_RELTOL)) <= 1) {
          settled = { state: base.endState, guess: base.endX };
          iterations = iter;
          break;
        }
      } else if (ratio <= 1e-3) {
        // Steady already (a linear stage started on its small-signal steady state).
        settled = { state: base.endState, guess: base.endX };
        iterations = iter;
        break;
      }
      if (iter === maxIterations) break;
      // Sensitivity Φ by finite differences, every perturbed run on the step sequence of `base`.
      const times = base.times!;
      const m1 = m + 1;
      lu.matrix.fill(0);
      let failed = false;
      for (let j = 0; j < m; j++) {
        const range = base.qMax[j]! - base.qMin[j]!;
        const size = Math.max(Math.abs(base.qMax[j]!), Math.abs(base.qMin[j]!));
        const h = Math.max(PERTURBATION * size, SETTLE_RATIO * range, 1e-30);
        const unit = new Float64Array(m);
        unit[j] = h;
        const r = runner.run(t0, { state: stepped(state, slots, unit, 1), guess }, 1, false, { times, guide: GUIDED.on ? base.guide : undefined });
        if ('failedAt' in r) {
          failed = true;
          break;
        }
        for (let i = 0; i < m; i++) {
          const dEnd = (r.endState[slots[i]!]! - base.endState[slots[i]!]!) / h;
          lu.matrix[(i + 1) * m1 + (j + 1)] = dEnd - (i === j ? 1 : 0);
        }
      }
      if (failed || luFactor(lu) !== 0) break;
      haveJacobian = true;
      for (let k = 0; k < m; k++) rhs[k + 1] = -f[k]!;
      luSolve(lu, rhs, delta);
      for (let k = 0; k < m; k++) correction[k] = delta[k + 1]!;
      // The Newton step, halved while the residual it leads to grows more than twofold.
      let scale = 1;
      let next = stepped(state, slots, correction, scale);
      let trial = runner.run(t0, { state: next, guess: base.endX }, 1, true);
      for (let b = 0; b < MAX_BACKTRACKS; b++) {
        if (!('failedAt' in trial) && worstRatio(runner.change(next, trial), runner.tolerances(trial)) <= 2 * ratio) break;
        scale /= 2;
        next = stepped(state, slots, correction, scale);
        trial = runner.run(t0, { state: next, guess: base.endX }, 1, true);
      }
      state = next;
      guess = base.endX;
      base = trial;
      iterations = iter + 1;
    }
  }

  if (!settled) {
    // Fallback: whole cycles, settled when the change per cycle and the change still to come are within tolerance.
    method = 'cycles';
    iterations = 0;
    const budget = opts.maxCycles ?? 4000;
    let previous: Float64Array | undefined;
    let residual = Infinity;
    let slowest: string | undefined;
    let stop: { readonly kind: 'budget' } | { readonly kind: 'not-decaying' } | { readonly kind: 'too-slow'; readonly projected: number } = { kind: 'budget' };
    const changeRatios: number[] = [];
    let stalled = 0;
    for (let k = 0; k < budget; k++) {
      const r = runner.run(t0, { state, guess }, 1, false);
      if ('failedAt' in r) return { ok: false, reason: 'transient-failed', time: r.failedAt, failure: r.failure };
      const tol = runner.tolerances(r);
      const tolDistance = runner.tolerances(r, DISTANCE_RELTOL);
      const f = runner.change(state, r);
      let worst = 0;
      let worstChange = 0;
      for (let j = 0; j < m; j++) {
        const now = Math.abs(f[j]!);
        const rho = previous ? now / Math.max(Math.abs(previous[j]!), 1e-300) : 1;
        const toCome = now <= 1e-2 * tol[j]! ? 0 : rho < 1 ? (now * rho) / (1 - rho) : Infinity;
        worstChange = Math.max(worstChange, now / tol[j]!);
        const ratio = Math.max(now / tol[j]!, toCome / tolDistance[j]!);
        if (ratio > worst) {
          worst = ratio;
          slowest = runner.owners[j];
        }
      }
      residual = worst;
      previous = f;
      state = r.endState;
      guess = r.endX;
      if (worst <= 1) {
        settled = { state, guess };
        break;
      }
      changeRatios.push(worstChange);
      const n = changeRatios.length;
      if (n > DECAY_WINDOW && n % DECAY_WINDOW === 0) {
        const then = changeRatios[n - 1 - DECAY_WINDOW]!;
        const nowRatio = changeRatios[n - 1]!;
        if (!(nowRatio < then)) {
          if (++stalled >= STALLED_WINDOWS) {
            stop = { kind: 'not-decaying' };
            break;
          }
        } else {
          stalled = 0;
          const rate = Math.pow(nowRatio / then, 1 / DECAY_WINDOW);
          const needed = nowRatio > 1 ? Math.log(nowRatio) / -Math.log(rate) : 0;
          // Early cycles charge nonlinearly (diodes at their current limit), so the projection is trusted only after a few windows and with a wide margin.
          if (n >= 4 * DECAY_WINDOW && k + 1 + needed > TOO_SLOW_MARGIN * budget) {
            stop = { kind: 'too-slow', projected: Math.ceil(runner.periods + needed) };
            break;
          }
        }
      }
    }
    if (!settled) return { ok: false, reason: 'not-settled', periods: runner.periods, residual, slowest, stop };
  }

  // The settled cycle, started from the consistent solution at its start.
  const final = runner.run(t0, { solution: settled.guess }, 1, false, undefined, opts.onCycle);
  if ('failedAt' in final) return { ok: false, reason: 'transient-failed', time: final.failedAt, failure: final.failure };
  const residual = m === 0 ? 0 : worstRatio(runner.change(settled.state, final), runner.tolerances(final));
  return {
    ok: true,
    steady: { method, iterations, periods: runner.periods, residual, states: m, start: t0, solution: settled.guess, state: settled.state },
  };
}
