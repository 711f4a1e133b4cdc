/**
 * Switch-on (figures.md, "startup"): from everything discharged (every
 * capacitor and junction charge and every inductor flux zero) the input is
 * switched on at t = 0, a step to its DC value on a DC input, the sine
 * from t = 0 on a sine-fed stage, with the load at nominal. The run goes on
 * until the circuit's whole state is close to its steady state (the DC
 * point, or the settled cycle at every whole cycle; settling.ts), at most
 * `tmax`. Read off it: the largest input-source current (inrush), the
 * largest forward current of any diode, the time after which the output
 * stays within `fall` of its steady value (the settled cycle's band on a
 * sine-fed stage) and the largest output above it. A run that has not
 * settled by `tmax` gives no figure, with the reason: never the numbers of
 * an unsettled run.
 */
import { isKind, type Diode } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import { MAX_FIGURE_STEPS } from '../budgets.js';
import type { SharedStepBudget } from '../engine/transient.js';
import { checkOptions } from '../arguments.js';
import { formatSI } from '../units.js';
import { BENCHES, type Bench, type SettlingPlan } from './bench.js';
import { MAX_SETTLE_TIME, positive, requireKey } from './keys.js';
import { BandWatch, VOLTAGE_SETTLE_SHARE } from './settling.js';
import { vout } from './stage.js';

/** Default `tmax=` of the start-up and load-step figures, s: longer than the start-up of a linear stage with a slow reference filter (seconds), common practice, no source. */
export const DEFAULT_SETTLE_TMAX = 10;

/** Default settling band (`fall=` of startup, `band=` of step) as a ratio of Vout_nom: 1 %, common practice, no source. */
export const DEFAULT_SETTLE_RATIO = 0.01;

/** Options of {@link startup} (figures.md defaults). */
export interface StartupOptions {
  /** Settling band about the steady output, V (default 1 % of Vout_nom). */
  readonly fall?: number | undefined;
  /** Longest time simulated, s (default 10). */
  readonly tmax?: number | undefined;
}

/** Results of the switch-on figure. */
export interface Startup {
  /** The settling band, V. */
  readonly fall: number;
  /** Longest time that was allowed, s. */
  readonly tmax: number;
  /** `startup.inrush`: the largest magnitude of the input source's current, A. */
  readonly inrush: number;
  /** `startup.ipk_rect`: the largest forward current of any diode of the stage, A (undefined: the stage has no diode). */
  readonly ipkRect: number | undefined;
  /** The diode that carried it (undefined without a diode, or when none conducted forward). */
  readonly rectifier: string | undefined;
  /** `startup.settle`: time from switch-on after which the output stays within `fall` of its steady value or band, s. */
  readonly settle: number;
  /** `startup.overshoot`: the largest output above its steady value (the settled cycle's greatest on a sine-fed stage), V; 0 if none. */
  readonly overshoot: number;
  /** Least and greatest steady output, V (equal on a DC input). */
  readonly steadyMin: number;
  readonly steadyMax: number;
  /** When the run was judged settled, s (the state close to the steady state). */
  readonly end: number;
}

/** A settling run read off: the output's band entry and extremes, judged settled or not. Throws RailcheckError when it did not settle by `tmax`. */
export function settlingRun(bench: Bench, plan: SettlingPlan, band: number, tmax: number, what: string, observe: (t: number, x: Float64Array, state: Float64Array) => void): { entered: number; end: number } {
  const stage = bench.stage;
  const watch = new BandWatch(plan.steadyMin - band, plan.steadyMax + band);
  const shared: SharedStepBudget = { left: MAX_FIGURE_STEPS, budget: 'MAX_FIGURE_STEPS', limit: MAX_FIGURE_STEPS };
  let lastOut = Number.NaN;
  const outcome = plan.run(tmax, VOLTAGE_SETTLE_SHARE * band, (t, x, state) => {
    lastOut = bench.railSign * vout(stage, x);
    watch.add(t, lastOut);
    observe(t, x, state);
  }, shared);
  const origin = stage.supply.origin;
  if (!outcome.settled || watch.entered === undefined) {
    const f = outcome.settled ? undefined : outcome.furthest;
    const off = lastOut < watch.low ? watch.low - lastOut : lastOut > watch.high ? lastOut - watch.high : 0;
    const output = off > 0 ? `the output was still ${formatSI(off, 'V')} outside its band of ${formatSI(band, 'V')}` : `the output was within its band of ${formatSI(band, 'V')}`;
    const state = f ? `, and ${f.name} still ${formatSI(f.distance, f.unit)} from its steady value` : '';
    throw new RailcheckError([errorAt('not-settled', `${what}: the stage had not settled by tmax = ${formatSI(tmax, 's')}: at the end ${output}${state}, so no settling time can be given`, origin.pos, origin.lineText, 'a longer tmax= (at most 100 s), or a stage that reaches its steady state (one that does not start never does)')]);
  }
  return { entered: watch.entered, end: outcome.at };
}

/** A settling band (`fall=` of startup, `band=` of step) in volts: `value` V, by default 1 % of `voutNominal` (V). */
export function settleBandVolts(value: number | undefined, voutNominal: number): number {
  return value ?? DEFAULT_SETTLE_RATIO * voutNominal;
}

/** Checks a settling band and tmax (library callers; a netlist's keys are checked at elaboration). */
export function checkSettleKeys(figure: string, bandKey: string, band: number, tmax: number): void {
  requireKey(figure, bandKey, band, positive, '> 0 V');
  requireKey(figure, 'tmax', tmax, (v) => positive(v) && v <= MAX_SETTLE_TIME, `in (0, ${MAX_SETTLE_TIME}] s`);
}

/** Measures the switch-on of the stage. Throws RailcheckError (code `not-settled` when it has not settled by `tmax`). */
export function startup(bench: Bench, opts: StartupOptions = {}): Startup {
  BENCHES.check('startup', 'bench', bench);
  checkOptions('startup', opts, { fall: 'finite', tmax: 'finite' });
  const fall = settleBandVolts(opts.fall, bench.voutNominal);
  const tmax = opts.tmax ?? DEFAULT_SETTLE_TMAX;
  checkSettleKeys('startup', 'fall', fall, tmax);
  const stage = bench.stage;
  const input = stage.input;
  if (!isKind(input, 'vsource')) throw new RailcheckError([errorAt('bad-supply-input', 'startup needs the .supply input to be a voltage source', stage.supply.origin.pos, stage.supply.origin.lineText)]);
  const branch = input.branchIndex;
  const diodes = stage.compiled.devices.filter((d): d is Diode => isKind(d, 'diode'));
  const plan = bench.planStartup();
  let inrush = 0;
  let ipk = -Infinity;
  let rectifier: string | undefined;
  let overshoot = 0;
  const r = settlingRun(bench, plan, fall, tmax, 'startup', (_t, x, state) => {
    inrush = Math.max(inrush, Math.abs(x[branch]!));
    for (const d of diodes) {
      const i = d.forwardCurrent(x, state);
      if (i > ipk) {
        ipk = i;
        rectifier = d.name;
      }
    }
    overshoot = Math.max(overshoot, bench.railSign * vout(stage, x) - plan.steadyMax);
  });
  return {
    fall,
    tmax,
    inrush,
    ipkRect: diodes.length === 0 ? undefined : Math.max(0, ipk),
    // A diode that only ever blocks (a reference zener) carried no forward current: none is named.
    rectifier: ipk > 0 ? rectifier : undefined,
    settle: r.entered,
    overshoot,
    steadyMin: plan.steadyMin,
    steadyMax: plan.steadyMax,
    end: r.end,
  };
}
