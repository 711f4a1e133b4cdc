/**
 * Turns one element card into a flat element: evaluates its values in the
 * scope of its instance and binds its model.
 */
import {
  AREA_RANGE, DEVICES, MODEL_KINDS, RATING_RANGE, WAVEFORM_RANGES, buildModel, describeRange, inRange, modelKindOf, paramTable, resolveSheet, sheetKeys,
  type DeviceKind, type ModelType, type SourceSpec, type ValueField, type ValueRange, type WaveformSpec,
} from '@railcheck/devices';
import { match } from 'ts-pattern';
import { warningAt } from '../errors.js';
import type { BjtCard, CardOrigin, DeviceCard, DiodeCard, ElementCard, ModelCard, Value, Waveform } from '../netlist/ast.js';
import type { FlatElement } from './flat.js';
import { PART_DATA, PART_DATA_KEYS, type PartData, type PartDataKey } from '../part-data.js';
import { lookupModel, resolveNode, type Scope } from './scope.js';
import type { Evaluator } from './evaluate.js';

/** Everything element conversion needs besides the card. */
export interface ElementEnv {
  readonly scope: Scope;
  readonly ev: Evaluator;
  /** Records a node's first spelling. */
  readonly noteNode: (key: string, name: string) => void;
  /** Range errors already reported (a model used by several devices is reported once per mistake). */
  readonly reported: Set<string>;
}

/** Records an out-of-range error (or one of `code`) once per place and message. */
function rangeError(env: ElementEnv, at: CardOrigin, message: string, expected: string, code = 'out-of-range'): void {
  const key = `${at.pos.file}:${at.pos.line}:${at.pos.column}:${message}`;
  if (env.reported.has(key)) return;
  env.reported.add(key);
  env.ev.fail(at, code, message, expected);
}

/** Checks the evaluated `x` against `range`; an error names `what` and the value. NaN (already reported) passes. */
function checkRange(env: ElementEnv, card: DeviceCard, x: number, what: string, range: ValueRange): number {
  if (!Number.isNaN(x) && !inRange(range, x)) rangeError(env, card, `${card.name}: the ${what} ${x} is out of range`, `${what} ${describeRange(range)}`);
  return x;
}

/** Evaluates `v` and checks it against `range`. */
function ranged(env: ElementEnv, card: DeviceCard, v: Value, what: string, range: ValueRange): number {
  return checkRange(env, card, env.ev.num(v, env.scope), what, range);
}

/** The card's main value (resistance, capacitance, gain, coupling coefficient...) checked against the registry's range. */
function mainValue(env: ElementEnv, card: DeviceCard, kind: DeviceKind, v: Value): number {
  const field = DEVICES[kind].value as ValueField;
  const x = env.ev.num(v, env.scope);
  if (field.zero && x === 0) {
    env.ev.fail(card, field.zero.code, `${card.name}: the ${field.what} must not be zero`, field.zero.hint);
    return x;
  }
  return checkRange(env, card, x, field.what, field.range);
}

function nodesOf<T extends readonly string[]>(env: ElementEnv, written: T): { -readonly [K in keyof T]: string } {
  return written.map((w) => {
    const node = resolveNode(env.scope, w);
    env.noteNode(node.key, node.name);
    return node.key;
  }) as { -readonly [K in keyof T]: string };
}

function waveformSpec(ev: Evaluator, scope: Scope, w: Waveform): WaveformSpec {
  const opt = (v: Value | undefined, fallback: number): number => (v === undefined ? fallback : ev.num(v, scope));
  const optU = (v: Value | undefined): number | undefined => (v === undefined ? undefined : ev.num(v, scope));
  return match(w)
    .with({ kind: 'sin' }, (s): WaveformSpec => ({
      kind: 'sin', vo: ev.num(s.vo, scope), va: ev.num(s.va, scope), freq: ev.num(s.freq, scope),
      td: opt(s.td, 0), theta: opt(s.theta, 0), phaseDeg: opt(s.phase, 0),
    }))
    .with({ kind: 'pulse' }, (p): WaveformSpec => ({
      kind: 'pulse', v1: ev.num(p.v1, scope), v2: ev.num(p.v2, scope), td: opt(p.td, 0),
      tr: optU(p.tr), tf: optU(p.tf), pw: optU(p.pw), per: optU(p.per),
    }))
    .with({ kind: 'pwl' }, (p): WaveformSpec => ({
      kind: 'pwl', times: p.points.map((q) => ev.num(q.t, scope)), values: p.points.map((q) => ev.num(q.v, scope)),
    }))
    .exhaustive();
}

