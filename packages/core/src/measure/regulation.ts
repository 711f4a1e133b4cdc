/**
 * Line and load regulation (figures.md): the change of output for a
 * stated change of input or of load, the other held at nominal. The
 * definitions follow the way regulator datasheets state them (the line-
 * and load-regulation definitions of JEDEC JESD99C, "Terms, Definitions,
 * and Letter Symbols for Microelectronic Devices"). The output is the
 * bench's: the DC output, or the mean over a cycle at periodic steady
 * state; the input is the bench's level: volts, or a ratio of the nominal
 * amplitude.
 */
import { match } from 'ts-pattern';
import { errorAt, RailcheckError } from '../errors.js';
import type { Bench } from './bench.js';
import { BENCHES } from './bench.js';
import { checkOptions } from '../arguments.js';

/** Line regulation: output change between two input levels at nominal load (magnitudes on a negative rail). */
export interface LineRegulation {
  /** Input levels at the ends: V on a DC bench, amplitude ratios on a sine-fed one. */
  readonly from: number;
  readonly to: number;
  /** Output at each end, V (signed). */
  readonly voutFrom: number;
  readonly voutTo: number;
  /** `line.delta` = Vout(to) − Vout(from), V. */
  readonly delta: number;
  /** `line.slope` = delta / (to − from), V/V (DC benches). */
  readonly slope: number | undefined;
  /** `line.pct_per_v` = 100·slope / Vout_nom, %/V (DC benches). */
  readonly pctPerV: number | undefined;
  /** `line.pct` = 100·delta / Vout_nom, % (sine-fed benches). */
  readonly pct: number | undefined;
}

/** Default ends of the line range as ratios of the nominal input (figures.md, line). */
export const LINE_FROM_RATIO = 0.9;
export const LINE_TO_RATIO = 1.1;

/** Options of {@link lineRegulation}: input levels (defaults 0.9 and 1.1 × nominal). */
export interface LineOptions {
  readonly from?: number | undefined;
  readonly to?: number | undefined;
}

/** Measures line regulation (figures.md, "line"). Throws RailcheckError when a point cannot be solved. */
export function lineRegulation(bench: Bench, opts: LineOptions = {}): LineRegulation {
  BENCHES.check('lineRegulation', 'bench', bench);
  checkOptions('lineRegulation', opts, { from: 'finite', to: 'finite' });
  const nominal = bench.input.nominal;
  const from = opts.from ?? LINE_FROM_RATIO * nominal;
  const to = opts.to ?? LINE_TO_RATIO * nominal;
  if (from === to) throw new RailcheckError([errorAt('bad-figure', `line regulation needs two different inputs (from = to = ${bench.input.describe(from)})`, bench.stage.supply.origin.pos)]);
  const load = bench.loadNominal;
  const voutFrom = bench.solve({ level: from, loadAmps: load }, 'line regulation, low input').mean;
  const voutTo = bench.solve({ level: to, loadAmps: load }, 'line regulation, high input').mean;
  const delta = voutTo - voutFrom;
  const vnom = bench.voutNominal;
  const perUnit = match(bench.input.unit)
    .with('V', () => {
      const slope = delta / (bench.input.sign * (to - from));
      return { slope, pctPerV: (100 * slope) / vnom, pct: undefined };
    })
    .with('ratio', () => ({ slope: undefined, pctPerV: undefined, pct: (100 * delta) / vnom }))
    .exhaustive();
  const sign = bench.railSign;
  return { from, to, voutFrom: sign * voutFrom, voutTo: sign * voutTo, delta, ...perUnit };
}

/** Load regulation: output change between two load currents at nominal input. */
export interface LoadRegulation {
  /** Load currents at the ends, A. */
  readonly from: number;
  readonly to: number;
  /** Output at each end, V (signed). */
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
 * resistance at each end is Vout_nom / I, open for I = 0. Throws
 * RailcheckError without a load element or when a point cannot be solved.
 */
export function loadRegulation(bench: Bench, opts: LoadOptions = {}): LoadRegulation {
  BENCHES.check('loadRegulation', 'bench', bench);
  checkOptions('loadRegulation', opts, { from: 'finite', to: 'finite' });
  const origin = bench.stage.supply.origin;
  if (bench.loadNominal === undefined) {
    throw new RailcheckError([errorAt('no-load', 'the load figure needs the load element named on the .supply line', origin.pos, origin.lineText, '.supply ... load=<I or R element>')]);
  }
  const from = opts.from ?? 0;
  const to = opts.to ?? bench.loadNominal;
  if (from === to) throw new RailcheckError([errorAt('bad-figure', `load regulation needs two different load currents (from = to = ${from} A)`, origin.pos, origin.lineText)]);
  const level = bench.input.nominal;
  const voutFrom = bench.solve({ level, loadAmps: from }, 'load regulation, first load').mean;
  const voutTo = bench.solve({ level, loadAmps: to }, 'load regulation, second load').mean;
  const delta = voutFrom - voutTo;
  const sign = bench.railSign;
  return { from, to, voutFrom: sign * voutFrom, voutTo: sign * voutTo, delta, pct: (100 * delta) / voutFrom, rout: delta / (to - from) };
}
