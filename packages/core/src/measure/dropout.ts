/**
 * Dropout of a DC-fed stage (figures.md): the input at which the output
 * has fallen by `fall` (default 100 mV, the customary regulator-datasheet
 * criterion) below its nominal value, the load held at nominal. Found by
 * continuation downward from nominal to bracket the crossing, then the
 * Illinois variant of regula falsi (Dowell and Jarratt, BIT 11, 1971),
 * which keeps the bracket and converges superlinearly.
 */
import { errorAt, RailcheckError } from '../errors.js';
import { formatSI } from '../units.js';
import { backToNominal, voutAt, type Bench } from './bench.js';
import type { FlatFigure } from '../elaborate/flat.js';

/** The dropout figures. */
export interface Dropout {
  /** The fall that defines dropout, V. */
  readonly fall: number;
  /** `dropout.vin`: input at which Vout = Vout_nom − fall, V. */
  readonly vin: number;
  /** `dropout.v` = vin − Vout(vin), V: the input-output differential (magnitudes on a negative rail). */
  readonly v: number;
  /** `dropout.headroom` = nominal input − vin, V. */
  readonly headroom: number;
}

/** Default fall, V (figures.md). */
export const DEFAULT_DROPOUT_FALL = 0.1;

/** The `fall=` key of a figure in volts: written as `5%` it is a ratio of Vout_nom, a plain number is volts; default 100 mV. */
export function fallVolts(f: FlatFigure | undefined, voutNominal: number): number {
  const v = f?.keys.get('fall');
  if (v === undefined) return DEFAULT_DROPOUT_FALL;
  return f!.percentKeys.has('fall') ? v * voutNominal : v;
}

/** Bracketing steps down from nominal to zero (each a continuation solve). */
const BRACKET_STEPS = 40;

/** Width of the final bracket, V: well inside the 1 mV figures.md asks for. */
const INPUT_TOLERANCE = 1e-4;

/** Finds the dropout input. `fall` (V) defaults to 100 mV. Throws RailcheckError if the output never falls that far. */
export function dropout(bench: Bench, fall = DEFAULT_DROPOUT_FALL): Dropout {
  const origin = bench.stage.supply.origin;
  const nominal = bench.stage.nominalInput;
  const target = bench.voutNominal - fall;
  const load = bench.loadNominal;
  const f = (vin: number): number => voutAt(bench, { vin, loadAmps: load }, 'dropout search') - target;
  try {
    let hi = nominal;
    let fHi = bench.voutNominal - target;
    let lo = Number.NaN;
    let fLo = Number.NaN;
    for (let k = 1; k <= BRACKET_STEPS; k++) {
      const vin = nominal * (1 - k / BRACKET_STEPS);
      const fv = f(vin);
      if (fv < 0) {
        lo = vin;
        fLo = fv;
        break;
      }
      hi = vin;
      fHi = fv;
    }
    if (Number.isNaN(lo)) {
      throw new RailcheckError([errorAt('no-dropout', `the output never falls by ${formatSI(fall, 'V')} below its nominal ${formatSI(bench.voutNominal, 'V')}, even with the input at 0 V`, origin.pos, origin.lineText, 'a stage whose output depends on its input, or a smaller fall=')]);
    }
    // Illinois: regula falsi that halves the stale end's weight. `lo` is the end where the output has
    // fallen too far (f < 0), `hi` the end where it has not; on a negative rail lo > hi.
    let side = 0;
    for (let iter = 0; iter < 100 && Math.abs(hi - lo) > INPUT_TOLERANCE; iter++) {
      let vin = (lo * fHi - hi * fLo) / (fHi - fLo);
      if (!(vin > Math.min(lo, hi) && vin < Math.max(lo, hi))) vin = 0.5 * (lo + hi);
      const fv = f(vin);
      if (fv < 0) {
        lo = vin;
        fLo = fv;
        if (side === -1) fHi /= 2;
        side = -1;
      } else {
        hi = vin;
        fHi = fv;
        if (side === 1) fLo /= 2;
        side = 1;
      }
    }
    const vinStar = Math.abs(fLo) < Math.abs(fHi) ? lo : hi;
    const voutStar = f(vinStar) + target;
    // On a negative rail both are magnitudes: |Vin*| − |Vout|, |Vin_nom| − |Vin*|.
    const s = bench.inputSign;
    return { fall, vin: vinStar, v: s * vinStar - voutStar, headroom: s * (nominal - vinStar) };
  } finally {
    backToNominal(bench);
  }
}