/** The waveform's value at t = 0 (netlist.md: the DC value when no `dc` is given). */
function valueAtZero(w: WaveformSpec): number {
  return match(w)
    .with({ kind: 'sin' }, (s) => s.vo + s.va * Math.sin((s.phaseDeg * Math.PI) / 180))
    .with({ kind: 'pulse' }, (p) => p.v1)
    .with({ kind: 'pwl' }, (p) => p.values[0] ?? 0)
    .with({ kind: 'sum' }, { kind: 'modulated' }, () => 0) // built by measurements only, never read from a netlist
    .exhaustive();
}

/** The place of value `v` of `card`, quoting the card's line when `v` is on it. */
function placeOf(card: CardOrigin, v: Value): CardOrigin {
  return { pos: v.pos, lineText: v.pos.line === card.pos.line && v.pos.file === card.pos.file ? card.lineText : '' };
}

/**
 * Checks each waveform argument against its range (docs/netlist.md,
 * "Waveforms"; docs/models.md, "Valid ranges"), each error at the
 * argument's own column. NaN (already reported) passes.
 */
function checkWaveform(env: ElementEnv, card: DeviceCard, w: Waveform, spec: WaveformSpec, unit: string): void {
  const check = (v: Value | undefined, x: number | undefined, what: string, unit: string, range: ValueRange): void => {
    if (v === undefined || x === undefined || Number.isNaN(x) || inRange(range, x)) return;
    rangeError(env, placeOf(card, v), `${card.name}: the ${what} ${x} ${unit} is out of range`, `${what} ${describeRange(range)} ${unit}`);
  };
  match([w, spec] as const)
    .with([{ kind: 'sin' }, { kind: 'sin' }], ([a, s]) => {
      check(a.vo, s.vo, 'sin offset', unit, WAVEFORM_RANGES.level);
      check(a.va, s.va, 'sin amplitude', unit, WAVEFORM_RANGES.level);
      check(a.freq, s.freq, 'sin frequency', 'Hz', WAVEFORM_RANGES.frequency);
      check(a.td, s.td, 'sin delay td', 's', WAVEFORM_RANGES.time);
      check(a.theta, s.theta, 'sin damping theta', '1/s', WAVEFORM_RANGES.damping);
    })
    .with([{ kind: 'pulse' }, { kind: 'pulse' }], ([a, p]) => {
      check(a.v1, p.v1, 'pulse level v1', unit, WAVEFORM_RANGES.level);
      check(a.v2, p.v2, 'pulse level v2', unit, WAVEFORM_RANGES.level);
      check(a.td, p.td, 'pulse delay td', 's', WAVEFORM_RANGES.time);
      check(a.tr, p.tr, 'pulse rise time tr', 's', WAVEFORM_RANGES.time);
      check(a.tf, p.tf, 'pulse fall time tf', 's', WAVEFORM_RANGES.time);
      check(a.pw, p.pw, 'pulse width pw', 's', WAVEFORM_RANGES.time);
      check(a.per, p.per, 'pulse period per', 's', WAVEFORM_RANGES.period);
      // The period holds the whole pulse: rise, width and fall as written (an omitted edge counts as 0 here).
      const shape = (p.tr ?? 0) + (p.pw ?? 0) + (p.tf ?? 0);
      // Relative slack of a few rounding errors: 1f + 1f + 1f is 3.0000000000000002e-15 in doubles.
      if (a.per && p.per !== undefined && p.per > 0 && p.per < shape * (1 - 1e-12)) {
        rangeError(env, placeOf(card, a.per), `${card.name}: the pulse period ${p.per} s is shorter than its rise, width and fall (${shape} s)`, 'per ≥ tr + pw + tf');
      }
    })
    .with([{ kind: 'pwl' }, { kind: 'pwl' }], ([a, p]) => {
      check(a.points[0]?.t, p.times[0], 'first pwl time', 's', WAVEFORM_RANGES.time);
      check(a.points[p.times.length - 1]?.t, p.times[p.times.length - 1], 'last pwl time', 's', WAVEFORM_RANGES.time);
      for (let k = 0; k < p.values.length; k++) check(a.points[k]?.v, p.values[k], 'pwl level', unit, WAVEFORM_RANGES.level);
      for (let k = 1; k < p.times.length; k++) {
        const t = p.times[k]!;
        const before = p.times[k - 1]!;
        if (!Number.isNaN(t) && !Number.isNaN(before) && !(t > before)) {
          env.ev.fail(placeOf(card, a.points[k]!.t), 'pwl-order', `${card.name}: pwl time ${t} s does not come after the time before it (${before} s)`, 'pwl times in increasing order');
        }
      }
    })
    .otherwise(() => undefined);
}

