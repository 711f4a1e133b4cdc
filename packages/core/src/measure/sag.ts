/**
 * Ride-through of an input dip (figures.md, "sag"). From steady state at
 * nominal the input (a DC input's value, a sine-fed stage's amplitude)
 * falls to nominal·(1 − depth) over `edge`, stays for `dur`, and returns
 * over `edge`; the figure is the largest fall of the output from the start
 * of the dip until 5·edge after recovery, whether it stays within `fall`,
 * and the deepest dip of the same shape that does: bracketed outward from
 * the depth asked for, then bisected to 0.5 % of its value; a trial whose
 * transient fails counts as not riding through and is reported. Where the output carries a ripple (a DC input with `ripple`,
 * any sine-fed stage), its peak-to-peak before and during the dip is
 * reported too. The bench applies the dip (bench.ts, DipPlan).
 */
import { RailcheckError } from '../errors.js';
import { MAX_FIGURE_STEPS } from '../budgets.js';
import type { SharedStepBudget } from '../engine/transient.js';
import type { Bench } from './bench.js';
import { dipBottomEnd } from './bench.js';
import { DEFAULT_DROPOUT_FALL } from './dropout.js';
import { MinMaxWindow } from './periodic.js';
import { bisectBoundary } from './search.js';
import { MAX_SAG_DURATION, positive, requireKey } from './keys.js';
import { BENCHES } from './bench.js';
import { checkOptions } from '../arguments.js';

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
  /**
   * `sag.out_pp`: the ripple peak-to-peak over the last whole ripple cycle
   * at the bottom of the dip, the slow drift across the cycle taken out
   * (the straight line through the cycle's end values), V; when the output
   * carries a ripple and a whole cycle lies at the bottom.
   */
  readonly outPp: number | undefined;
  /** `sag.out_pp_max`: the largest such drift-free peak-to-peak over the whole cycles at the bottom of the dip, V. */
  readonly outPpMax: number | undefined;
  /** `sag.out_pp_before`: the same over the last whole ripple cycle before the dip, V (when the output carries a ripple). */
  readonly outPpBefore: number | undefined;
  /** Deeper trials whose transient failed; each counted as a dip the stage does not ride through. */
  readonly failedTrials: readonly SagTrialFailure[];
}

/** Resolution of the deepest passing dip: 0.5 % of its value (figures.md), and never finer than 1e-4. */
const DEPTH_RESOLUTION = 0.005;
const DEPTH_FLOOR = 1e-4;

interface DipRun {
  fall: number;
  outPp: number | undefined;
  outPpMax: number | undefined;
  outPpBefore: number | undefined;
}

/**
 * Peak-to-peak of the ripple within whole cycles, with the slow drift taken
 * out: over each cycle [a, a + T] the output less the straight line through
 * its values at a and a + T (a settling filter's drift across one cycle is
 * nearly linear, the ripple is not). Points arrive in time order.
 */
class DetrendedRipple {
  private readonly t: number[] = [];
  private readonly v: number[] = [];
  constructor(private readonly from: number, private readonly to: number) {}

  add(t: number, v: number): void {
    const eps = 1e-12 * Math.max(1, this.to);
    if (t >= this.from - eps && t <= this.to + eps) {
      this.t.push(t);
      this.v.push(v);
    }
  }

  /** Detrended p-p (V) of the last whole cycle of length `period` in [from, to], and the largest over all of them. */
  ripple(period: number): { last: number; largest: number } | undefined {
    let worst: number | undefined;
    let last = 0;
    const n = Math.round((this.to - this.from) / period);
    let k0 = 0;
    for (let c = 0; c < n; c++) {
      const a = this.from + c * period;
      const b = a + period;
      const tol = 1e-9 * period;
      while (k0 < this.t.length && this.t[k0]! < a - tol) k0++;
      let k1 = k0;
      while (k1 + 1 < this.t.length && this.t[k1 + 1]! <= b + tol) k1++;
      if (k1 <= k0) continue;
      const ta = this.t[k0]!;
      const tb = this.t[k1]!;
      const va = this.v[k0]!;
      const slope = (this.v[k1]! - va) / (tb - ta);
      let lo = Infinity;
      let hi = -Infinity;
      for (let k = k0; k <= k1; k++) {
        const d = this.v[k]! - (va + slope * (this.t[k]! - ta));
        if (d < lo) lo = d;
        if (d > hi) hi = d;
      }
      worst = Math.max(worst ?? 0, hi - lo);
      last = hi - lo;
      k0 = k1;
    }
    return worst === undefined ? undefined : { last, largest: worst };
  }
}

/** A depth whose dip could not be simulated, and why. */
export interface SagTrialFailure {
  readonly depth: number;
  readonly reason: string;
}

/** Defaults of the sag figure's keys (figures.md, sag): depth (ratio), edge and dur (s), ripple (V peak) and its freq (Hz). */
export const SAG_DEFAULTS = { depth: 0.2, edge: 1e-3, dur: 0.1, ripple: 0, freq: 100 } as const;

