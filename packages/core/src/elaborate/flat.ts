/**
 * The elaborated circuit: subcircuits flattened, parameters evaluated,
 * models bound. Names are flat (`X1.R2`, `X1.mid`) and keep their first
 * spelling; `key`s are the lower-case forms used for look-up.
 */
import type { DeviceKind, DeviceSpecs } from '@railcheck/devices';
import type { CardOrigin, FigureKind, LimitOp } from '../netlist/ast.js';
import { Brand } from '../arguments.js';
import type { PartData } from '../part-data.js';

/** Key of the ground node. */
export const GROUND_KEY = '0';

/** A circuit node: its look-up key and the name as first written. */
export interface FlatNode {
  readonly key: string;
  readonly name: string;
}

interface FlatBase {
  /** Flat name as first written, e.g. `X1.R2`. */
  readonly name: string;
  /** Lower-case flat name. */
  readonly key: string;
  /** The card that produced this element. */
  readonly origin: CardOrigin;
  /** Power rating in watts from `pmax=` (or the model's PMAX). */
  readonly pmax: number | undefined;
  /** Ratings and thermal data from the element's options (part-data.ts; units there); empty when none is given. */
  readonly part: PartData;
}

/**
 * One element of the flat circuit, discriminated by `kind`: the registry's
 * {@link DeviceSpecs} for that kind with node keys, plus name, origin and
 * rating. A kind added to the registry is an element here too.
 */
export type FlatElement = { [K in DeviceKind]: FlatBase & { readonly kind: K } & DeviceSpecs<string>[K] }[DeviceKind];

/** The flat element of one kind. */
export type FlatElementOf<K extends DeviceKind> = Extract<FlatElement, { readonly kind: K }>;

/** An analysis request with evaluated numbers (seconds, hertz, volts or amps). */
export type FlatAnalysis =
  | { readonly kind: 'op'; readonly origin: CardOrigin }
  | { readonly kind: 'dc'; readonly origin: CardOrigin; readonly source: string; readonly start: number; readonly stop: number; readonly step: number }
  | { readonly kind: 'tran'; readonly origin: CardOrigin; readonly tstep: number; readonly tstop: number; readonly tstart: number; readonly tmax: number | undefined; readonly flags: readonly string[] }
  | { readonly kind: 'ac'; readonly origin: CardOrigin; readonly variation: 'dec' | 'lin'; readonly points: number; readonly fstart: number; readonly fstop: number };

/** The `.supply` description, with names resolved to keys. */
export interface FlatSupply {
  readonly origin: CardOrigin;
  /** Key of the independent voltage source feeding the stage. */
  readonly input: string;
  /** Key of the output node. */
  readonly out: string;
  /** Key of the reference node (ground when not given). */
  readonly ref: string;
  /** Key of the load element (a current source or a resistor), if named. */
  readonly load: string | undefined;
  /** Key of the regulator's own input node (reservoir), if named. */
  readonly feed: string | undefined;
}

/** A `.figure` request; key values evaluated (ratios as plain numbers). */
export interface FlatFigure {
  readonly origin: CardOrigin;
  readonly figure: FigureKind;
  /** Keys lower-case, values evaluated (a `5%` is 0.05). */
  readonly keys: ReadonlyMap<string, number>;
  /** Keys whose value was written as a percentage (a ratio, e.g. `fall=5%` of the nominal output). */
  readonly percentKeys: ReadonlySet<string>;
  /** `method=` of a ripple figure. */
  readonly method: 'ac' | 'tran' | 'both' | undefined;
}

/** A `.limit` check. */
export interface FlatLimit {
  readonly origin: CardOrigin;
  /** Dotted figure name, e.g. `line.delta`. */
  readonly figure: string;
  readonly op: LimitOp;
  readonly value: number;
}

/** A `.spread` tolerance. */
export interface FlatSpread {
  readonly origin: CardOrigin;
  /** Element key, or `model.PARAM`. */
  readonly target: string;
  readonly ratio: number;
  readonly distribution: 'uniform' | 'gauss';
  /** For a `model.PARAM` target: `each` element draws its own factor, `lot` one for all; undefined when the line names none (the spread's option decides; docs/spread.md). */
  readonly sampling: 'each' | 'lot' | undefined;
}

/** A top-level `.param` value after evaluation (the last assignment of a name wins, as in elaboration). */
export interface FlatParam {
  /** Lower-case name. */
  readonly key: string;
  /** The name as first written. */
  readonly name: string;
  /** The evaluated value (a plain number; parameters carry no unit). */
  readonly value: number;
  /** The `.param` card that first assigns it. */
  readonly origin: CardOrigin;
}

/** The whole elaborated circuit, ready to compile. */
export interface FlatCircuit {
  readonly title: string;
  readonly file: string;
  /** Every node except ground, in order of first appearance. */
  readonly nodes: readonly FlatNode[];
  readonly elements: readonly FlatElement[];
  readonly analyses: readonly FlatAnalysis[];
  /** Temperatures in °C at which everything runs (default [27]). */
  readonly temperatures: readonly number[];
  readonly supply: FlatSupply | undefined;
  readonly figures: readonly FlatFigure[];
  readonly limits: readonly FlatLimit[];
  readonly spreads: readonly FlatSpread[];
  /** The top-level `.param` values, in order of first assignment (subcircuit parameters are not listed: they live in their instances' element values). */
  readonly params: readonly FlatParam[];
}

/** Flat circuits elaborate made: compileCircuit tells a failure on one of them (a bug) from one on a circuit edited by hand. */
export const FLAT_CIRCUITS: Brand<FlatCircuit> = new Brand<FlatCircuit>('a flat circuit as elaborate returns it');

/** What is wrong with `v` as a FlatCircuit at first sight (its strings and lists), or undefined. */
export function flatShapeProblem(v: unknown): string | undefined {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) return 'not an object';
  const c = v as Record<string, unknown>;
  for (const name of ['title', 'file'] as const) if (typeof c[name] !== 'string') return `its ${name} is not a string`;
  for (const name of ['nodes', 'elements', 'analyses', 'temperatures', 'figures', 'limits', 'spreads'] as const) if (!Array.isArray(c[name])) return `its ${name} are not an array`;
  return undefined;
}
