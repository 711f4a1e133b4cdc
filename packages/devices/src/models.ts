/**
 * Model parameter tables for `.model` cards (netlist.md, Models), with the
 * defaults of the published models. The reader checks names against these;
 * the elaborator resolves a card into a fully populated parameter object.
 */

/** One model parameter: its name, default (undefined = "none") and unit. */
export interface ParamSpec {
  readonly name: string;
  readonly default: number | undefined;
  readonly unit: string;
  readonly doc: string;
}

/** Diode model parameters (Shockley with reverse breakdown). */
export interface DiodeModel {
  /** Saturation current, A. */ readonly IS: number;
  /** Emission coefficient. */ readonly N: number;
  /** Series resistance, Ω. */ readonly RS: number;
  /** Reverse breakdown voltage, V (positive number); undefined = no breakdown. */ readonly BV: number | undefined;
  /** Current at BV, A. */ readonly IBV: number;
  /** Breakdown emission coefficient. */ readonly NBV: number;
  /** Zero-bias junction capacitance, F. */ readonly CJO: number;
  /** Junction potential, V. */ readonly VJ: number;
  /** Grading coefficient. */ readonly M: number;
  /** Transit time, s. */ readonly TT: number;
  /** Band-gap energy, eV. */ readonly EG: number;
  /** IS temperature exponent. */ readonly XTI: number;
  /** Temperature coefficient of BV, 1/K. */ readonly TBV: number;
  /** Power rating, W; undefined = none. */ readonly PMAX: number | undefined;
}

/** Bipolar transistor parameters (Ebers-Moll transport form with Early effect). */
export interface BjtModel {
  readonly polarity: 'npn' | 'pnp';
  /** Transport saturation current, A. */ readonly IS: number;
  /** Ideal forward beta. */ readonly BF: number;
  /** Ideal reverse beta. */ readonly BR: number;
  /** Forward emission coefficient. */ readonly NF: number;
  /** Reverse emission coefficient. */ readonly NR: number;
  /** Forward Early voltage, V; undefined = none. */ readonly VAF: number | undefined;
  /** Reverse Early voltage, V; undefined = none. */ readonly VAR: number | undefined;
  /** Base resistance, Ω. */ readonly RB: number;
  /** Collector resistance, Ω. */ readonly RC: number;
  /** Emitter resistance, Ω. */ readonly RE: number;
  /** B-E zero-bias capacitance, F. */ readonly CJE: number;
  /** B-C zero-bias capacitance, F. */ readonly CJC: number;
  /** B-E junction potential, V. */ readonly VJE: number;
  /** B-C junction potential, V. */ readonly VJC: number;
  /** B-E grading coefficient. */ readonly MJE: number;
  /** B-C grading coefficient. */ readonly MJC: number;
  /** Forward transit time, s. */ readonly TF: number;
  /** Reverse transit time, s. */ readonly TR: number;
  /** Band-gap energy, eV. */ readonly EG: number;
  /** IS temperature exponent. */ readonly XTI: number;
  /** Beta temperature exponent. */ readonly XTB: number;
  /** Power rating, W; undefined = none. */ readonly PMAX: number | undefined;
}

/** Diode parameter table, defaults per netlist.md. */
export const DIODE_PARAMS: readonly ParamSpec[] = [
  { name: 'IS', default: 1e-14, unit: 'A', doc: 'saturation current' },
  { name: 'N', default: 1, unit: '', doc: 'emission coefficient' },
  { name: 'RS', default: 0, unit: 'Ω', doc: 'series resistance' },
  { name: 'BV', default: undefined, unit: 'V', doc: 'reverse breakdown voltage' },
  { name: 'IBV', default: 1e-3, unit: 'A', doc: 'current at BV' },
  { name: 'NBV', default: 1, unit: '', doc: 'breakdown emission coefficient' },
  { name: 'CJO', default: 0, unit: 'F', doc: 'zero-bias junction capacitance' },
  { name: 'VJ', default: 1, unit: 'V', doc: 'junction potential' },
  { name: 'M', default: 0.5, unit: '', doc: 'grading coefficient' },
  { name: 'TT', default: 0, unit: 's', doc: 'transit time' },
  { name: 'EG', default: 1.11, unit: 'eV', doc: 'band-gap energy' },
  { name: 'XTI', default: 3, unit: '', doc: 'IS temperature exponent' },
  { name: 'TBV', default: 0, unit: '1/K', doc: 'temperature coefficient of BV' },
  { name: 'PMAX', default: undefined, unit: 'W', doc: 'power rating' },
];

