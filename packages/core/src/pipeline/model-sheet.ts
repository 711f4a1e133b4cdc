/**
 * The datasheet values a model implies (docs/models.md, "Datasheet form";
 * `railcheck model`): the model is put in the test circuits a datasheet's
 * values are measured in and simulated (operating points of the whole
 * pipeline, so the values are those the model gives in any netlist):
 *
 * - diode: VF = V(anode) with a current source of IF forward through it;
 *   a model with BV: VZ with IZT driven in reverse, ZZT = ΔV/ΔI for a step
 *   of ±1 % of IZT about it (central difference), ZZK likewise at IZK, and
 *   TCVZ = (VZ(28 °C) − VZ(26 °C))/2 K;
 * - transistor: at VCE from a voltage source, the base driven by a current
 *   source searched (secant on its logarithm) until IC = ICHFE: HFE = IC/IB;
 *   VBE = V(base) where IC = ICVBE; HOE = ΔIC/ΔVCE at that base current
 *   for VCE ± 0.5 V (central difference; h_oe is the output admittance
 *   with the base current held, IEC 60747-7 h-parameters, from memory).
 *
 * The test currents and voltage are the model's own datasheet keys when it
 * is written in the datasheet form, else the documented defaults (or the
 * caller's). Each value comes with the conditions it was measured at.
 *
 * {@link resolveModelCard} gives the physical parameters a card stands for
 * (the datasheet form resolved by devices/datasheet.ts, as elaboration
 * does) and a `.model` line of them that reads back exactly.
 */
import { DEFAULT_IC_TEST, DEFAULT_IZT, DEFAULT_VCE_TEST, modelKindOf, paramTable, type ModelType } from '@railcheck/devices';
import { errorAt, type Diagnostic } from '../errors.js';
import type { ModelCard, Netlist } from '../netlist/ast.js';
import { printValue } from '../netlist/print.js';
import { parseNetlist } from '../netlist/index.js';
import { createEvaluator } from '../elaborate/evaluate.js';
import { resolveModelParams } from '../elaborate/elements.js';
import { topScope } from '../elaborate/scope.js';
import { argumentDiagnostic, argumentError, checkString, isRecord } from '../arguments.js';
import { formatSI } from '../units.js';
import { runNetlist } from './run.js';

/** Test conditions of the implied datasheet values (A, V); unset: the model's own datasheet keys, else the defaults. */
export interface SheetConditions {
  /** Forward currents of the VF points, A (default the model's IF, IF2, IF3, else 10 mA). */
  readonly if?: readonly number[] | undefined;
  /** Zener test current, A (default the model's IZT, else its IBV). */
  readonly izt?: number | undefined;
  /** Knee current, A (default the model's IZK; none: no ZZK). */
  readonly izk?: number | undefined;
  /** Collector current of the gain point, A (default the model's ICHFE, else 10 mA). */
  readonly ichfe?: number | undefined;
  /** Collector current of the VBE point, A (default the model's ICVBE, else ICHFE). */
  readonly icvbe?: number | undefined;
  /** Collector-emitter voltage of the transistor's points, V (default the model's VCE, else 5 V). */
  readonly vce?: number | undefined;
}

/** One implied datasheet value: its key (as the datasheet form names it), value in SI units, unit, and the conditions in words and as numbers. */
export interface SheetValue {
  readonly key: string;
  readonly value: number;
  readonly unit: string;
  /** The test conditions in words, e.g. `IZT = 5 mA, a step of ±1 %`. */
  readonly at: string;
  /** The test conditions as numbers, SI units: IF, IZT, IZK, IC (A), VCE and its step DVCE (V), IB (A, the base current held for HOE), T1/T2 (°C). */
  readonly conditions: Readonly<Record<string, number>>;
}

/** The outcome: the values a model implies, or the errors that stopped the test circuits. */
export type ImpliedSheet = { readonly ok: true; readonly type: ModelType; readonly values: readonly SheetValue[] } | { readonly ok: false; readonly errors: readonly Diagnostic[] };

