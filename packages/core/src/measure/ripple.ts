/**
 * Ripple rejection (figures.md, "ripple"): how much of the ripple at the
 * stage's input reaches its output, two ways.
 * - small-signal: −20·log10|Vout/Vin| at `freq` from the stage linearised
 *   at its nominal DC point (the definition of power-supply rejection
 *   ratio in regulator datasheets; JEDEC JESD99C); DC benches only;
 * - at periodic steady state: 20·log10(input p-p / output p-p) over one
 *   cycle, the input ripple being a sine of `amp` added to a DC input, or
 *   on a sine-fed stage its own ripple at the feed.
 * When both are measured and differ by more than 0.5 dB, a warning says
 * the ripple may be large enough to drive the stage out of its linear range.
 */
import { warningAt, type Diagnostic } from '../errors.js';
import { formatSI } from '../units.js';
import type { SteadyInfo } from './periodic.js';
import type { Bench } from './bench.js';
import { positive, requireKey } from './keys.js';
import { BENCHES } from './bench.js';
import { checkOptions } from '../arguments.js';

/** Options of {@link rippleRejection}. A sine-fed stage's ripple is its own: `freq` and `amp` are not used there, and `method=ac` measures nothing (it has no small-signal method). */
export interface RippleOptions {
  /** Ripple frequency, Hz (default 100: full-wave rectified 50 Hz mains). */
  readonly freq?: number | undefined;
  /** Ripple amplitude added to a DC input, V peak (default 1 % of the nominal input). */
  readonly amp?: number | undefined;
  /** Which methods to run (default both). */
  readonly method?: 'ac' | 'tran' | 'both' | undefined;
}

/** Ripple-rejection results; a value not measured is undefined. */
export interface RippleRejection {
  /** Frequency of the injected ripple (DC benches), Hz. */
  readonly freq: number;
  /** Amplitude of the injected ripple (DC benches), V peak. */
  readonly amp: number;
  /** Small-signal rejection, dB (positive = attenuation): `ripple.rr` on a DC bench. */
  readonly smallSignal: number | undefined;
  /** Rejection at periodic steady state, dB: `ripple.rr_tran` on a DC bench, `ripple.rr` on a sine-fed one (with `feed=`). */
  readonly steady: number | undefined;
  /** Input ripple peak-to-peak at periodic steady state, V: `ripple.feed_pp` on a sine-fed bench. */
  readonly inputPp: number | undefined;
  /** `ripple.out_pp`: output peak-to-peak at periodic steady state, V. */
  readonly outPp: number | undefined;
  /** How the periodic steady state was found (undefined when no periodic run was made). */
  readonly steadyState: SteadyInfo | undefined;
  readonly warnings: readonly Diagnostic[];
}

/** Default ripple frequency, Hz: full-wave rectified 50 Hz mains (figures.md, ripple). */
export const DEFAULT_RIPPLE_FREQ = 100;

/** Default ripple amplitude added to a DC input, V peak: 1 % of the nominal input (figures.md, ripple). */
export function defaultRippleAmp(bench: Bench): number {
  return 0.01 * Math.abs(bench.input.nominal);
}

/** Largest disagreement between the methods before a warning, dB (figures.md). */
export const RIPPLE_AGREEMENT_DB = 0.5;

/** A rejection in words for a message: "41.20 dB", or, when no ripple reaches the output (an unbounded rejection), that; never "Infinity dB". */
function dbText(db: number): string {
  return Number.isFinite(db) ? `${db.toFixed(2)} dB` : db > 0 ? 'no ripple reaches the output' : 'not finite';
}

/** Measures ripple rejection by the methods asked for. Throws RailcheckError. */
export function rippleRejection(bench: Bench, opts: RippleOptions = {}): RippleRejection {
  BENCHES.check('rippleRejection', 'bench', bench);
  checkOptions('rippleRejection', opts, { freq: 'finite', amp: 'finite', method: ['ac', 'tran', 'both'] });
  const freq = opts.freq ?? DEFAULT_RIPPLE_FREQ;
  const amp = opts.amp ?? defaultRippleAmp(bench);
  const method = opts.method ?? 'both';
  requireKey('ripple', 'freq', freq, positive, '> 0 Hz');
  requireKey('ripple', 'amp', amp, (v) => Number.isFinite(v) && v !== 0, '≠ 0 V');
  const smallSignal = method === 'tran' ? undefined : bench.smallSignalRejection(freq);
  const r = method === 'ac' ? undefined : bench.steadyRipple(freq, amp);
  const steady = r?.inputPp === undefined ? undefined : 20 * Math.log10(r.inputPp / r.outputPp);
  const warnings: Diagnostic[] = [];
  if (smallSignal !== undefined && steady !== undefined && Math.abs(smallSignal - steady) > RIPPLE_AGREEMENT_DB) {
    const o = bench.stage.supply.origin;
    warnings.push(warningAt('ripple-disagree', `ripple rejection at ${formatSI(freq, 'Hz')}: the small-signal (${dbText(smallSignal)}) and transient (${dbText(steady)}) methods differ by more than ${RIPPLE_AGREEMENT_DB} dB; the ripple amplitude ${formatSI(amp, 'V')} may be large enough to drive the stage out of its linear range`, o.pos, o.lineText));
  }
  return { freq, amp, smallSignal, steady, inputPp: r?.inputPp, outPp: r?.outputPp, steadyState: r?.steady, warnings };
}
