/**
 * The device registry: one entry per device kind, read by every layer that
 * dispatches over devices (the reader's card letters and forms, the model
 * types and their parameter tables, the element-value ranges the elaborator
 * checks, the compiler's factories, report shapes and the dissipation
 * figure). The table is a `Record` over {@link DeviceKind}, so a kind
 * without an entry fails to compile. docs/engine.md, "Adding a device",
 * lists what a new device touches.
 */

import { createBjt } from './bjt.js';
import type { DeviceKind } from './device.js';
import { createCccs, createCcvs, createVccs, createVcvs } from './controlled.js';
import { type Coupling, createCoupling } from './coupling.js';
import { createDiode } from './diode.js';
import { createCurrentSource, createVoltageSource } from './independent.js';
import { BJT_PARAMS, DIODE_PARAMS, bjtModel, diodeModel, type BjtModel, type DiodeModel, type ParamSpec } from './models.js';
import { createCapacitor, createInductor, createResistor } from './passive.js';
import { CAPACITANCE, COUPLING, GAIN, INDUCTANCE, LEVEL, NON_NEGATIVE, PLAUSIBLE, RESISTANCE, type ValueRange } from './ranges.js';
import type { SourceSpec } from './sources.js';
import type { Bjt, Capacitor, Ccvs, Cccs, CurrentSource, Diode, Inductor, Resistor, Vccs, Vcvs, VoltageSource } from './types.js';

/**
 * What a device of each kind is built from, with node fields of type `N`:
 * node keys (strings) in the elaborated circuit, unknown indices (numbers)
 * once compiled. The elaborated element is exactly this plus its name,
 * origin and rating, so the two layers cannot drift apart.
 */
export interface DeviceSpecs<N> {
  resistor: { readonly nodes: readonly [N, N]; /** Ω, > 0. */ readonly ohms: number };
  capacitor: { readonly nodes: readonly [N, N]; /** F. */ readonly farads: number; /** V. */ readonly ic: number | undefined };
  inductor: { readonly nodes: readonly [N, N]; /** H. */ readonly henries: number; /** A. */ readonly ic: number | undefined };
  vsource: { readonly nodes: readonly [N, N]; readonly spec: SourceSpec };
  isource: { readonly nodes: readonly [N, N]; readonly spec: SourceSpec };
  vcvs: { readonly nodes: readonly [N, N, N, N]; /** V/V. */ readonly gain: number };
  vccs: { readonly nodes: readonly [N, N, N, N]; /** S. */ readonly gain: number };
  cccs: { readonly nodes: readonly [N, N]; /** Key of the controlling V. */ readonly control: string; /** A/A. */ readonly gain: number };
  ccvs: { readonly nodes: readonly [N, N]; /** Key of the controlling V. */ readonly control: string; /** Ω. */ readonly gain: number };
  diode: { readonly nodes: readonly [N, N]; readonly model: DiodeModel; readonly modelName: string; readonly area: number };
  bjt: { readonly nodes: readonly [N, N, N]; readonly model: BjtModel; readonly modelName: string; readonly area: number };
  coupling: { readonly nodes: readonly []; /** Keys of the two inductors. */ readonly inductors: readonly [string, string]; /** k, 0 < k ≤ 1. */ readonly coupling: number };
}

/** Interface of each device kind, for narrowing on `device.kind`. */
export interface DeviceByKind {
  resistor: Resistor;
  capacitor: Capacitor;
  inductor: Inductor;
  vsource: VoltageSource;
  isource: CurrentSource;
  vcvs: Vcvs;
  vccs: Vccs;
  cccs: Cccs;
  ccvs: Ccvs;
  diode: Diode;
  bjt: Bjt;
  coupling: Coupling;
}

/**
 * How a card of each family is written, which the reader, the printer and
 * the elaborator each handle once: `passive` `Xn n+ n- value [ic=]`;
 * `source` (V, I with dc/ac/waveforms); `semiconductor` nodes, a model name
 * and an optional area; `voltage-controlled` four nodes and a gain;
 * `current-controlled` two nodes, a V element and a gain; `coupling` two
 * element names and a coefficient.
 */
