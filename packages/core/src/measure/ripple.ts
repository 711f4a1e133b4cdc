/**
 * Ripple rejection of a DC-fed stage (figures.md, "ripple"), two ways:
 * - small-signal: −20·log10|Vout/Vin| at `freq` from the circuit
 *   linearised at the nominal operating point (the definition of power-
 *   supply rejection ratio in regulator datasheets; JEDEC JESD99C);
 * - transient: a sine of `amp` added to the input, run to periodic steady
 *   state, 20·log10(input p-p / output p-p) over the last whole cycle.
 * For small `amp` the two agree; a disagreement above 0.5 dB is a warning.
 */
import { errorAt, RailcheckError, warningAt, type Diagnostic } from '../errors.js';
import { linearise, solveAt, type SmallSignalSystem } from '../engine/ac.js';
import { solveOperatingPoint } from '../engine/dcop.js';
import { opFailure } from '../analysis/dc.js';
import { backToNominal, type Bench } from './bench.js';
import { vout } from './stage.js';
import { runToPeriodicSteadyState } from './periodic.js';
import { formatSI } from '../units.js';

/** Options of {@link rippleRejection}. */
export interface RippleOptions {
  /** Ripple frequency, Hz (default 100: full-wave rectified 50 Hz mains). */
  readonly freq?: number | undefined;
  /** Ripple amplitude for the transient method, V peak (default 1 % of the nominal input). */
  readonly amp?: number | undefined;
  /** Which methods to run (default both). */
  readonly method?: 'ac' | 'tran' | 'both' | undefined;
}

/** Ripple-rejection results; a method not run leaves its fields undefined. */
export interface RippleRejection {
  readonly freq: number;
  readonly amp: number;
  /** `ripple.rr`, dB (positive = attenuation), small-signal method. */
  readonly rr: number | undefined;
  /** `ripple.rr_tran`, dB, transient method. */
  readonly rrTran: number | undefined;
  /** `ripple.out_pp`: output peak-to-peak in the transient method, V. */
  readonly outPp: number | undefined;
  /** Cycles the transient needed to settle. */
  readonly cycles: number | undefined;
  readonly warnings: readonly Diagnostic[];
}

/** Largest disagreement between the methods before a warning, dB (figures.md). */
export const RIPPLE_AGREEMENT_DB = 0.5;

/**
 * Linearises the stage at its nominal operating point with only the input
 * driven (`mag` V, phase 0), solves at `hertz`, and hands the solved system
 * to `read`. Every source's ac value and the nominal point are restored.
 */
function withInputDrive<T>(bench: Bench, hertz: number, mag: number, what: string, read: (sys: SmallSignalSystem, singular: number) => T): T {
  const { stage } = bench;
  const c = stage.compiled;
  const saved = [...c.sources.values()].map((s) => [s, s.acMag, s.acPhaseDeg] as const);
  try {
    for (const [s] of saved) s.acMag = 0;
    stage.input.acMag = mag;
    stage.input.acPhaseDeg = 0;
    backToNominal(bench);
    const op = solveOperatingPoint(c, true);
    if (!op.ok) throw new RailcheckError([opFailure(op, `${what}: nominal operating point`, stage.supply.origin)]);
    const sys = linearise(c);
    return read(sys, solveAt(sys, hertz));
  } finally {
    for (const [s, m, phase] of saved) {
      s.acMag = m;
      s.acPhaseDeg = phase;
    }
    backToNominal(bench);
  }
}

/** Small-signal transfer |Vout/Vin| (ratio) at `hertz` at the nominal operating point. */
export function rippleTransfer(bench: Bench, hertz: number): number {
  const { stage } = bench;
  return withInputDrive(bench, hertz, 1, 'ripple rejection', (sys, singular) => {
    if (singular !== 0) throw new RailcheckError([errorAt('ac-singular', `ripple rejection: small-signal matrix singular at ${hertz} Hz`, stage.supply.origin.pos)]);
    return Math.hypot(vout(stage, sys.xRe), vout(stage, sys.xIm));
  });
}

/**
 * The state at t = 0 of the small-signal periodic steady state for
 * `amp`·sin(2π·hertz·t) on the input: x_op + Im(X), X the phasor solution
 * (sin ωt = Im e^{jωt}). Starting the ripple transient there leaves only the
 * nonlinear part of the start-up to decay, instead of a transient as large
 * as the ripple itself that decays with the stage's slowest time constant.
 */
export function smallSignalStart(bench: Bench, hertz: number, amp: number): Float64Array {
  const c = bench.stage.compiled;
  return withInputDrive(bench, hertz, amp, 'ripple', (sys, singular) => {
    const start = new Float64Array(c.ws.x);
    if (singular === 0) for (let i = 1; i < start.length; i++) start[i] = start[i]! + sys.xIm[i]!;
    return start;
  });
}

/** Output peak-to-peak (V) at periodic steady state with a sine of `amp` V at `hertz` on the input. */
export function rippleTransient(bench: Bench, hertz: number, amp: number): { outPp: number; cycles: number } {
  const { stage } = bench;
  const saved = stage.input.waveform;
  try {
    const initialSolution = smallSignalStart(bench, hertz, amp);
    stage.input.waveform = { kind: 'sin', vo: stage.nominalInput, va: amp, freq: hertz, td: 0, theta: 0, phaseDeg: 0 };
    const pss = runToPeriodicSteadyState(stage.compiled, { period: 1 / hertz, probes: [(x) => vout(stage, x)], ppFloor: Math.max(1e-9, amp * 1e-7) }, 'ripple rejection (transient)', stage.supply.origin, { initialSolution });
    const last = pss.last[0]!;
    return { outPp: last.max - last.min, cycles: pss.cycles };
  } finally {
    stage.input.waveform = saved;
    backToNominal(bench);
  }
}

/** Measures ripple rejection by the methods asked for. Throws RailcheckError. */
export function rippleRejection(bench: Bench, opts: RippleOptions = {}): RippleRejection {
  const freq = opts.freq ?? 100;
  // A sine's p-p is 2·|amp| on a negative rail too.
  const amp = opts.amp ?? 0.01 * Math.abs(bench.stage.nominalInput);
  const method = opts.method ?? 'both';
  const rr = method === 'tran' ? undefined : -20 * Math.log10(rippleTransfer(bench, freq));
  let rrTran: number | undefined;
  let outPp: number | undefined;
  let cycles: number | undefined;
  if (method !== 'ac') {
    const t = rippleTransient(bench, freq, amp);
    outPp = t.outPp;
    cycles = t.cycles;
    rrTran = 20 * Math.log10((2 * Math.abs(amp)) / outPp);
  }
  const warnings: Diagnostic[] = [];
  if (rr !== undefined && rrTran !== undefined && Math.abs(rr - rrTran) > RIPPLE_AGREEMENT_DB) {
    const o = bench.stage.supply.origin;
    warnings.push(warningAt('ripple-disagree', `ripple rejection at ${formatSI(freq, 'Hz')}: the small-signal (${rr.toFixed(2)} dB) and transient (${rrTran.toFixed(2)} dB) methods differ by more than ${RIPPLE_AGREEMENT_DB} dB; the ripple amplitude ${formatSI(amp, 'V')} may be large enough to drive the stage out of its linear range`, o.pos, o.lineText));
  }
  return { freq, amp, rr, rrTran, outPp, cycles, warnings };
}
