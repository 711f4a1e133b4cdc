/**
 * Ride-through of an input dip (figures.md, "sag"). From steady state at
 * nominal the input (a DC input's value, a sine-fed stage's amplitude)
 * falls to nominal·(1 − depth) over `edge`, stays for `dur`, and returns
 * over `edge`; the figure is the largest fall of the output from the start
 * of the dip until 5·edge after recovery, whether it stays within `fall`,
 * and the deepest dip of the same shape that does (bisection to 0.5 % of
 * its value). Where the output carries a ripple (a DC input with `ripple`,
 * any sine-fed stage), its peak-to-peak before and during the dip is
 * reported too. The bench applies the dip (bench.ts, DipPlan).
 */
import type { Bench } from './bench.js';
import { dipBottomEnd } from './bench.js';
import { DEFAULT_DROPOUT_FALL } from './dropout.js';
import { MinMaxWindow } from './periodic.js';
import { bisectBoundary } from './search.js';

/** Options of {@link sagRideThrough} (figures.md defaults). */
export interface SagOptions {
  /** Dip depth as a ratio of the nominal input (default 0.2). */
  readonly depth?: number | undefined;
  /** Time at the bottom of the dip, s (default 0.1; rounded up to whole cycles on a sine-fed stage). */
  readonly dur?: number | undefined;
  /** Fall and recovery time, s (default 1 ms). */
  readonly edge?: number | undefined;
  /** Largest acceptable output fall, V (default 100 mV). */
  readonly fall?: number | undefined;
  /** Ripple riding on a DC input, V peak (default 0; not used on a sine-fed stage). */
  readonly ripple?: number | undefined;
  /** Frequency of that ripple, Hz (default 100; not used on a sine-fed stage). */
  readonly freq?: number | undefined;
}

/** Results of the ride-through figure. */
export interface SagRideThrough {
  readonly depth: number;
  /** Time at the bottom as run, s. */
  readonly dur: number;
  readonly edge: number;
  /** The pass criterion, V. */
  readonly criterion: number;
  /** `sag.fall`: Vout_nom − lowest Vout, V. */
  readonly fall: number;
  /** `sag.pass`: 1 when fall ≤ criterion. */
  readonly pass: 0 | 1;
  /** `sag.max_depth`: the deepest dip (ratio) that still passes. */
  readonly maxDepth: number;
  /** `sag.out_pp`: output p-p over the last whole ripple cycle of the dip, V (when the output carries a ripple and a whole cycle lies at the bottom). */
  readonly outPp: number | undefined;
  /** `sag.out_pp_before`: output p-p over the last whole ripple cycle before the dip, V (when the output carries a ripple). */
  readonly outPpBefore: number | undefined;
}

/** Resolution of the deepest passing dip: 0.5 % of its value (figures.md), and never finer than 1e-4. */
const DEPTH_RESOLUTION = 0.005;
const DEPTH_FLOOR = 1e-4;

interface DipRun {
  fall: number;
  outPp: number | undefined;
  outPpBefore: number | undefined;
}

/** Measures ride-through of an input dip. Throws RailcheckError. */
export function sagRideThrough(bench: Bench, opts: SagOptions = {}): SagRideThrough {
  const depth = opts.depth ?? 0.2;
  const edge = opts.edge ?? 1e-3;
  const criterion = opts.fall ?? DEFAULT_DROPOUT_FALL;
  const plan = bench.planDip({ edge, dur: opts.dur ?? 0.1, ripple: opts.ripple ?? 0, freq: opts.freq ?? 100 });
  const { t0, period } = plan;
  const tEnd = t0 + 2 * edge + plan.dur + 5 * edge;
  const bottomEnd = dipBottomEnd(plan, edge);
  // A whole ripple cycle at the bottom of the dip, clear of the falling edge.
  const hasDuring = plan.rippled && bottomEnd - period >= t0 + edge - 1e-12;
  const runDip = (d: number): DipRun => {
    const whole = new MinMaxWindow(t0, tEnd);
    const before = new MinMaxWindow(t0 - period, t0);
    const during = new MinMaxWindow(bottomEnd - period, bottomEnd);
    plan.run(d, tEnd, (t, v) => {
      whole.add(t, v);
      before.add(t, v);
      during.add(t, v);
    });
    return {
      fall: bench.voutNominal - whole.min,
      outPp: hasDuring ? during.max - during.min : undefined,
      outPpBefore: plan.rippled ? before.max - before.min : undefined,
    };
  };
  const main = runDip(depth);
  const passes = (d: number): boolean => runDip(d).fall <= criterion;
  let maxDepth = 1;
  if (!passes(1)) {
    // The asked depth brackets the answer from one side already.
    const start = main.fall <= criterion ? { pass: depth, fail: 1 } : { pass: 0, fail: depth };
    maxDepth = bisectBoundary(passes, start, (b) => !(b.fail - b.pass > Math.max(DEPTH_RESOLUTION * b.fail, DEPTH_FLOOR))).pass;
  }
  return { depth, dur: plan.dur, edge, criterion, fall: main.fall, pass: main.fall <= criterion ? 1 : 0, maxDepth, outPp: main.outPp, outPpBefore: main.outPpBefore };
}