export type CardFamily = 'passive' | 'source' | 'semiconductor' | 'voltage-controlled' | 'current-controlled' | 'coupling';

/** Model kinds: the `.model` types of each and their parameter tables. */
export const MODEL_KINDS = {
  diode: { types: ['D'], params: DIODE_PARAMS, title: 'diode' },
  bjt: { types: ['NPN', 'PNP'], params: BJT_PARAMS, title: 'transistor' },
} as const satisfies Record<string, { readonly types: readonly string[]; readonly params: readonly ParamSpec[]; readonly title: string }>;

/** A kind of model a device binds (`.model` cards). */
export type ModelKind = keyof typeof MODEL_KINDS;

/** A type written on a `.model` line. */
export type ModelType = (typeof MODEL_KINDS)[ModelKind]['types'][number];

/** Every `.model` type, in the order messages list them. */
export const MODEL_TYPES: readonly ModelType[] = Object.values(MODEL_KINDS).flatMap((m) => m.types);

/** The model kind a `.model` type belongs to. */
export function modelKindOf(type: ModelType): ModelKind {
  return (Object.keys(MODEL_KINDS) as ModelKind[]).find((k) => (MODEL_KINDS[k].types as readonly string[]).includes(type)) as ModelKind;
}

/** The parameter table of a `.model` type. */
export function paramTable(type: ModelType): readonly ParamSpec[] {
  return MODEL_KINDS[modelKindOf(type)].params;
}

/** Names of the parameters a model type accepts, upper-case. */
export function knownParams(type: ModelType): readonly string[] {
  return paramTable(type).map((p) => p.name);
}

/** A model of kind `diode` or `bjt` with every parameter set from the given values (upper-case keys) over the defaults. */
export function buildModel(type: 'D', given: ReadonlyMap<string, number>): DiodeModel;
export function buildModel(type: 'NPN' | 'PNP', given: ReadonlyMap<string, number>): BjtModel;
export function buildModel(type: ModelType, given: ReadonlyMap<string, number>): DiodeModel | BjtModel {
  return type === 'D' ? diodeModel(given) : bjtModel(type === 'PNP' ? 'pnp' : 'npn', given);
}

/** A value field of a card: the words that name it in messages and its valid range. */
export interface ValueField {
  /** E.g. 'resistance', as in "the resistance". */
  readonly what: string;
  /** Unit symbol. */
  readonly unit: string;
  /** Values accepted (checked on plain numbers by the reader, on every value by the elaborator). */
  readonly range: ValueRange;
  /** The error code of a value of exactly 0 when it has one of its own (a 0 Ω resistor), with the hint that goes with it. */
  readonly zero?: { readonly code: string; readonly hint: string };
}

/** One registry entry: everything the layers need to know about a device kind. */
export interface DeviceEntry<K extends DeviceKind> {
  /** The card letter (first letter of the element name). */
  readonly letter: string;
  /** How its card is written. */
  readonly family: CardFamily;
  /** The device in words, for messages ('resistor'). */
  readonly title: string;
  /** The written form of the card, quoted in messages. */
  readonly form: string;
  /** Names of the node fields in card order, for messages ("2 nodes (anode cathode)"). */
  readonly terminals: readonly string[];
  /** The card's main value, when it has one (resistance, gain, coupling coefficient). */
  readonly value: ValueField | undefined;
  /** The model kind it binds, if any. */
  readonly model: ModelKind | undefined;
  /** Labels of the currents its report lists ('' for the one current of a two-terminal element). */
  readonly currents: readonly string[];
  /** True when its power is heat the dissipation figure reports (resistors, diodes, transistors). */
  readonly dissipates: boolean;
  /**
   * Order of allocation: 0 for elements whose branches others look up by name
   * before any other branch exists (V, for F and H), 2 for elements that look
   * up branches of rank-1 elements (K, the inductors'), 1 for the rest. The
   * order numbers the branch unknowns.
   */
  readonly allocationRank: 0 | 1 | 2;
  /** Builds the device from its compiled spec. */
  readonly create: (name: string, spec: DeviceSpecs<number>[K]) => DeviceByKind[K];
}

