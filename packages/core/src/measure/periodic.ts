/**
 * Periodic steady state by whole-cycle integration: run the transient
 * cycle after cycle and stop when the mean and the peak-to-peak of the
 * watched signals over two successive cycles agree within 1 %. Values of
 * the last cycle are returned. Per-cycle statistics are gathered as the
 * stepper goes (onAccept), so no trace is stored.
 *
 * The periodic run owns the transient's timing: the output interval
 * (period / 50, which also sets the step after every breakpoint and the
 * default pulse edge), the end time (maxCycles whole periods), a
 * breakpoint at every cycle boundary, and the least steps per cycle
 * ({@link PeriodicOptions.stepsPerCycle}, default 200). Its caller chooses
 * only where the run starts ({@link PeriodicOptions.initialSolution}).
 */
import type { LoadContext } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import type { CardOrigin } from '../netlist/ast.js';
import { runTransient } from '../engine/transient.js';
import type { CompiledCircuit } from '../engine/compile.js';
import { formatSI } from '../units.js';

/** Statistics of one signal over one cycle (trapezoidal mean over accepted points). */
export interface CycleStats {
  min: number;
  max: number;
  mean: number;
}

/** Something to watch: a function of the solution vector (e.g. Vout = x[out] − x[ref]). */
export type Probe = (x: Float64Array) => number;

/** Settling rule: relative agreement of mean and peak-to-peak between successive cycles (figures.md: 1 %). */
export const SETTLE_TOLERANCE = 0.01;

/** Options of a periodic run. */
export interface PeriodicOptions {
  /** Cycle length, s. */
  readonly period: number;
  /** Signals whose cycle statistics decide settling; the first is the output. */
  readonly probes: readonly Probe[];
  /** Fewest cycles before settling is judged (default 3). */
  readonly minCycles?: number;
  /** Most cycles before giving up (default 400). */
  readonly maxCycles?: number;
  /** Least steps per cycle (default 200: peak-to-peak within about 0.01 % of a sine's). */
  readonly stepsPerCycle?: number;
  /** Called at every accepted point from `start` on, with the 0-based index of the cycle it falls in. */
  readonly onPoint?: (timeSeconds: number, cycle: number, ctx: LoadContext) => void;
  /** Absolute floor for the peak-to-peak comparison, V (default 1 µV). */
  readonly ppFloor?: number;
  /** Time origin of the cycles, s (default 0). */
  readonly start?: number;
  /** Start the transient from this solution vector instead of the operating point (engine/transient.ts, initialSolution). */
  readonly initialSolution?: Float64Array | undefined;
  /**
   * End the run at the first accepted point at or after this time (s),
   * settled or not: for runs that watch a window of a waveform (a dip)
   * rather than look for steady state. Default: run until settled.
   */
  readonly endAt?: number;
}

/** Output intervals per period in a periodic run (the interval also bounds the step after every breakpoint). */
const OUTPUT_INTERVALS_PER_PERIOD = 50;

/** Result: the statistics of every probe over the last (settled) cycle, and how many cycles it took. */
export interface PeriodicResult {
  /** False only for a run ended by {@link PeriodicOptions.endAt} before it settled. */
  readonly settled: boolean;
  readonly last: readonly CycleStats[];
  readonly previous: readonly CycleStats[];
  readonly cycles: number;
  /** Time at the end of the last cycle, s. */
  readonly end: number;
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

  close(period: number): CycleStats {
    const s = { min: this.min, max: this.max, mean: this.integral / period };
    // The boundary point belongs to both cycles.
    this.min = this.lastV;
    this.max = this.lastV;
    this.integral = 0;
    return s;
  }
}

function agrees(a: CycleStats, b: CycleStats, floor: number): boolean {
  const ppA = a.max - a.min;
  const ppB = b.max - b.min;
  const meanOk = Math.abs(a.mean - b.mean) <= SETTLE_TOLERANCE * Math.max(Math.abs(a.mean), Math.abs(b.mean), floor);
  const ppOk = Math.abs(ppA - ppB) <= SETTLE_TOLERANCE * Math.max(ppA, ppB) + floor;
  return meanOk && ppOk;
}

/**
 * Runs the circuit's transient (sources as they are set) cycle by cycle
 * until periodic steady state (or until {@link PeriodicOptions.endAt}).
 * Throws RailcheckError if the transient fails or does not settle within
 * maxCycles.
 */
export function runToPeriodicSteadyState(c: CompiledCircuit, opts: PeriodicOptions, what: string, origin: CardOrigin | undefined): PeriodicResult {
  const { period, probes } = opts;
  const minCycles = opts.minCycles ?? 3;
  const maxCycles = opts.maxCycles ?? 400;
  const floor = opts.ppFloor ?? 1e-6;
  const start = opts.start ?? 0;
  const acc = probes.map(() => new CycleAccumulator());
  let previous: CycleStats[] = [];
  let last: CycleStats[] = [];
  let cycle = 0;
  let settled = false;
  let end = 0;
  const boundaries = Array.from({ length: maxCycles + 1 }, (_, k) => start + k * period).filter((t) => t > 0);
  const endAt = opts.endAt ?? Infinity;
  let ended = false;
  const outcome = runTransient(c, {
    tstep: period / OUTPUT_INTERVALS_PER_PERIOD,
    tstop: start + maxCycles * period,
    stepsPerCycle: opts.stepsPerCycle ?? 200,
    ...(opts.initialSolution ? { initialSolution: opts.initialSolution } : {}),
    extraBreakpoints: boundaries,
    keepTrace: false,
    onAccept: (t, ctx) => {
      if (t < start - period * 1e-9) return false;
      const x = ctx.x;
      for (let k = 0; k < probes.length; k++) acc[k]!.add(t, probes[k]!(x));
      opts.onPoint?.(t, cycle, ctx);
      const boundary = start + (cycle + 1) * period;
      if (Math.abs(t - boundary) <= period * 1e-9) {
        previous = last;
        last = acc.map((a) => a.close(period));
        cycle++;
        end = t;
        if (cycle >= minCycles && previous.length > 0 && last.every((s, k) => agrees(s, previous[k]!, floor))) {
          settled = true;
          return true;
        }
      }
      if (t >= endAt) {
        ended = true;
        return true;
      }
      return false;
    },
  });
  if (!outcome.ok) {
    throw new RailcheckError([errorAt('transient-failed', `${what}: the transient failed at t = ${formatSI(outcome.time, 's')}`, origin?.pos, origin?.lineText)]);
  }
  if (!settled && !ended) {
    throw new RailcheckError([errorAt('not-settled', `${what}: no periodic steady state within ${maxCycles} cycles (mean and peak-to-peak still changing by more than 1 % per cycle)`, origin?.pos, origin?.lineText, 'a stage whose time constants settle within a few hundred cycles')]);
  }
  return { settled, last, previous, cycles: cycle, end };
}
