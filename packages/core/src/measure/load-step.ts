/**
 * A load step (figures.md, "step"): at nominal input, from the steady
 * state at the first load current, the load ramps to the second over
 * `rise`, starting at t = 0; the run goes on until the circuit's whole
 * state is close to the steady state at the second current (settling.ts),
 * at most `tmax`. Read off it: the largest excursion of the output the way
 * the step pushes it (down for a rising load, up for a falling one), the
 * overshoot past the new steady value on the way back, and the time after
 * which the output stays within `band` of that value. The bench applies the
 * step (bench.ts, planStep). On a sine-fed stage "steady" is the settled
 * cycle: the step starts at the start of a source cycle from the settled
 * cycle at the first current, the excursion is taken from that cycle's
 * extreme on the side the step pushes (its trough for a rising load), and
 * the band lies about the settled cycle at the second current.
 */
import { errorAt, RailcheckError } from '../errors.js';
import { checkOptions } from '../arguments.js';
import { BENCHES, type Bench } from './bench.js';
import { MAX_SETTLE_TIME, requireKey } from './keys.js';
import { checkSettleKeys, DEFAULT_SETTLE_TMAX, settleBandVolts, settlingRun } from './startup.js';
import { vout } from './stage.js';

/** Default rise time of a load step, s: 1 µs, a fast electronic load (common practice, no source). */
export const DEFAULT_STEP_RISE = 1e-6;

/** Options of {@link loadStep} (figures.md defaults): currents drawn from the rail, A. */
export interface LoadStepOptions {
  /** Load current before the step, A (default 0). */
  readonly from?: number | undefined;
  /** Load current after the step, A (default the nominal load current). */
  readonly to?: number | undefined;
  /** Rise (or fall) time of the step, s (default 1 µs). */
  readonly rise?: number | undefined;
  /** Recovery band about the new steady output, V (default 1 % of Vout_nom). */
  readonly band?: number | undefined;
  /** Longest time simulated from the start of the step, s (default 10). */
  readonly tmax?: number | undefined;
}

/** Results of the load-step figure; output values on the rail's side (magnitudes on a negative rail). */
export interface LoadStep {
  readonly from: number;
  readonly to: number;
  readonly rise: number;
  readonly band: number;
  readonly tmax: number;
  /** Output before the step, V: the steady output at `from` (on a sine-fed stage the settled cycle's least for a rising load, greatest for a falling one). */
  readonly before: number;
  /** Steady output at `to`, V (the settled cycle's mean on a sine-fed stage). */
  readonly after: number;
  /** Least and greatest steady output at `to`, V (equal on a DC input): the recovery band is [least − band, greatest + band]. */
  readonly steadyMin: number;
  readonly steadyMax: number;
  /** `step.dip`: the largest excursion from `before` the way the step pushes the output (`before` − least Vout for a rising load, greatest Vout − `before` for a falling one, at least as far as the new steady band's near edge), V; 0 if it never moves that way. */
  readonly dip: number;
  /** `step.peak`: when the output went past the new steady band's near edge, the largest swing back past its far edge after that extreme (above `steadyMax` for a rising load, below `steadyMin` for a falling one), V; 0 if none. */
  readonly peak: number;
  /** `step.recovery`: time from the start of the step after which the output stays within `band` of the new steady band [steadyMin, steadyMax], s. */
  readonly recovery: number;
  /** When the run was judged settled, s. */
  readonly end: number;
}

/** Measures a load step. Throws RailcheckError (no current-source load, not settled by `tmax`, a failed transient). */
export function loadStep(bench: Bench, opts: LoadStepOptions = {}): LoadStep {
  BENCHES.check('loadStep', 'bench', bench);
  checkOptions('loadStep', opts, { from: 'finite', to: 'finite', rise: 'finite', band: 'finite', tmax: 'finite' });
  const origin = bench.stage.supply.origin;
  if (bench.loadNominal === undefined) throw new RailcheckError([errorAt('no-load', 'the step figure needs the load element named on the .supply line', origin.pos, origin.lineText, '.supply ... load=<I element>')]);
  const from = opts.from ?? 0;
  const to = opts.to ?? bench.loadNominal;
  const rise = opts.rise ?? DEFAULT_STEP_RISE;
  const band = settleBandVolts(opts.band, bench.voutNominal);
  const tmax = opts.tmax ?? DEFAULT_SETTLE_TMAX;
  requireKey('step', 'from', from, (v) => v >= 0, '≥ 0 A');
  requireKey('step', 'to', to, (v) => v >= 0, '≥ 0 A');
  requireKey('step', 'rise', rise, (v) => v > 0 && v <= MAX_SETTLE_TIME, `in (0, ${MAX_SETTLE_TIME}] s`);
  checkSettleKeys('step', 'band', band, tmax);
  if (from === to) throw new RailcheckError([errorAt('bad-figure', `a load step needs two different load currents (from = to = ${from} A)`, origin.pos, origin.lineText)]);
  const plan = bench.planStep({ from, to, rise });
  // w = s·Vout: the step pushes w down whichever way the load moves.
  const s = to > from ? 1 : -1;
  let least = Infinity;
  let greatestAfter = -Infinity;
  const stage = bench.stage;
  const r = settlingRun(bench, plan, band, tmax, 'load step', (_t, x) => {
    const w = s * bench.railSign * vout(stage, x);
    if (w < least) {
      least = w;
      greatestAfter = -Infinity;
    } else if (w > greatestAfter) greatestAfter = w;
  });
  // The new steady band in w: [near, far] (for a rising load its least and greatest output; for a falling one mirrored).
  const near = s > 0 ? plan.steadyMin : -plan.steadyMax;
  const far = s > 0 ? plan.steadyMax : -plan.steadyMin;
  // The run ends once its state is within tolerance of the steady state it approaches, so the output's extreme the
  // way the step pushes is at least that steady state's (a monotone approach reaches it only in the limit).
  const dip = Math.max(0, s * plan.before - Math.min(least, near));
  // An overshoot is a swing back past the far edge after the output went past the near one; an output that only
  // approaches its new band from the side it started on (a reservoir's crests coming down to the new ones) has none.
  const peak = least < near ? Math.max(0, greatestAfter - far) : 0;
  return { from, to, rise, band, tmax, before: plan.before, after: plan.steadyMean, steadyMin: plan.steadyMin, steadyMax: plan.steadyMax, dip, peak, recovery: r.entered, end: r.end };
}