const TWO = ['n+', 'n-'] as const;
const FOUR = ['n+', 'n-', 'nc+', 'nc-'] as const;

/** The registry. A new device adds its file and one entry here (docs/engine.md, "Adding a device"). */
export const DEVICES = {
  resistor: {
    letter: 'R', family: 'passive', title: 'resistor', form: 'Rname n+ n- value [pmax=W]', terminals: TWO,
    value: { what: 'resistance', unit: 'Ω', range: RESISTANCE, zero: { code: 'zero-resistance', hint: 'a resistance > 0 (use a V source of 0 V for a short)' } }, model: undefined, currents: [''], dissipates: true,
    allocationRank: 1,
    create: (name, s) => createResistor(name, s.nodes[0], s.nodes[1], s.ohms),
  },
  capacitor: {
    letter: 'C', family: 'passive', title: 'capacitor', form: 'Cname n+ n- value [ic=V] [pmax=W]', terminals: TWO,
    value: { what: 'capacitance', unit: 'F', range: CAPACITANCE }, model: undefined, currents: [''], dissipates: false,
    allocationRank: 1,
    create: (name, s) => createCapacitor(name, s.nodes[0], s.nodes[1], s.farads, s.ic),
  },
  inductor: {
    letter: 'L', family: 'passive', title: 'inductor', form: 'Lname n+ n- value [ic=A] [pmax=W]', terminals: TWO,
    value: { what: 'inductance', unit: 'H', range: INDUCTANCE }, model: undefined, currents: [''], dissipates: false,
    allocationRank: 1,
    create: (name, s) => createInductor(name, s.nodes[0], s.nodes[1], s.henries, s.ic),
  },
  coupling: {
    letter: 'K', family: 'coupling', title: 'magnetic coupling', form: 'Kname Lname1 Lname2 k', terminals: [],
    value: { what: 'coupling coefficient', unit: '', range: COUPLING }, model: undefined, currents: [], dissipates: false,
    allocationRank: 2,
    create: (name, s) => createCoupling(name, s.inductors, s.coupling),
  },
  vsource: {
    letter: 'V', family: 'source', title: 'voltage source', form: 'Vname n+ n- [[dc] value] [ac mag [phase]] [sin(...)|pulse(...)|pwl(...)] [pmax=W]', terminals: TWO,
    value: undefined, model: undefined, currents: [''], dissipates: false,
    allocationRank: 0,
    create: (name, s) => createVoltageSource(name, s.nodes[0], s.nodes[1], s.spec),
  },
  isource: {
    letter: 'I', family: 'source', title: 'current source', form: 'Iname n+ n- [[dc] value] [ac mag [phase]] [sin(...)|pulse(...)|pwl(...)] [pmax=W]', terminals: TWO,
    value: undefined, model: undefined, currents: [''], dissipates: false,
    allocationRank: 1,
    create: (name, s) => createCurrentSource(name, s.nodes[0], s.nodes[1], s.spec),
  },
  diode: {
    letter: 'D', family: 'semiconductor', title: 'diode', form: 'Dname anode cathode model [area] [pmax=W]', terminals: ['anode', 'cathode'],
    value: undefined, model: 'diode', currents: [''], dissipates: true,
    allocationRank: 1,
    create: (name, s) => createDiode(name, s.nodes[0], s.nodes[1], s.model, s.area),
  },
  bjt: {
    letter: 'Q', family: 'semiconductor', title: 'transistor', form: 'Qname collector base emitter model [area] [pmax=W]', terminals: ['collector', 'base', 'emitter'],
    value: undefined, model: 'bjt', currents: ['c', 'b', 'e'], dissipates: true,
    allocationRank: 1,
    create: (name, s) => createBjt(name, s.nodes[0], s.nodes[1], s.nodes[2], s.model, s.area),
  },
  vcvs: {
    letter: 'E', family: 'voltage-controlled', title: 'voltage-controlled voltage source', form: 'Ename n+ n- nc+ nc- gain [pmax=W]', terminals: FOUR,
    value: { what: 'gain', unit: 'V/V', range: GAIN }, model: undefined, currents: [''], dissipates: false,
    allocationRank: 1,
    create: (name, s) => createVcvs(name, s.nodes[0], s.nodes[1], s.nodes[2], s.nodes[3], s.gain),
  },
  vccs: {
    letter: 'G', family: 'voltage-controlled', title: 'voltage-controlled current source', form: 'Gname n+ n- nc+ nc- transconductance [pmax=W]', terminals: FOUR,
    value: { what: 'transconductance', unit: 'S', range: GAIN }, model: undefined, currents: [''], dissipates: false,
    allocationRank: 1,
    create: (name, s) => createVccs(name, s.nodes[0], s.nodes[1], s.nodes[2], s.nodes[3], s.gain),
  },
  cccs: {
    letter: 'F', family: 'current-controlled', title: 'current-controlled current source', form: 'Fname n+ n- vname gain [pmax=W]', terminals: TWO,
    value: { what: 'gain', unit: 'A/A', range: GAIN }, model: undefined, currents: [''], dissipates: false,
    allocationRank: 1,
    create: (name, s) => createCccs(name, s.nodes[0], s.nodes[1], s.control, s.gain),
  },
  ccvs: {
    letter: 'H', family: 'current-controlled', title: 'current-controlled voltage source', form: 'Hname n+ n- vname transresistance [pmax=W]', terminals: TWO,
    value: { what: 'transresistance', unit: 'Ω', range: GAIN }, model: undefined, currents: [''], dissipates: false,
    allocationRank: 1,
    create: (name, s) => createCcvs(name, s.nodes[0], s.nodes[1], s.control, s.gain),
  },
} as const satisfies { readonly [K in DeviceKind]: DeviceEntry<K> };

