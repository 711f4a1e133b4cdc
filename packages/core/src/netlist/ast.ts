/**
 * The parsed netlist: typed cards, exactly as written (names keep their
 * spelling, values stay unevaluated where they hold expressions). The reader
 * (parse) produces these; the elaborator turns them into a flat circuit.
 */
import type { CardFamily, DeviceLetter, ModelType as RegistryModelType } from '@railcheck/devices';
import type { SourcePos } from '../errors.js';
import type { FigureKind } from '../figure-registry.js';

/** Where a card came from: its position and the quoted logical line. */
export interface CardOrigin {
  /** Position of the card's first token. */
  readonly pos: SourcePos;
  /** The first physical line of the card, for quoting in messages. */
  readonly lineText: string;
}

/** An expression over parameters, parsed by the project's own parser. */
export type Expr =
  | { readonly kind: 'num'; readonly value: number }
  | { readonly kind: 'param'; readonly name: string; readonly pos: SourcePos }
  | { readonly kind: 'unary'; readonly op: '-' | '+'; readonly arg: Expr }
  | { readonly kind: 'binary'; readonly op: '+' | '-' | '*' | '/' | '^'; readonly left: Expr; readonly right: Expr }
  | { readonly kind: 'call'; readonly fn: ExprFunction; readonly args: readonly Expr[]; readonly pos: SourcePos };

/** Functions an expression may call (netlist.md). */
export type ExprFunction = 'sqrt' | 'exp' | 'ln' | 'log10' | 'abs' | 'min' | 'max' | 'pow';

import type { PartDataKey } from '../part-data.js';

/**
 * A value position: a plain number (suffixes and units already applied) or a
 * `{expr}` to be evaluated at elaboration, where parameters are known.
 */
export type Value =
  | {
      readonly kind: 'number';
      readonly value: number;
      readonly pos: SourcePos;
      readonly text: string;
      /** Written as a percentage (`5%`, value 0.05) where a ratio is accepted; tells a ratio `fall` from one in volts. */
      readonly percent?: true;
    }
  | { readonly kind: 'expr'; readonly expr: Expr; readonly pos: SourcePos; readonly text: string };

/** `name=value` pairs in source order; keys lower-cased. */
export type Assignments = ReadonlyArray<{ readonly name: string; readonly value: Value; readonly pos: SourcePos }>;

/** Time-dependent source waveforms (netlist.md, Waveforms). */
export type Waveform =
  | { readonly kind: 'sin'; readonly vo: Value; readonly va: Value; readonly freq: Value; readonly td?: Value; readonly theta?: Value; readonly phase?: Value }
  | { readonly kind: 'pulse'; readonly v1: Value; readonly v2: Value; readonly td?: Value; readonly tr?: Value; readonly tf?: Value; readonly pw?: Value; readonly per?: Value }
  | { readonly kind: 'pwl'; readonly points: ReadonlyArray<{ readonly t: Value; readonly v: Value }> };

/** Fields common to every element card. */
interface ElementBase extends CardOrigin {
  /** Element name as written, first letter included (`R1`). */
  readonly name: string;
  /** `pmax=W` power rating, when given. */
  readonly pmax?: Value;
  /** Ratings and thermal data given as options (`vmax=`, `rth=`...: part-data.ts), by lower-case key; absent when none is given. */
  readonly part?: Readonly<Partial<Record<PartDataKey, Value>>>;
}

/** Two-terminal passive element (R, C, L). */
export interface PassiveCard extends ElementBase {
  readonly kind: 'R' | 'C' | 'L';
  readonly nodes: readonly [string, string];
  readonly value: Value;
  /** `ic=` initial voltage (C) or current (L). */
  readonly ic?: Value;
}

/** Independent voltage or current source. */
export interface SourceCard extends ElementBase {
  readonly kind: 'V' | 'I';
  readonly nodes: readonly [string, string];
  /** The DC value: the `dc` value if given, else absent (the waveform's value at t = 0 applies). */
  readonly dc?: Value;
  readonly ac?: { readonly mag: Value; readonly phase?: Value };
  readonly waveform?: Waveform;
}

/** Diode `Dname anode cathode model [area]`. */
export interface DiodeCard extends ElementBase {
  readonly kind: 'D';
  readonly nodes: readonly [string, string];
  readonly model: string;
  readonly area?: Value;
}

/** Bipolar transistor `Qname c b e model [area]`. */
export interface BjtCard extends ElementBase {
  readonly kind: 'Q';
  readonly nodes: readonly [string, string, string];
  readonly model: string;
  readonly area?: Value;
}

/** Voltage-controlled sources `E`/`G n+ n- nc+ nc- gain`. */
export interface VoltageControlledCard extends ElementBase {
  readonly kind: 'E' | 'G';
  readonly nodes: readonly [string, string, string, string];
  readonly gain: Value;
}

/** Current-controlled sources `F`/`H n+ n- vname gain`. */
export interface CurrentControlledCard extends ElementBase {
  readonly kind: 'F' | 'H';
  readonly nodes: readonly [string, string];
  /** Name of the voltage source whose current controls this one. */
  readonly control: string;
  readonly gain: Value;
}

