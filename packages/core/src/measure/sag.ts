/**
 * Ride-through of an input dip (figures.md, "sag"). From steady state at
 * nominal the input falls to nominal·(1 − depth) over `edge`, stays for
 * `dur`, and returns over `edge`; the figure is the largest fall of the
 * output from the start of the dip until 5·edge after recovery, whether it
 * stays within `fall`, and the deepest dip of the same shape that does
 * (bisection to 0.5 % of its value). With `ripple`, a sine rides on the input all along
 * and the output peak-to-peak before and during the dip is reported.
 */
import type { WaveformSpec } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import { runTransient } from '../engine/transient.js';
import { formatSI } from '../units.js';
import { backToNominal, type Bench } from './bench.js';
import { DEFAULT_DROPOUT_FALL } from './dropout.js';
import { MinMaxWindow, runToPeriodicSteadyState } from './periodic.js';
import { vout } from './stage.js';
import { smallSignalStart } from './ripple.js';

/** Options of {@link sagRideThrough} (figures.md defaults). */
export interface SagOptions {
  /** Dip depth as a ratio of the nominal input (default 0.2). */
  readonly depth?: number | undefined;
  /** Time at the bottom of the dip, s (default 0.1). */
  readonly dur?: number | undefined;
  /** Fall and recovery time, s (default 1 ms). */
  readonly edge?: number | undefined;
  /** Largest acceptable output fall, V (default 100 mV). */
  readonly fall?: number | undefined;
  /** Ripple riding on the input, V peak (default 0). */
  readonly ripple?: number | undefined;
  /** Ripple frequency, Hz (default 100). */
  readonly freq?: number | undefined;
}

/** Results of the ride-through figure. */
export interface SagRideThrough {
  readonly depth: number;
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
  /** `sag.out_pp`: output p-p over the last whole ripple cycle of the dip, V (with ripple). */
  readonly outPp: number | undefined;
  /** `sag.out_pp_before`: output p-p over the last whole ripple cycle before the dip, V (with ripple). */
  readonly outPpBefore: number | undefined;
}

/** Resolution of the deepest passing dip: 0.5 % of its value (figures.md), and never finer than 1e-4. */
const DEPTH_RESOLUTION = 0.005;
const DEPTH_FLOOR = 1e-4;

/**
 * Truncation-error tolerance of the dip transients: the fall is compared
 * with a criterion of the order of 100 mV on rails of volts, so the step
 * control is held to 10 µV per volt rather than the analysis default
 * (1 mV per volt).
 */
const SAG_LTE_RELTOL = 1e-5;

type SagSettings = { readonly [K in keyof SagOptions]-?: number };

interface DipRun {
  fall: number;
  outPp: number | undefined;
  outPpBefore: number | undefined;
}

function runDip(bench: Bench, depth: number, o: SagSettings, settleCycles: number, start: Float64Array | undefined): DipRun {
  const { stage } = bench;
  const nominal = stage.nominalInput;
  const period = 1 / o.freq;
  const t0 = o.ripple > 0 ? settleCycles * period : Math.max(o.edge, 1e-6);
  const low = nominal * (1 - depth);
  const tEnd = t0 + 2 * o.edge + o.dur + 5 * o.edge;
  const dip: WaveformSpec = { kind: 'pwl', times: [0, t0, t0 + o.edge, t0 + o.edge + o.dur, t0 + 2 * o.edge + o.dur], values: [nominal, nominal, low, low, nominal] };
  const saved = stage.input.waveform;
  const out = (x: Float64Array): number => bench.outputSign * vout(stage, x);
  const whole = new MinMaxWindow(t0, tEnd);
  const before = new MinMaxWindow(t0 - period, t0);
  const bottomEnd = Math.floor((t0 + o.edge + o.dur) / period + 1e-9) * period;
  const during = new MinMaxWindow(bottomEnd - period, bottomEnd);
  const hasDuring = o.ripple > 0 && bottomEnd - period >= t0 + o.edge - 1e-12;
  try {
    backToNominal(bench);
    stage.input.waveform = o.ripple > 0 ? { kind: 'sum', parts: [dip, { kind: 'sin', vo: 0, va: o.ripple, freq: o.freq, td: 0, theta: 0, phaseDeg: 0 }] } : dip;
    const r = runTransient(stage.compiled, {
      tstep: Math.min(o.edge, o.dur) / 10,
      tstop: tEnd,
      stepsPerCycle: 200,
      lteReltol: SAG_LTE_RELTOL,
      tmax: Math.min(o.edge, o.dur / 50),
      keepTrace: false,
      ...(start ? { initialSolution: start } : {}),
      extraBreakpoints: o.ripple > 0 ? [t0 - period, bottomEnd - period, bottomEnd].filter((t) => t > 0) : [],
      onAccept: (t, ctx) => {
        const v = out(ctx.x);
        whole.add(t, v);
        before.add(t, v);
        during.add(t, v);
      },
    });
    if (!r.ok) throw new RailcheckError([errorAt('transient-failed', `sag: the dip transient failed at t = ${formatSI(r.time, 's')} (depth ${(depth * 100).toFixed(1)} %)`, stage.supply.origin.pos, stage.supply.origin.lineText)]);
  } finally {
    stage.input.waveform = saved;
    backToNominal(bench);
  }
  return {
    fall: bench.voutNominal - whole.min,
    outPp: hasDuring ? during.max - during.min : undefined,
    outPpBefore: o.ripple > 0 ? before.max - before.min : undefined,
  };
}

/** Measures ride-through of an input dip. Throws RailcheckError. */
export function sagRideThrough(bench: Bench, opts: SagOptions = {}): SagRideThrough {
  const o: SagSettings = {
    depth: opts.depth ?? 0.2,
    dur: opts.dur ?? 0.1,
    edge: opts.edge ?? 1e-3,
    fall: opts.fall ?? DEFAULT_DROPOUT_FALL,
    ripple: opts.ripple ?? 0,
    freq: opts.freq ?? 100,
  };
  const { stage } = bench;
  let settleCycles = 0;
  let start: Float64Array | undefined;
  if (o.ripple > 0) {
    const saved = stage.input.waveform;
    try {
      start = smallSignalStart(bench, o.freq, o.ripple);
      stage.input.waveform = { kind: 'sin', vo: stage.nominalInput, va: o.ripple, freq: o.freq, td: 0, theta: 0, phaseDeg: 0 };
      settleCycles = runToPeriodicSteadyState(stage.compiled, { period: 1 / o.freq, probes: [(x) => vout(stage, x)] }, 'sag: ripple before the dip', stage.supply.origin, { initialSolution: start }).cycles;
    } finally {
      stage.input.waveform = saved;
      backToNominal(bench);
    }
  }
  const main = runDip(bench, o.depth, o, settleCycles, start);
  const passes = (d: number): boolean => runDip(bench, d, o, settleCycles, start).fall <= o.fall;
  let lo = 0;
  let hi = 1;
  if (passes(1)) lo = 1;
  else {
    // The asked depth brackets the answer from one side already.
    if (main.fall <= o.fall) lo = o.depth;
    else hi = o.depth;
    while (hi - lo > Math.max(DEPTH_RESOLUTION * hi, DEPTH_FLOOR)) {
      const mid = 0.5 * (lo + hi);
      if (passes(mid)) lo = mid;
      else hi = mid;
    }
  }
  return { depth: o.depth, dur: o.dur, edge: o.edge, criterion: o.fall, fall: main.fall, pass: main.fall <= o.fall ? 1 : 0, maxDepth: lo, outPp: main.outPp, outPpBefore: main.outPpBefore };
}