/** A card letter of some device kind. */
export type DeviceLetter = (typeof DEVICES)[DeviceKind]['letter'];

/** Every device kind, in registry order. */
export const DEVICE_KINDS: readonly DeviceKind[] = Object.keys(DEVICES) as DeviceKind[];

/** The device kind a card letter (upper-case) names, or undefined. */
export function kindOfLetter(letter: string): DeviceKind | undefined {
  return DEVICE_KINDS.find((k) => DEVICES[k].letter === letter);
}

/** The valid range of the area factor of a device that binds a model (dimensionless). */
export const AREA_RANGE: ValueRange = { above: 0, atMost: PLAUSIBLE.scaleMax };

/** The valid range of a `pmax=` rating, W. */
export const RATING_RANGE: ValueRange = { above: 0, atMost: PLAUSIBLE.scaleMax };

/**
 * Valid ranges of source waveform arguments and small-signal magnitudes
 * (docs/models.md, "Valid ranges"): levels, amplitudes and phases take any
 * finite value; these are the rest.
 */
export const WAVEFORM_RANGES = {
  /** sin frequency, Hz: a sine of 0 Hz is a DC value (write it as one), a negative one a phase flip. */
  frequency: { above: 0, atMost: PLAUSIBLE.frequencyMax },
  /** Delays, rise and fall times, pulse widths, pwl times, s: time starts at 0 and runs forward. */
  time: { atLeast: 0, atMost: PLAUSIBLE.timeMax },
  /** sin damping theta, 1/s: a negative one makes the sine grow without bound. */
  damping: NON_NEGATIVE,
  /** pulse period, s (and at least tr + pw + tf). */
  period: { above: 0, atMost: PLAUSIBLE.timeMax },
  /** `ac` magnitude, V or A: a phase of 180° turns it round. */
  acMagnitude: { atLeast: 0, atMost: PLAUSIBLE.levelMax },
  /** DC values, sine offsets and amplitudes, pulse and pwl levels, V or A. */
  level: LEVEL,
} as const satisfies Record<string, ValueRange>;

/** True for the kinds whose power the dissipation figure reports (read by measure/). */
export function dissipates(kind: DeviceKind): boolean {
  return DEVICES[kind].dissipates;
}