/** The `.model` line of a card, its values as written (numbers, or expressions in braces), under `name` (default the card's). Throws RailcheckError (`bad-argument`) for a `card` that is not a `.model` card. */
export function modelLine(card: ModelCard, name?: string): string {
  if (!isRecord(card) || card['kind'] !== 'model' || !Array.isArray(card['params']) || typeof card['type'] !== 'string') throw argumentError('modelLine', 'card', 'a .model card (from parseNetlist or readModelLine)', card);
  if (name !== undefined && typeof name !== 'string') throw argumentError('modelLine', 'name', 'a model name', name);
  name ??= card.name;
  return `.model ${name} ${card.type} (${card.params.map((p) => `${p.name}=${printValue(p.value)}`).join(' ')})`;
}


/** The operating points of a test circuit, one per temperature: node voltages and element currents. Throws SheetFailure with the errors of a circuit that does not solve. */
function op(lines: readonly string[], temps?: readonly number[]): { nodes: Readonly<Record<string, number>>; currents: Readonly<Record<string, number>> }[] {
  const r = runNetlist([...lines, ...(temps ? [`.temp ${temps.join(' ')}`] : []), '.op', '.end', ''].join('\n'), { file: '(model test circuit)' });
  if (!r.ok) throw new SheetFailure(r.errors);
  return r.report.operatingPoints.map((p) => ({ nodes: p.nodes, currents: p.currents }));
}

/** Number text that reads back exactly. */
const n = (x: number): string => String(x);