/** Measures ride-through of an input dip. Throws RailcheckError when the dip asked for cannot be simulated. */
export function sagRideThrough(bench: Bench, opts: SagOptions = {}): SagRideThrough {
  BENCHES.check('sagRideThrough', 'bench', bench);
  checkOptions('sagRideThrough', opts, { depth: 'finite', dur: 'finite', edge: 'finite', fall: 'finite', ripple: 'finite', freq: 'finite' });
  const depth = opts.depth ?? SAG_DEFAULTS.depth;
  const edge = opts.edge ?? SAG_DEFAULTS.edge;
  const criterion = opts.fall ?? DEFAULT_DROPOUT_FALL;
  const dur = opts.dur ?? SAG_DEFAULTS.dur;
  const ripple = opts.ripple ?? SAG_DEFAULTS.ripple;
  const freq = opts.freq ?? SAG_DEFAULTS.freq;
  requireKey('sag', 'depth', depth, (v) => v > 0 && v <= 1, 'in (0, 1] (0 % to 100 % of the nominal input)');
  requireKey('sag', 'dur', dur, (v) => positive(v) && v <= MAX_SAG_DURATION, `in (0, ${MAX_SAG_DURATION}] s`);
  // edge=0 is left to the transient, which reports the abrupt dip as a step it cannot take (a located reason).
  requireKey('sag', 'edge', edge, (v) => Number.isFinite(v) && v >= 0 && v <= MAX_SAG_DURATION, `in [0, ${MAX_SAG_DURATION}] s`);
  requireKey('sag', 'fall', criterion, positive, '> 0 V');
  requireKey('sag', 'ripple', ripple, (v) => Number.isFinite(v) && v >= 0, '≥ 0 V');
  requireKey('sag', 'freq', freq, positive, '> 0 Hz');
  const plan = bench.planDip({ edge, dur, ripple, freq });
  const { t0, period } = plan;
  const tEnd = t0 + 2 * edge + plan.dur + 5 * edge;
  const bottomEnd = dipBottomEnd(plan, edge);
  // Whole ripple cycles at the bottom of the dip, clear of the falling edge.
  const bottomStart = Math.ceil((t0 + edge) / period - 1e-9) * period;
  const hasDuring = plan.rippled && bottomEnd - bottomStart >= period * (1 - 1e-9);
  // All the trials together get MAX_FIGURE_STEPS steps: an edge far shorter than the run makes each
  // trial long, and the search runs about twenty of them.
  const shared: SharedStepBudget = { left: MAX_FIGURE_STEPS, budget: 'MAX_FIGURE_STEPS', limit: MAX_FIGURE_STEPS };
  const runDip = (d: number): DipRun => {
    const whole = new MinMaxWindow(t0, tEnd);
    const before = new DetrendedRipple(t0 - period, t0);
    const during = new DetrendedRipple(bottomStart, bottomEnd);
    plan.run(d, tEnd, (t, v) => {
      whole.add(t, v);
      before.add(t, v);
      during.add(t, v);
    }, shared);
    const bottom = hasDuring ? during.ripple(period) : undefined;
    return {
      fall: bench.voutNominal - whole.min,
      outPp: bottom?.last,
      outPpMax: bottom?.largest,
      outPpBefore: plan.rippled ? before.ripple(period)?.last : undefined,
    };
  };
  const main = runDip(depth);
  const failures: SagTrialFailure[] = [];
  // A trial whose transient fails counts as a dip the stage does not ride through: it narrows the
  // bracket from above instead of failing the figure, and is reported.
  const passes = (d: number): boolean => {
    try {
      return runDip(d).fall <= criterion;
    } catch (e) {
      // A budget is not the stage failing to ride through: the figure is not measured.
      if (!(e instanceof RailcheckError) || e.diagnostics.some((x) => x.code.startsWith('budget-'))) throw e;
      failures.push({ depth: d, reason: e.diagnostics[0]?.message ?? e.message });
      return false;
    }
  };
  // Bracket outward from the depth asked for: deeper while it passes (doubling the depth up to a
  // full dip), shallower while it fails (halving it), then bisect.
  let bracket: { pass: number; fail: number } | undefined;
  if (main.fall <= criterion) {
    let pass = depth;
    for (;;) {
      const next = Math.min(1, Math.max(2 * pass, pass + 0.05));
      if (!passes(next)) {
        bracket = { pass, fail: next };
        break;
      }
      pass = next;
      if (pass >= 1) break;
    }
    if (!bracket) bracket = { pass: 1, fail: 1 };
  } else {
    let fail = depth;
    for (;;) {
      const next = fail / 2;
      if (next < DEPTH_FLOOR) {
        bracket = { pass: 0, fail };
        break;
      }
      if (passes(next)) {
        bracket = { pass: next, fail };
        break;
      }
      fail = next;
    }
  }
  const maxDepth = bisectBoundary(passes, bracket, (b) => !(b.fail - b.pass > Math.max(DEPTH_RESOLUTION * b.fail, DEPTH_FLOOR))).pass;
  return { depth, dur: plan.dur, edge, criterion, fall: main.fall, pass: main.fall <= criterion ? 1 : 0, maxDepth, outPp: main.outPp, outPpMax: main.outPpMax, outPpBefore: main.outPpBefore, failedTrials: failures };
}
