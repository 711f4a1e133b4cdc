/**
 * Line and load regulation of a DC-fed stage (figures.md). Both are DC
 * solutions reached by continuation from the nominal point. Definitions
 * follow the way regulator datasheets state them (e.g. the line- and
 * load-regulation definitions of JEDEC JESD99C, "Terms, Definitions, and
 * Letter Symbols for Microelectronic Devices"): the change of output for a
 * stated change of input or load, the other held at nominal.
 */
import { errorAt, RailcheckError } from '../errors.js';
import { backToNominal, voutAt, type Bench } from './bench.js';

/**
 * Line regulation: output change between two inputs at nominal load. On a
 * negative rail delta and slope are taken on magnitudes (|Vout|, |Vin|).
 */
export interface LineRegulation {
  /** Input ends, V. */
  readonly from: number;
  readonly to: number;
  /** Output at each end, V (signed). */
  readonly voutFrom: number;
  readonly voutTo: number;
  /** `line.delta` = Vout(to) − Vout(from), V (|Vout| on a negative rail). */
  readonly delta: number;
  /** `line.slope` = delta / (to − from), V/V. */
  readonly slope: number;
  /** `line.pct_per_v` = 100·slope / Vout_nom, %/V. */
  readonly pctPerV: number;
}

/** Options of {@link lineRegulation}: input ends in volts (defaults 0.9 and 1.1 × nominal). */
export interface LineOptions {
  readonly from?: number | undefined;
  readonly to?: number | undefined;
}

/** Measures line regulation (figures.md, "line"). Throws RailcheckError when a point cannot be solved. */
export function lineRegulation(bench: Bench, opts: LineOptions = {}): LineRegulation {
  const nominal = bench.stage.nominalInput;
  const from = opts.from ?? 0.9 * nominal;
  const to = opts.to ?? 1.1 * nominal;
  if (from === to) throw new RailcheckError([errorAt('bad-figure', `line regulation needs two different inputs (from = to = ${from} V)`, bench.stage.supply.origin.pos)]);
  try {
    const voutFrom = voutAt(bench, { vin: from, loadAmps: bench.loadNominal }, 'line regulation, low input');
    backToNominal(bench);
    const voutTo = voutAt(bench, { vin: to, loadAmps: bench.loadNominal }, 'line regulation, high input');
    const delta = voutTo - voutFrom;
    const slope = delta / (bench.inputSign * (to - from));
    const sign = bench.outputSign;
    return { from, to, voutFrom: sign * voutFrom, voutTo: sign * voutTo, delta, slope, pctPerV: (100 * slope) / bench.voutNominal };
  } finally {
    backToNominal(bench);
  }
}

/** Load regulation: output change between two load currents at nominal input. */
export interface LoadRegulation {
  /** Load currents at the ends, A. */
  readonly from: number;
  readonly to: number;
  readonly voutFrom: number;
  readonly voutTo: number;
  /** `load.delta` = Vout(from) − Vout(to), V; positive when the output droops under load. */
  readonly delta: number;
  /** `load.pct` = 100·delta / Vout(from), %. */
  readonly pct: number;
  /** `load.rout` = delta / (to − from), Ω. */
  readonly rout: number;
}

/** Options of {@link loadRegulation}: load currents in amps (defaults 0 and the nominal load current). */
export interface LoadOptions {
  readonly from?: number | undefined;
  readonly to?: number | undefined;
}

/**
 * Measures load regulation (figures.md, "load"). With a resistor load the
 * resistance at each end is Vout_nom / I, open for I = 0.
 */
export function loadRegulation(bench: Bench, opts: LoadOptions = {}): LoadRegulation {
  const origin = bench.stage.supply.origin;
  if (bench.loadNominal === undefined) {
    throw new RailcheckError([errorAt('no-load', 'the load figure needs the load element named on the .supply line', origin.pos, origin.lineText, '.supply ... load=<I or R element>')]);
  }
  const from = opts.from ?? 0;
  const to = opts.to ?? bench.loadNominal;
  if (from === to) throw new RailcheckError([errorAt('bad-figure', `load regulation needs two different load currents (from = to = ${from} A)`, origin.pos, origin.lineText)]);
  try {
    const vin = bench.stage.nominalInput;
    const voutFrom = voutAt(bench, { vin, loadAmps: from }, 'load regulation, first load');
    backToNominal(bench);
    const voutTo = voutAt(bench, { vin, loadAmps: to }, 'load regulation, second load');
    const delta = voutFrom - voutTo;
    const sign = bench.outputSign;
    return { from, to, voutFrom: sign * voutFrom, voutTo: sign * voutTo, delta, pct: (100 * delta) / voutFrom, rout: delta / (to - from) };
  } finally {
    backToNominal(bench);
  }
}