/** The values of the resolved `card` (physical parameters, plain numbers), the test conditions defaulting to the datasheet keys `given` (evaluated, upper-case); throws SheetFailure from a test circuit. */
function measureSheet(card: ModelCard, given: ReadonlyMap<string, number>, conditions: SheetConditions): ImpliedSheet {
  const model = modelLine(card, 'M');
  const kind = modelKindOf(card.type);
  const values: SheetValue[] = [];
  if (kind === 'diode') {
    const ifs = conditions.if ?? (['IF', 'IF2', 'IF3'].map((k) => given.get(k)).filter((x): x is number => x !== undefined));
    const forward = ifs.length > 0 ? ifs : [DEFAULT_IC_TEST];
    forward.forEach((i, k) => {
      const r = op(['diode forward point', `I1 0 a ${n(i)}`, 'D1 a 0 M', model]);
      values.push({ key: k === 0 ? 'VF' : `VF${k + 1}`, value: r[0]!.nodes['a']!, unit: 'V', at: `IF = ${formatSI(i, 'A')}`, conditions: { IF: i } });
    });
    // A model with breakdown: the Zener's values.
    const hasBv = card.params.some((p) => p.name.toUpperCase() === 'BV');
    if (hasBv) {
      const izt = conditions.izt ?? given.get('IZT') ?? (given.has('VZ') ? DEFAULT_IZT : (given.get('IBV') ?? 1e-3));
      const zener = (i: number, temps?: readonly number[]): number[] => {
        const r = op(['zener point', `I1 0 k ${n(i)}`, 'D1 0 k M', model], temps);
          return r.map((p) => p.nodes['k']!);
      };
      const [vz] = zener(izt);
      values.push({ key: 'VZ', value: vz!, unit: 'V', at: `IZT = ${formatSI(izt, 'A')}`, conditions: { IZT: izt } });
      const slope = (i: number): number => (zener(1.01 * i)[0]! - zener(0.99 * i)[0]!) / (0.02 * i);
      values.push({ key: 'ZZT', value: slope(izt), unit: 'Ω', at: `IZT = ${formatSI(izt, 'A')}, a step of ±1 %`, conditions: { IZT: izt } });
      const izk = conditions.izk ?? given.get('IZK');
      if (izk !== undefined) values.push({ key: 'ZZK', value: slope(izk), unit: 'Ω', at: `IZK = ${formatSI(izk, 'A')}, a step of ±1 %`, conditions: { IZK: izk } });
      const [cold, warm] = zener(izt, [26, 28]);
      values.push({ key: 'TCVZ', value: (warm! - cold!) / 2, unit: 'V/K', at: `IZT = ${formatSI(izt, 'A')}, 26 °C to 28 °C`, conditions: { IZT: izt, T1: 26, T2: 28 } });
    }
    return { ok: true, type: card.type, values };
  }
  const pnp = card.type === 'PNP';
  const vce = conditions.vce ?? given.get('VCE') ?? DEFAULT_VCE_TEST;
  const ichfe = conditions.ichfe ?? given.get('ICHFE') ?? DEFAULT_IC_TEST;
  const icvbe = conditions.icvbe ?? given.get('ICVBE') ?? ichfe;
  // Magnitudes: a PNP's collector sits at −VCE and its base current flows out.
  const point = (ib: number, v: number): { ic: number; vbe: number } => {
    const r = op(['transistor point', `VC c 0 ${n(pnp ? -v : v)}`, pnp ? `IB b 0 ${n(ib)}` : `IB 0 b ${n(ib)}`, 'Q1 c b 0 M', model]);
    return { ic: Math.abs(r[0]!.currents['Q1.c']!), vbe: Math.abs(r[0]!.nodes['b']!) };
  };
  /** The base current (A) that gives a collector current of `ic` A at VCE: secant on ln IB against ln IC. */
  const baseFor = (ic: number): number => {
    let x0 = Math.log(ic / 100);
    let f0 = Math.log(point(Math.exp(x0), vce).ic / ic);
    let x1 = x0 - f0;
    for (let k = 0; k < 40; k++) {
      const f1 = Math.log(point(Math.exp(x1), vce).ic / ic);
      if (Math.abs(f1) < 1e-12) return Math.exp(x1);
      const x2 = f1 === f0 ? x1 - f1 : x1 - (f1 * (x1 - x0)) / (f1 - f0);
      [x0, f0, x1] = [x1, f1, x2];
    }
    throw new SheetFailure([errorAt('model-test', `no base current gives IC = ${ic} A at VCE = ${vce} V`, undefined, undefined, 'a transistor model in forward operation at the test point')]);
  };
  const ibh = baseFor(ichfe);
  values.push({ key: 'HFE', value: ichfe / ibh, unit: '', at: `IC = ${formatSI(ichfe, 'A')}, VCE = ${formatSI(vce, 'V')}`, conditions: { IC: ichfe, VCE: vce } });
  const ibv = icvbe === ichfe ? ibh : baseFor(icvbe);
  values.push({ key: 'VBE', value: point(ibv, vce).vbe, unit: 'V', at: `IC = ${formatSI(icvbe, 'A')}, VCE = ${formatSI(vce, 'V')}`, conditions: { IC: icvbe, VCE: vce } });
  const dv = Math.min(0.5, vce / 4);
  values.push({ key: 'HOE', value: (point(ibh, vce + dv).ic - point(ibh, vce - dv).ic) / (2 * dv), unit: 'S', at: `IC = ${formatSI(ichfe, 'A')}, VCE = ${formatSI(vce, 'V')} ± ${formatSI(dv, 'V')}, IB held`, conditions: { IC: ichfe, VCE: vce, DVCE: dv, IB: ibh } });
  return { ok: true, type: card.type, values };
}

/** A test circuit that could not be solved: carries its errors out of the nested searches. */
class SheetFailure extends Error {
  constructor(readonly diagnostics: readonly Diagnostic[]) {
    super(diagnostics.map((d) => d.message).join('; '));
  }
}

/**
 * The datasheet values a `.model` card implies (see the module comment):
 * the card is resolved ({@link resolveModelCard}; or `model` is the
 * resolution already made) and its physical parameters put in the test
 * circuits. Values in SI units (V, A, Ω, V/K,
 * S); the test conditions are `conditions`, else the card's own datasheet
 * keys, else the defaults of devices/datasheet.ts (IZT 5 mA, IC 10 mA,
 * VCE 5 V, IF 10 mA). The errors are the card's (out of range, datasheet
 * values that do not resolve) or those of a test circuit that could not be
 * solved.
 */
