/**
 * Model parameter tables for `.model` cards (netlist.md, Models), with the
 * defaults of the published models and the range of valid values of each
 * (docs/models.md, "Valid ranges"). The reader checks names against these;
 * the elaborator checks every given value against its range and resolves a
 * card into a fully populated parameter object.
 */
import { ANY, GRADING, NON_NEGATIVE, POSITIVE, type ValueRange } from './ranges.js';

/** One model parameter: its name, default (undefined = "none"), unit, meaning and valid range. */
export interface ParamSpec {
  /** Upper-case name as written on `.model` lines. */
  readonly name: string;
  /** Default in the parameter's unit; undefined = none (the term is dropped). */
  readonly default: number | undefined;
  /** Unit symbol ('' for dimensionless). */
  readonly unit: string;
  /** What the parameter is, in the trade's words. */
  readonly doc: string;
  /** Values accepted at elaboration; a value outside is an error naming the parameter. */
  readonly range: ValueRange;
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
  /** Repetitive peak reverse voltage rating V_RRM (IEC 60747-2), V; undefined = none. */ readonly VRRM: number | undefined;
  /** Average forward current rating I_F(AV) (IEC 60747-2), A; undefined = none. */ readonly IFAV: number | undefined;
  /** Repetitive peak forward current rating I_FRM (IEC 60747-2), A; undefined = none. */ readonly IFRM: number | undefined;
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
  /** Collector-emitter voltage rating V_CEO (IEC 60747-7), V; undefined = none. */ readonly VCEMAX: number | undefined;
  /** Collector-base voltage rating V_CBO (IEC 60747-7), V; undefined = none. */ readonly VCBMAX: number | undefined;
  /** Continuous collector current rating I_C (IEC 60747-7), A; undefined = none. */ readonly ICMAX: number | undefined;
}

/** Diode parameter table, defaults per netlist.md. */
export const DIODE_PARAMS: readonly ParamSpec[] = [
  { name: 'IS', default: 1e-14, unit: 'A', doc: 'saturation current', range: POSITIVE },
  { name: 'N', default: 1, unit: '', doc: 'emission coefficient', range: POSITIVE },
  { name: 'RS', default: 0, unit: 'Ω', doc: 'series resistance', range: NON_NEGATIVE },
  { name: 'BV', default: undefined, unit: 'V', doc: 'reverse breakdown voltage', range: POSITIVE },
  { name: 'IBV', default: 1e-3, unit: 'A', doc: 'current at BV', range: POSITIVE },
  { name: 'NBV', default: 1, unit: '', doc: 'breakdown emission coefficient', range: POSITIVE },
  { name: 'CJO', default: 0, unit: 'F', doc: 'zero-bias junction capacitance', range: NON_NEGATIVE },
  { name: 'VJ', default: 1, unit: 'V', doc: 'junction potential', range: POSITIVE },
  { name: 'M', default: 0.5, unit: '', doc: 'grading coefficient', range: GRADING },
  { name: 'TT', default: 0, unit: 's', doc: 'transit time', range: NON_NEGATIVE },
  { name: 'EG', default: 1.11, unit: 'eV', doc: 'band-gap energy', range: POSITIVE },
  { name: 'XTI', default: 3, unit: '', doc: 'IS temperature exponent', range: ANY },
  { name: 'TBV', default: 0, unit: '1/K', doc: 'temperature coefficient of BV', range: ANY },
  { name: 'PMAX', default: undefined, unit: 'W', doc: 'power rating', range: POSITIVE },
  { name: 'VRRM', default: undefined, unit: 'V', doc: 'repetitive peak reverse voltage rating (VRRM)', range: POSITIVE },
  { name: 'IFAV', default: undefined, unit: 'A', doc: 'average forward current rating (IF(AV))', range: POSITIVE },
  { name: 'IFRM', default: undefined, unit: 'A', doc: 'repetitive peak forward current rating (IFRM)', range: POSITIVE },
];

/** Bipolar transistor parameter table, defaults per netlist.md. */
export const BJT_PARAMS: readonly ParamSpec[] = [
  { name: 'IS', default: 1e-16, unit: 'A', doc: 'transport saturation current', range: POSITIVE },
  { name: 'BF', default: 100, unit: '', doc: 'ideal forward beta', range: POSITIVE },
  { name: 'BR', default: 1, unit: '', doc: 'ideal reverse beta', range: POSITIVE },
  { name: 'NF', default: 1, unit: '', doc: 'forward emission coefficient', range: POSITIVE },
  { name: 'NR', default: 1, unit: '', doc: 'reverse emission coefficient', range: POSITIVE },
  { name: 'VAF', default: undefined, unit: 'V', doc: 'forward Early voltage', range: POSITIVE },
  { name: 'VAR', default: undefined, unit: 'V', doc: 'reverse Early voltage', range: POSITIVE },
  { name: 'RB', default: 0, unit: 'Ω', doc: 'base resistance', range: NON_NEGATIVE },
  { name: 'RC', default: 0, unit: 'Ω', doc: 'collector resistance', range: NON_NEGATIVE },
  { name: 'RE', default: 0, unit: 'Ω', doc: 'emitter resistance', range: NON_NEGATIVE },
  { name: 'CJE', default: 0, unit: 'F', doc: 'B-E zero-bias capacitance', range: NON_NEGATIVE },
  { name: 'CJC', default: 0, unit: 'F', doc: 'B-C zero-bias capacitance', range: NON_NEGATIVE },
  { name: 'VJE', default: 0.75, unit: 'V', doc: 'B-E junction potential', range: POSITIVE },
  { name: 'VJC', default: 0.75, unit: 'V', doc: 'B-C junction potential', range: POSITIVE },
  { name: 'MJE', default: 0.33, unit: '', doc: 'B-E grading coefficient', range: GRADING },
  { name: 'MJC', default: 0.33, unit: '', doc: 'B-C grading coefficient', range: GRADING },
  { name: 'TF', default: 0, unit: 's', doc: 'forward transit time', range: NON_NEGATIVE },
  { name: 'TR', default: 0, unit: 's', doc: 'reverse transit time', range: NON_NEGATIVE },
  { name: 'EG', default: 1.11, unit: 'eV', doc: 'band-gap energy', range: POSITIVE },
  { name: 'XTI', default: 3, unit: '', doc: 'IS temperature exponent', range: ANY },
  { name: 'XTB', default: 0, unit: '', doc: 'beta temperature exponent', range: ANY },
  { name: 'PMAX', default: undefined, unit: 'W', doc: 'power rating', range: POSITIVE },
  { name: 'VCEMAX', default: undefined, unit: 'V', doc: 'collector-emitter voltage rating (VCEO)', range: POSITIVE },
  { name: 'VCBMAX', default: undefined, unit: 'V', doc: 'collector-base voltage rating (VCBO)', range: POSITIVE },
  { name: 'ICMAX', default: undefined, unit: 'A', doc: 'continuous collector current rating (IC)', range: POSITIVE },
];


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