function sourceSpec(env: ElementEnv, card: Extract<ElementCard, { kind: 'V' | 'I' }>): SourceSpec {
  const { ev, scope } = env;
  const waveform = card.waveform ? waveformSpec(ev, scope, card.waveform) : undefined;
  const unit = card.kind === 'V' ? 'V' : 'A';
  if (card.waveform && waveform) checkWaveform(env, card, card.waveform, waveform, unit);
  const dc = card.dc !== undefined ? ranged(env, card, card.dc, 'dc value', WAVEFORM_RANGES.level) : waveform ? valueAtZero(waveform) : 0;
  return {
    dc,
    acMag: card.ac ? ranged(env, card, card.ac.mag, 'ac magnitude', WAVEFORM_RANGES.acMagnitude) : 0,
    acPhaseDeg: card.ac?.phase ? ev.num(card.ac.phase, scope) : 0,
    waveform,
  };
}

/**
 * The given parameter values of a `.model` card, evaluated in its scope and
 * each checked against its range in the model's table (docs/models.md); an
 * error names the parameter at its own line and column.
 */
function modelParams(env: ElementEnv, card: ModelCard, scope: Scope): Map<string, number> {
  return resolveModelParams(env, card, scope).params;
}

/**
 * A model card's parameters evaluated in `scope`, range-checked, and with
 * the datasheet form (devices/datasheet.ts) resolved to the physical
 * parameters of docs/models.md; `given` holds the values as written
 * (evaluated), `filled` the defaults the datasheet form took. Problems are
 * reported through `env` (once per place).
 */
export function resolveModelParams(env: ElementEnv, card: ModelCard, scope: Scope): { params: Map<string, number>; given: ReadonlyMap<string, number>; filled: readonly string[] } {
  const given = new Map<string, number>();
  const table = paramTable(card.type);
  const sheet = sheetKeys(modelKindOf(card.type));
  const placeOfParam = (name: string): CardOrigin => {
    const a = card.params.find((q) => q.name.toUpperCase() === name);
    if (!a) return { pos: card.pos, lineText: card.lineText };
    return { pos: a.pos, lineText: a.pos.line === card.pos.line && a.pos.file === card.pos.file ? card.lineText : '' };
  };
  for (const a of card.params) {
    const name = a.name.toUpperCase();
    const x = env.ev.num(a.value, scope);
    const spec = table.find((p) => p.name === name) ?? sheet.find((p) => p.name === name);
    if (spec && !Number.isNaN(x) && !inRange(spec.range, x)) {
      rangeError(env, placeOfParam(name), `.model ${card.name}: ${name}=${x} is out of range (${spec.doc})`, `${name} ${describeRange(spec.range)}`);
    }
    given.set(name, x);
  }
  if (![...given.keys()].some((k) => sheet.some((s) => s.name === k)) || [...given.values()].some(Number.isNaN)) return { params: new Map(given), given, filled: [] };
  // The datasheet form (docs/models.md, "Datasheet form"): its keys become the physical parameters they fix.
  const r = resolveSheet(modelKindOf(card.type), given);
  if (!r.ok) {
    for (const p of r.problems) rangeError(env, placeOfParam(p.key), `.model ${card.name}: ${p.message}`, p.expected, 'bad-datasheet');
    return { params: new Map([...given].filter(([k]) => !sheet.some((s) => s.name === k))), given, filled: [] };
  }
  for (const note of r.notes) {
    const at = placeOfParam(note.key);
    const key = `${at.pos.file}:${at.pos.line}:${at.pos.column}:${note.message}`;
    if (env.reported.has(key)) continue;
    env.reported.add(key);
    env.ev.diagnostics.push({ ...warningAt('datasheet-not-met', `.model ${card.name}: ${note.message}`, at.pos, at.lineText === '' ? undefined : at.lineText), expected: note.expected });
  }
  for (const [name, x] of r.params) {
    const spec = table.find((p) => p.name === name);
    if (spec && !given.has(name) && !inRange(spec.range, x)) rangeError(env, placeOfParam(sheet.find((s) => s.sets.includes(name))?.name ?? name), `.model ${card.name}: the datasheet values give ${name}=${x}, out of range (${spec.doc})`, `${name} ${describeRange(spec.range)}`);
  }
  return { params: r.params, given, filled: r.filled };
}

function bindModel(env: ElementEnv, card: DiodeCard | BjtCard, kind: 'diode' | 'bjt'): { model: ModelCard; scope: Scope } | undefined {
  const mk = MODEL_KINDS[kind];
  const wanted: readonly ModelType[] = mk.types;
  const found = lookupModel(env.scope, card.model.toLowerCase());
  if (!found) {
    env.ev.fail(card, 'unknown-model', `model '${card.model}' of ${card.name} is not defined`, `a .model ${card.model} ${wanted.join('|')} (...) line`);
    return undefined;
  }
  if (!wanted.includes(found.card.type)) {
    env.ev.fail(card, 'model-type', `${card.name} is a ${mk.title} but model '${card.model}' is of type ${found.card.type}`, `a model of type ${wanted.join(' or ')}`);
    return undefined;
  }
  return { model: found.card, scope: found.scope };
}