export function impliedDatasheet(model: ModelCard | ResolvedModel, conditions: SheetConditions = {}, options: ResolveModelOptions = {}): ImpliedSheet {
  const wrong = conditionsProblem(conditions);
  if (wrong) return { ok: false, errors: [wrong] };
  // A resolution made before (resolveModelCard's result), or a card to resolve (guarded there).
  const made = isRecord(model) && ((model['ok'] === true && isRecord(model['card']) && typeof model['line'] === 'string') || (model['ok'] === false && Array.isArray(model['errors'])));
  const resolved = made ? (model as ResolvedModel) : resolveModelCard(model as ModelCard, options);
  if (!resolved.ok) return resolved;
  try {
    return measureSheet(resolved.card, resolved.given, conditions);
  } catch (e) {
    if (e instanceof SheetFailure) return { ok: false, errors: e.diagnostics };
    throw e;
  }
}

/** A conditions argument that is not one: the bad-argument diagnostic. */
function conditionsProblem(c: unknown): Diagnostic | undefined {
  if (!isRecord(c)) return argumentDiagnostic('impliedDatasheet', 'conditions', 'an object of test conditions', c);
  const positive = (v: unknown): boolean => typeof v === 'number' && Number.isFinite(v) && v > 0;
  for (const k of ['izt', 'izk', 'ichfe', 'icvbe', 'vce'] as const) {
    if (c[k] !== undefined && !positive(c[k])) return argumentDiagnostic('impliedDatasheet', `conditions.${k}`, 'a positive finite number', c[k]);
  }
  const ifs = c['if'];
  if (ifs !== undefined && (!Array.isArray(ifs) || ifs.length === 0 || ifs.length > 3 || !ifs.every(positive))) return argumentDiagnostic('impliedDatasheet', 'conditions.if', 'one to three positive finite currents', ifs);
  return undefined;
}

/** Values of top-level parameters a card's expressions may use (lower-case names → value). */
export interface ResolveModelOptions {
  /** `.param` values by lower-case name (default none: the card's values must be numbers or expressions of constants). */
  readonly params?: ReadonlyMap<string, number> | undefined;
}

/**
 * A model card resolved: its physical parameters (docs/models.md, SI units,
 * upper-case names; the datasheet keys replaced by what they fix, every other
 * value as given), the values as written (evaluated, datasheet keys among
 * them), the defaults the datasheet form took, and a `.model` line of the
 * physical parameters whose numbers read back exactly (the shortest text
 * that round-trips) with its card.
 */
export type ResolvedModel =
  | {
      readonly ok: true;
      readonly name: string;
      readonly type: ModelType;
      readonly params: ReadonlyMap<string, number>;
      readonly given: ReadonlyMap<string, number>;
      readonly filled: readonly string[];
      readonly line: string;
      readonly card: ModelCard;
    }
  | { readonly ok: false; readonly errors: readonly Diagnostic[] };

/**
 * Resolves a `.model` card as elaboration does: each value evaluated
 * (`options.params` for the names of `.param`), checked against its range,
 * and the datasheet form (VZ/IZT/ZZT..., HFE/ICHFE/VBE...) turned into the
 * physical parameters by the equations of packages/devices/src/datasheet.ts
 * (Shockley's equation and the breakdown term inverted at the test points;
 * the Ebers-Moll transport model with Early effect inverted at IC and VCE).
 * Parameters left unset keep the defaults of docs/models.md and are not
 * listed. Errors carry the card's file, line and column.
 */