/** Bipolar transistor parameter table, defaults per netlist.md. */
export const BJT_PARAMS: readonly ParamSpec[] = [
  { name: 'IS', default: 1e-16, unit: 'A', doc: 'transport saturation current' },
  { name: 'BF', default: 100, unit: '', doc: 'ideal forward beta' },
  { name: 'BR', default: 1, unit: '', doc: 'ideal reverse beta' },
  { name: 'NF', default: 1, unit: '', doc: 'forward emission coefficient' },
  { name: 'NR', default: 1, unit: '', doc: 'reverse emission coefficient' },
  { name: 'VAF', default: undefined, unit: 'V', doc: 'forward Early voltage' },
  { name: 'VAR', default: undefined, unit: 'V', doc: 'reverse Early voltage' },
  { name: 'RB', default: 0, unit: 'Ω', doc: 'base resistance' },
  { name: 'RC', default: 0, unit: 'Ω', doc: 'collector resistance' },
  { name: 'RE', default: 0, unit: 'Ω', doc: 'emitter resistance' },
  { name: 'CJE', default: 0, unit: 'F', doc: 'B-E zero-bias capacitance' },
  { name: 'CJC', default: 0, unit: 'F', doc: 'B-C zero-bias capacitance' },
  { name: 'VJE', default: 0.75, unit: 'V', doc: 'B-E junction potential' },
  { name: 'VJC', default: 0.75, unit: 'V', doc: 'B-C junction potential' },
  { name: 'MJE', default: 0.33, unit: '', doc: 'B-E grading coefficient' },
  { name: 'MJC', default: 0.33, unit: '', doc: 'B-C grading coefficient' },
  { name: 'TF', default: 0, unit: 's', doc: 'forward transit time' },
  { name: 'TR', default: 0, unit: 's', doc: 'reverse transit time' },
  { name: 'EG', default: 1.11, unit: 'eV', doc: 'band-gap energy' },
  { name: 'XTI', default: 3, unit: '', doc: 'IS temperature exponent' },
  { name: 'XTB', default: 0, unit: '', doc: 'beta temperature exponent' },
  { name: 'PMAX', default: undefined, unit: 'W', doc: 'power rating' },
];

/** Names of the parameters a model type accepts, upper-case. */
export function knownParams(type: 'D' | 'NPN' | 'PNP'): readonly string[] {
  return (type === 'D' ? DIODE_PARAMS : BJT_PARAMS).map((p) => p.name);
}

function populate(table: readonly ParamSpec[], given: ReadonlyMap<string, number>): Record<string, number | undefined> {
  const out: Record<string, number | undefined> = {};
  for (const p of table) out[p.name] = given.get(p.name) ?? p.default;
  return out;
}

/** A diode model with every parameter set: given values (upper-case keys) over the defaults. */
export function diodeModel(given: ReadonlyMap<string, number>): DiodeModel {
  return populate(DIODE_PARAMS, given) as unknown as DiodeModel;
}

/** A transistor model with every parameter set: given values over the defaults. */
export function bjtModel(polarity: 'npn' | 'pnp', given: ReadonlyMap<string, number>): BjtModel {
  return { ...(populate(BJT_PARAMS, given) as unknown as Omit<BjtModel, 'polarity'>), polarity };
}