/** Valid temperatures of `tjmax=`, °C: above absolute zero and below 1000 °C (no semiconductor junction is rated near either; common practice, no source). */
const TJ_RANGE: ValueRange = { above: -273.15, below: 1000 };

/** The card's part data (part-data.ts), each value checked: ratings and thermal resistances within the rating range, temperatures within {@link TJ_RANGE}. */
function partData(env: ElementEnv, card: DeviceCard): PartData {
  const out: Partial<Record<PartDataKey, number>> = {};
  for (const k of PART_DATA_KEYS) {
    const v = card.part?.[k];
    if (v === undefined) continue;
    const info = PART_DATA[k];
    out[k] = ranged(env, card, v, `${info.title} (${k})`, info.temperature ? TJ_RANGE : RATING_RANGE);
  }
  return out;
}

/** Converts a non-instance element card; undefined when it had errors (already recorded). */
export function flattenElement(env: ElementEnv, card: Exclude<ElementCard, { kind: 'X' }>): FlatElement | undefined {
  const { ev, scope } = env;
  const name = scope.prefixName + card.name;
  const base = { name, key: name.toLowerCase(), origin: { pos: card.pos, lineText: card.lineText }, pmax: card.pmax ? ranged(env, card, card.pmax, 'power rating (pmax)', RATING_RANGE) : undefined, part: partData(env, card) };
  const before = ev.errorCount();
  const area = (c: DiodeCard | BjtCard): number => (c.area ? ranged(env, c, c.area, 'area', AREA_RANGE) : 1);
  const el = match(card)
    .returnType<FlatElement | undefined>()
    .with({ kind: 'R' }, (c) => ({ ...base, kind: 'resistor', nodes: nodesOf(env, c.nodes), ohms: mainValue(env, c, 'resistor', c.value) }))
    .with({ kind: 'C' }, (c) => ({ ...base, kind: 'capacitor', nodes: nodesOf(env, c.nodes), farads: mainValue(env, c, 'capacitor', c.value), ic: c.ic ? ev.num(c.ic, scope) : undefined }))
    .with({ kind: 'L' }, (c) => ({ ...base, kind: 'inductor', nodes: nodesOf(env, c.nodes), henries: mainValue(env, c, 'inductor', c.value), ic: c.ic ? ev.num(c.ic, scope) : undefined }))
    // Inductor names stay as written here; elaborate.ts resolves them in the instance scope once every element is known.
    .with({ kind: 'K' }, (c) => ({ ...base, kind: 'coupling', nodes: [], inductors: [c.inductors[0], c.inductors[1]], coupling: mainValue(env, c, 'coupling', c.coupling) }))
    .with({ kind: 'V' }, (c) => ({ ...base, kind: 'vsource', nodes: nodesOf(env, c.nodes), spec: sourceSpec(env, c) }))
    .with({ kind: 'I' }, (c) => ({ ...base, kind: 'isource', nodes: nodesOf(env, c.nodes), spec: sourceSpec(env, c) }))
    .with({ kind: 'E' }, (c) => ({ ...base, kind: 'vcvs', nodes: nodesOf(env, c.nodes), gain: mainValue(env, c, 'vcvs', c.gain) }))
    .with({ kind: 'G' }, (c) => ({ ...base, kind: 'vccs', nodes: nodesOf(env, c.nodes), gain: mainValue(env, c, 'vccs', c.gain) }))
    .with({ kind: 'F' }, (c) => ({ ...base, kind: 'cccs', nodes: nodesOf(env, c.nodes), control: c.control, gain: mainValue(env, c, 'cccs', c.gain) }))
    .with({ kind: 'H' }, (c) => ({ ...base, kind: 'ccvs', nodes: nodesOf(env, c.nodes), control: c.control, gain: mainValue(env, c, 'ccvs', c.gain) }))
    .with({ kind: 'D' }, (c) => {
      const nodes = nodesOf(env, c.nodes);
      const bound = bindModel(env, c, 'diode');
      if (!bound) return undefined;
      const model = buildModel('D', modelParams(env, bound.model, bound.scope));
      return { ...base, pmax: base.pmax ?? model.PMAX, kind: 'diode', nodes, model, modelName: bound.model.name, area: area(c) };
    })
    .with({ kind: 'Q' }, (c) => {
      const nodes = nodesOf(env, c.nodes);
      const bound = bindModel(env, c, 'bjt');
      if (!bound) return undefined;
      const model = buildModel(bound.model.type === 'PNP' ? 'PNP' : 'NPN', modelParams(env, bound.model, bound.scope));
      return { ...base, pmax: base.pmax ?? model.PMAX, kind: 'bjt', nodes, model, modelName: bound.model.name, area: area(c) };
    })
    .exhaustive();
  return ev.errorCount() === before ? el : undefined;
}