export function resolveModelCard(card: ModelCard, options: ResolveModelOptions = {}): ResolvedModel {
  if (!isRecord(card) || card['kind'] !== 'model' || !Array.isArray(card['params'])) return { ok: false, errors: [argumentDiagnostic('resolveModelCard', 'card', 'a .model card (from parseNetlist or readModelLine)', card)] };
  if (!isRecord(options) || (options.params !== undefined && !(options.params instanceof Map))) return { ok: false, errors: [argumentDiagnostic('resolveModelCard', 'options', 'an object with params a Map of parameter values', options)] };
  const ev = createEvaluator();
  const scope = topScope();
  for (const [k, v] of options.params ?? []) scope.params.set(k.toLowerCase(), v);
  ev.at(card);
  const r = resolveModelParams({ scope, ev, noteNode: () => undefined, reported: new Set() }, card, scope);
  if (ev.errorCount() > 0) return { ok: false, errors: ev.diagnostics.filter((d) => d.severity === 'error') };
  const order = paramTable(card.type).map((p) => p.name);
  const rank = (k: string): number => (order.includes(k) ? order.indexOf(k) : order.length);
  const params = new Map([...r.params].sort(([a], [b]) => rank(a) - rank(b)));
  const line = `.model ${card.name} ${card.type} (${[...params].map(([k, v]) => `${k}=${String(v)}`).join(' ')})`;
  const read = readModelLine(line);
  if (!read.ok) return read;
  return { ok: true, name: card.name, type: card.type, params, given: r.given, filled: r.filled, line, card: read.card };
}

/**
 * The model `name` (any case) of a read netlist resolved ({@link
 * resolveModelCard}) with the netlist's top-level `.param` values, or the
 * errors (no such model, a parameter or value that does not evaluate).
 */
export function resolveNetlistModel(netlist: Netlist, name: string): ResolvedModel {
  if (!isRecord(netlist) || !Array.isArray(netlist['cards'])) return { ok: false, errors: [argumentDiagnostic('resolveNetlistModel', 'netlist', 'a netlist from parseNetlist or readNetlistFile', netlist)] };
  if (typeof name !== 'string') return { ok: false, errors: [argumentDiagnostic('resolveNetlistModel', 'name', 'a model name', name)] };
  const card = findModelCard(netlist, name);
  if (!card) {
    const names = netlist.cards.filter((c): c is ModelCard => c.kind === 'model').map((c) => c.name);
    return { ok: false, errors: [errorAt('unknown-model', `${netlist.file} has no top-level .model ${name}`, undefined, undefined, names.length > 0 ? `one of its models: ${names.join(', ')}` : 'a netlist with a .model line')] };
  }
  const ev = createEvaluator();
  const scope = topScope();
  for (const c of netlist.cards) {
    if (c.kind !== 'param') continue;
    ev.at(c);
    for (const a of c.assignments) scope.params.set(a.name.toLowerCase(), ev.num(a.value, scope));
  }
  if (ev.errorCount() > 0) return { ok: false, errors: ev.diagnostics.filter((d) => d.severity === 'error') };
  return resolveModelCard(card, { params: scope.params });
}

/** The first top-level `.model` card named `name` (any case) of a read netlist, or undefined. Throws RailcheckError (`bad-argument`) for arguments of the wrong type. */
export function findModelCard(netlist: Netlist, name: string): ModelCard | undefined {
  if (!isRecord(netlist) || !Array.isArray(netlist['cards'])) throw argumentError('findModelCard', 'netlist', 'a netlist from parseNetlist or readNetlistFile', netlist);
  checkString('findModelCard', 'name', name);
  return netlist.cards.find((c): c is ModelCard => c.kind === 'model' && c.name.toLowerCase() === name.toLowerCase());
}

/**
 * The `.model` card of one line of text (`.model NAME TYPE (...)`), or the
 * reader's errors. The text is read as line 2 of a netlist `file` (default
 * `(model line)`) whose line 1 is a title, so places name line 2.
 */
export function readModelLine(line: string, file = '(model line)'): { ok: true; card: ModelCard } | { ok: false; errors: readonly Diagnostic[] } {
  if (typeof line !== 'string' || line.includes('\n')) return { ok: false, errors: [argumentDiagnostic('readModelLine', 'line', 'one line of text', line)] };
  if (typeof file !== 'string') return { ok: false, errors: [argumentDiagnostic('readModelLine', 'file', 'a string', file)] };
  const parsed = parseNetlist(`model\n${line}\n`, { file });
  if (!parsed.ok) return { ok: false, errors: parsed.errors };
  const card = parsed.netlist.cards.find((c): c is ModelCard => c.kind === 'model');
  return card ? { ok: true, card } : { ok: false, errors: [errorAt('no-model', 'the text holds no .model line', undefined, undefined, '.model NAME D|NPN|PNP (key=value ...)')] };
}
