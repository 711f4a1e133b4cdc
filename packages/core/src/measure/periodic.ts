/**
 * Cycle statistics at periodic steady state, for the figures: the steady
 * state itself is found by the shooting method with a whole-cycle fallback
 * (analysis/steady-state.ts; Aprille and Trick, Proc. IEEE 60(1), 1972),
 * and this module watches the settled cycle through probes, turning it
 * into the mean, least and greatest value of each, and says how the state
 * was found. A failure is a located RailcheckError.
 */
import { describeTransientFailure, transientFailureCode } from '../engine/transient.js';
import type { LoadContext } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import type { CardOrigin } from '../netlist/ast.js';
import type { CompiledCircuit } from '../engine/compile.js';
import { match } from 'ts-pattern';
import { DECAY_WINDOW, STALLED_WINDOWS, findPeriodicSteadyState, type SteadyStateMethod } from '../analysis/steady-state.js';
import { formatSI } from '../units.js';
import { argumentError, isRecord } from '../arguments.js';

/** Statistics of one signal over one cycle (trapezoidal mean over accepted points). */
export interface CycleStats {
  min: number;
  max: number;
  mean: number;
}

/** Something to watch: a function of the solution vector (e.g. Vout = x[out] − x[ref]). */
export type Probe = (x: Float64Array) => number;

/** How a periodic steady state was found, for reports (analysis/steady-state.ts). */
export interface SteadyInfo {
  /** `shooting` (Newton on the period map) or `cycles` (whole-cycle simulation, the fallback). */
  readonly method: SteadyStateMethod;
  /** Newton iterations of the shooting method (0 for cycles). */
  readonly iterations: number;
  /** Source periods simulated in all. */
  readonly periods: number;
  /** Largest change of a state entry over the settled cycle, as a ratio of its tolerance (≤ 1: settled). */
  readonly residual: number;
}

/** Options of {@link settleCycle}. */
export interface PeriodicOptions {
  /** Cycle length, s. */
  readonly period: number;
  /** Signals to watch over the settled cycle. */
  readonly probes: readonly Probe[];
  /** Called at every accepted point of the settled cycle. */
  readonly onPoint?: (timeSeconds: number, ctx: LoadContext) => void;
  /** Time origin of the cycles, s (default 0). */
  readonly start?: number;
  /** Start from this solution at `start` instead of the operating point (a warm start, or a small-signal steady state). */
  readonly initialSolution?: Float64Array | undefined;
}

/** The settled cycle: statistics of every probe, how the state was found, and where the cycle starts. */
export interface PeriodicResult {
  readonly last: readonly CycleStats[];
  readonly steady: SteadyInfo;
  /** Start of the settled cycle, s (a whole number of periods after the time origin). */
  readonly start: number;
  /** Solution at `start`: a warm start for a neighbouring setting, or the start of a run from steady state. */
  readonly solution: Float64Array;
}

/** Least and greatest value of a signal over a time window [from, to] (s), gathered point by point. */
export class MinMaxWindow {
  min = Infinity;
  max = -Infinity;
  constructor(readonly from: number, readonly to: number) {}

  /** Takes the value v at time t (s) if t lies in the window (to a relative 1e-12). */
  add(t: number, v: number): void {
    if (t < this.from - 1e-12 * this.to || t > this.to + 1e-12 * this.to) return;
    if (v < this.min) this.min = v;
    if (v > this.max) this.max = v;
  }
}

class CycleAccumulator {
  min = Infinity;
  max = -Infinity;
  integral = 0;
  lastT = Number.NaN;
  lastV = Number.NaN;

  add(t: number, v: number): void {
    if (!Number.isNaN(this.lastT)) this.integral += 0.5 * (v + this.lastV) * (t - this.lastT);
    if (v < this.min) this.min = v;
    if (v > this.max) this.max = v;
    this.lastT = t;
    this.lastV = v;
  }

  stats(period: number): CycleStats {
    return { min: this.min, max: this.max, mean: this.integral / period };
  }
}

/** Checks a SteadyInfo's members at the boundary. */
function checkSteadyInfo(s: unknown): void {
  if (!isRecord(s)) throw argumentError('describeSteady', 's', 'a steady-state description (method, iterations, periods, residual)', s);
  if (s['method'] !== 'shooting' && s['method'] !== 'cycles') throw argumentError('describeSteady', 's.method', "'shooting' or 'cycles'", s['method']);
  for (const name of ['iterations', 'periods', 'residual'] as const) {
    const v = s[name];
    if (typeof v !== 'number' || !Number.isFinite(v)) throw argumentError('describeSteady', `s.${name}`, 'a finite number', v);
  }
}

/** How a steady state was found, in words ("shooting, 3 iterations, 41 periods, residual 0.02"). */
export function describeSteady(s: SteadyInfo): string {
  checkSteadyInfo(s);
  const how = s.method === 'shooting' ? `shooting, ${s.iterations} iteration${s.iterations === 1 ? '' : 's'}` : 'whole cycles';
  return `${how}, ${s.periods} periods simulated, residual ${Number(s.residual.toPrecision(2))} of tolerance`;
}

/**
 * Finds the periodic steady state of the circuit with its sources as they
 * are set and returns the statistics of every probe over the settled
 * cycle. Throws RailcheckError when the transient fails or no steady
 * state is found.
 */
export function settleCycle(c: CompiledCircuit, opts: PeriodicOptions, what: string, origin: CardOrigin | undefined): PeriodicResult {
  const { period, probes } = opts;
  const acc = probes.map(() => new CycleAccumulator());
  const r = findPeriodicSteadyState(c, {
    period,
    ...(opts.start !== undefined ? { start: opts.start } : {}),
    ...(opts.initialSolution ? { initialSolution: opts.initialSolution } : {}),
    onCycle: (t, ctx) => {
      for (let k = 0; k < probes.length; k++) acc[k]!.add(t, probes[k]!(ctx.x));
      opts.onPoint?.(t, ctx);
    },
  });
  if (!r.ok) {
    if (r.reason === 'transient-failed') {
      throw new RailcheckError([errorAt(transientFailureCode(r.failure), `${what}: the transient failed ${describeTransientFailure(r.failure, (s) => formatSI(s, 's'))}`, origin?.pos, origin?.lineText)]);
    }
    const slowest = r.slowest ? `; slowest to settle: the charge of ${r.slowest}` : '';
    const formatCount = (n: number): string => (n < 1e6 ? String(n) : n.toExponential(1));
    const why = match(r.stop)
      .with({ kind: 'budget' }, () => Number.isFinite(r.residual) ? `whole cycles still changed by ${Number(r.residual.toPrecision(2))}× their tolerance` : 'the change from one whole cycle to the next was not decaying')
      .with({ kind: 'not-decaying' }, () => `the change over a whole cycle did not decay over ${STALLED_WINDOWS * DECAY_WINDOW} cycles`)
      .with({ kind: 'too-slow' }, (x) => `whole cycles were settling so slowly that they would need about ${formatCount(x.projected)} periods`)
      .exhaustive();
    throw new RailcheckError([errorAt('not-settled', `${what}: no periodic steady state after ${r.periods} periods (shooting did not converge, and ${why}${slowest})`, origin?.pos, origin?.lineText, 'a stage whose slowest time constant is at most a few thousand source periods (a reservoir with no load and no bleeder never settles: it creeps towards the peak)')]);
  }
  const s = r.steady;
  return {
    last: acc.map((a) => a.stats(period)),
    steady: { method: s.method, iterations: s.iterations, periods: s.periods, residual: s.residual },
    start: s.start,
    solution: s.solution,
  };
}