/** Magnetic coupling `Kname Lname1 Lname2 k` (netlist.md): two inductors and the coupling coefficient. */
export interface CouplingCard extends ElementBase {
  readonly kind: 'K';
  /** Names of the two coupled inductors, as written. */
  readonly inductors: readonly [string, string];
  /** Coupling coefficient k, 0 < k ≤ 1. */
  readonly coupling: Value;
}

/** Subcircuit instance `Xname node... subckt [name=value ...]`. */
export interface InstanceCard extends ElementBase {
  readonly kind: 'X';
  readonly nodes: readonly string[];
  readonly subckt: string;
  readonly params: Assignments;
}

/** Any element line. */
export type ElementCard = PassiveCard | SourceCard | DiodeCard | BjtCard | VoltageControlledCard | CurrentControlledCard | CouplingCard | InstanceCard;

/** The element cards that become devices (all but X), one card letter per registry entry. */
export type DeviceCard = Exclude<ElementCard, InstanceCard>;

/** The card type of each of the registry's card families (what the reader builds, the printer writes). */
export interface CardOfFamily {
  passive: PassiveCard;
  source: SourceCard;
  semiconductor: DiodeCard | BjtCard;
  'voltage-controlled': VoltageControlledCard;
  'current-controlled': CurrentControlledCard;
  coupling: CouplingCard;
}

/** Device type named on a `.model` line (the registry's model types). */
export type ModelType = RegistryModelType;

/** `.model name type (param=value ...)`; parameter names upper-cased and checked against the device's table. */
export interface ModelCard extends CardOrigin {
  readonly kind: 'model';
  readonly name: string;
  readonly type: ModelType;
  readonly params: Assignments;
}

/** `.param name=value ...` */
export interface ParamCard extends CardOrigin {
  readonly kind: 'param';
  readonly assignments: Assignments;
}

/** Analysis directives. */
export type AnalysisCard =
  | (CardOrigin & { readonly kind: 'op' })
  | (CardOrigin & { readonly kind: 'dc'; readonly source: string; readonly start: Value; readonly stop: Value; readonly step: Value })
  | (CardOrigin & { readonly kind: 'tran'; readonly tstep: Value; readonly tstop: Value; readonly tstart?: Value; readonly tmax?: Value; readonly flags: readonly string[] })
  | (CardOrigin & { readonly kind: 'ac'; readonly variation: 'dec' | 'lin'; readonly points: Value; readonly fstart: Value; readonly fstop: Value })
  | (CardOrigin & { readonly kind: 'temp'; readonly temps: readonly Value[] });

/** Kinds of power-supply figure (figures.md); the figure registry defines them. */
export type { FigureKind };

/** Comparison of a `.limit`. */
export type LimitOp = '<' | '<=' | '>' | '>=';

/** The project's own power-supply directives. */
export type SupplyCard =
  | (CardOrigin & { readonly kind: 'supply'; readonly input: string; readonly out: string; readonly ref?: string; readonly load?: string; readonly feed?: string })
  | (CardOrigin & {
      readonly kind: 'figure';
      readonly figure: FigureKind;
      readonly keys: Assignments;
      /** `method=ac|tran|both` of a ripple figure: a word, so it cannot live among the numeric keys. */
      readonly method?: 'ac' | 'tran' | 'both';
    })
  | (CardOrigin & { readonly kind: 'limit'; readonly figure: string; readonly op: LimitOp; readonly value: Value })
  | (CardOrigin & { readonly kind: 'spread'; readonly target: string; readonly ratio: Value; readonly distribution: 'uniform' | 'gauss'; /** Model spreads: `each` element its own factor, or one for the `lot`; absent: the spread's option decides (docs/spread.md). */ readonly sampling?: 'each' | 'lot' });

/** `.subckt name ports [name=default ...]` ... `.ends`. */
export interface SubcktDef extends CardOrigin {
  readonly kind: 'subckt';
  readonly name: string;
  readonly ports: readonly string[];
  readonly defaults: Assignments;
  /** Cards inside the definition (elements, models, params, nested definitions). */
  readonly body: readonly Card[];
}

/** Every card the reader produces. */
export type Card = ElementCard | ModelCard | ParamCard | AnalysisCard | SupplyCard | SubcktDef;

/** A whole netlist after reading (includes expanded in place). */
export interface Netlist {
  /** Line 1, as written. */
  readonly title: string;
  /** The top file's name as given. */
  readonly file: string;
  /** Top-level cards in source order (subcircuit definitions among them). */
  readonly cards: readonly Card[];
}

/** Compile-time check that the device cards are exactly the registry's letters: a letter missing on either side fails here. */
type SameLetters<A, B> = [A] extends [B] ? ([B] extends [A] ? true : never) : never;
/** Holds `true` only while {@link DeviceCard} and the registry agree. */
export type DeviceCardsMatchRegistry = SameLetters<DeviceCard['kind'], DeviceLetter>;
const lettersAgree: DeviceCardsMatchRegistry = true;
void lettersAgree;
/** Compile-time check that {@link CardOfFamily} covers the registry's families exactly. */
export type FamiliesMatchRegistry = SameLetters<keyof CardOfFamily, CardFamily>;
const familiesAgree: FamiliesMatchRegistry = true;
void familiesAgree;
