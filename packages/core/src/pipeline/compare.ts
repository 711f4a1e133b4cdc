/**
 * Compares two versions of a stage (docs/compare.md): an original netlist
 * and a modified one, run under the same conditions. The modified netlist
 * inherits the original's `.supply`, `.figure`, `.limit` and `.temp` cards
 * when it has none of its own (each kind on its own, at the netlist level,
 * before elaboration; the inherited cards keep their place in the original
 * file, so an error in one points there). Then both are run in full
 * (run.ts) and set side by side: what changed in the elaborated circuits
 * (elements, models, top-level parameters), the figures with their change
 * and whether it is for the better (figure registry, `better`), the limits
 * of both versions, the operating point of the nodes both have, and each
 * part's dissipation against its rating. Never throws for anything a
 * netlist can contain.
 */
import { dissipates } from '@railcheck/devices';
import type { SourceSpec, WaveformSpec } from '@railcheck/devices';
import { match } from 'ts-pattern';
import { type Diagnostic } from '../errors.js';
import { argumentDiagnostic, foreignFailure, isRecord } from '../arguments.js';
import { figureEntry, type Better, type FigureUnit } from '../figure-registry.js';
import { NETLISTS, netlistShapeProblem, readNetlistFile, type ParseOptions, type ParseResult } from '../netlist/index.js';
import type { Card, LimitOp, Netlist } from '../netlist/ast.js';
import type { FlatCircuit, FlatElement } from '../elaborate/flat.js';
import { limitHolds, type LimitResult } from '../measure/figures.js';
import { runParsed, type RunReport } from './run.js';

/** Which of the two netlists: the `original` (the reference) or the `modified` one. */
export type CompareSide = 'original' | 'modified';

/** Where the modified version's conditions came from: its `own` cards, cards `inherited` from the original, or `none` (neither netlist has such a card). */
export type ConditionSource = 'own' | 'inherited' | 'none';

/** The conditions the modified netlist was run under, card kind by card kind. */
export interface ConditionsUsed {
  /** The `.supply` card. */
  readonly supply: ConditionSource;
  /** The `.figure` cards (taken as a set). */
  readonly figures: ConditionSource;
  /** The `.limit` cards (taken as a set). */
  readonly limits: ConditionSource;
  /** The `.temp` cards: figures are measured at the first `.temp` temperature, so they are a condition too. */
  readonly temperatures: ConditionSource;
  /** Number of cards inherited from the original, all kinds together. */
  readonly inheritedCards: number;
  /** Kinds the modified netlist has its own cards of that say something else than the original's (`supply`, `figures`, `temperatures`): its figures were then measured under other conditions. */
  readonly differing: readonly ('supply' | 'figures' | 'temperatures')[];
}

/** One quantity of an element, model or the circuit: a number in `unit` (SI; '' for a plain number), a name, or undefined when not given. */
export type QuantityValue = number | string | undefined;

/** One quantity that differs between the versions. */
export interface QuantityChange {
  /** What it is (`resistance`, `dc`, `sin va`, a model parameter name such as `BV`, ...). */
  readonly what: string;
  /** SI unit of a number ('' for a plain number or a name). */
  readonly unit: string;
  readonly original: QuantityValue;
  readonly modified: QuantityValue;
}

/** An element's change between the versions, by flat element key (names compared case-insensitively). */
export type ElementChange =
  | { readonly change: 'added' | 'removed'; readonly element: string; readonly kind: FlatElement['kind']; /** Node names. */ readonly nodes: readonly string[] }
  | {
      readonly change: 'modified';
      /** The element's name as the modified netlist writes it. */
      readonly element: string;
      readonly kind: FlatElement['kind'];
      /** The nodes before and after, when the element was moved to other nodes (node names; compared by key). */
      readonly moved: { readonly from: readonly string[]; readonly to: readonly string[] } | undefined;
      /** Values that changed (compared with a relative tolerance of {@link SAME_VALUE_RTOL}). */
      readonly values: readonly QuantityChange[];
    };

/** A model's change, by model name (case-insensitive), over the models the elements use. */
export type ModelChange =
  | { readonly change: 'added' | 'removed'; readonly model: string; /** `diode` or `npn`/`pnp`. */ readonly type: string }
  | { readonly change: 'modified'; readonly model: string; readonly type: string; readonly params: readonly QuantityChange[] };

/** A top-level `.param` value's change (plain numbers). */
export interface ParamChange {
  readonly change: 'added' | 'removed' | 'modified';
  readonly name: string;
  readonly original: number | undefined;
  readonly modified: number | undefined;
}

/** What changed between the two elaborated circuits; empty lists when nothing did. */
export interface CircuitChanges {
  readonly elements: readonly ElementChange[];
  readonly models: readonly ModelChange[];
  readonly params: readonly ParamChange[];
}

/** One version's side of a figure value: measured (in the figure's unit), not measured (with the reason), or not asked for by that version. */
export type FigureSide =
  | { readonly status: 'measured'; readonly value: number }
  | { readonly status: 'not-measured'; readonly reason: Diagnostic }
  | { readonly status: 'absent' };

/**
 * The verdict on a figure's change (figure registry, `better`): `better`
 * or `worse`; `same` when the values agree within {@link SAME_FIGURE_RTOL};
 * `no-verdict` for a value that describes the conditions (`better: none`);
 * `not-compared` when either side has no value.
 */
export type Verdict = 'better' | 'worse' | 'same' | 'no-verdict' | 'not-compared';

/** One figure value side by side. */
export interface FigureComparison {
  /** Dotted name as the original writes it (else the modified). */
  readonly name: string;
  readonly unit: FigureUnit;
  readonly better: Better;
  readonly original: FigureSide;
  readonly modified: FigureSide;
  /** modified − original, in `unit`; undefined unless both were measured. */
  readonly absolute: number | undefined;
  /**
   * (modified − original) / |original| as a ratio (0.1 = 10 %), only where it
   * means something: both measured, the unit neither dB nor a flag nor °C, the
   * original not 0, and the two of the same sign (docs/compare.md).
   */
  readonly relative: number | undefined;
  readonly verdict: Verdict;
}

/** One version's side of a limit: its outcome, and whether that version applies the limit (its own or inherited `.limit` card). */
export type LimitSide =
  | { readonly status: 'pass' | 'fail'; readonly actual: number; readonly applied: boolean }
  | { readonly status: 'not-evaluated'; readonly reason: string; readonly applied: boolean };

/** One limit of either version (the union, matched by figure name, comparison and value), judged on both. */
export interface LimitComparison {
  readonly figure: string;
  readonly op: LimitOp;
  /** In the figure's unit. */
  readonly value: number;
  readonly original: LimitSide;
  readonly modified: LimitSide;
}

/** A node voltage both versions have (matched by node key), V against ground: the DC operating point, or the cycle average of a sine-fed stage. */
export interface NodeComparison {
  readonly node: string;
  readonly original: number;
  readonly modified: number;
}

/** One version's dissipation of a part, W. */
export interface DissipationSide {
  /** Absorbed power at the operating point (cycle average on a sine-fed stage), W. */
  readonly power: number;
  /** The dissipation figure's `pd.<element>` (the worst over nominal and the line and load corners), W, when it was measured. */
  readonly figure: number | undefined;
  /** The rating (`pmax=` or the model's PMAX), W. */
  readonly pmax: number | undefined;
  /** True when the larger of `power` and `figure` exceeds `pmax`. */
  readonly over: boolean;
}

/** A part's dissipation against its rating in both versions (undefined on the side that does not have it). */
export interface DissipationComparison {
  readonly element: string;
  readonly original: DissipationSide | undefined;
  readonly modified: DissipationSide | undefined;
}

/** Everything a comparison found. */
export interface CompareReport {
  readonly original: RunReport;
  readonly modified: RunReport;
  /** The conditions the modified version ran under. */
  readonly conditions: ConditionsUsed;
  /** Parts over their rating in the modified stage (the first thing a report shows). */
  readonly overRating: readonly DissipationComparison[];
  readonly changes: CircuitChanges;
  /** Every figure value of either version, the original's order first. */
  readonly figures: readonly FigureComparison[];
  readonly limits: readonly LimitComparison[];
  /** Nodes both versions have, in the original's order. */
  readonly nodes: readonly NodeComparison[];
  /** Node names only one version has. */
  readonly nodesOnlyIn: { readonly original: readonly string[]; readonly modified: readonly string[] };
  /** Every part that dissipates (resistors, diodes, transistors) or carries a rating, in either version. */
  readonly dissipation: readonly DissipationComparison[];
  /** Which versions work above extra-low voltage (the mains caution, code `above-elv`, is among their warnings). */
  readonly mainsFed: { readonly original: boolean; readonly modified: boolean };
}

/** The result of a comparison: a report, or the errors of the first version that failed, with which one it was. */
export type CompareResult =
  | { readonly ok: true; readonly report: CompareReport }
  | {
      readonly ok: false;
      /** The version whose errors these are (`original` is tried first). */
      readonly file: CompareSide;
      /** That netlist's file name as given. */
      readonly path: string;
      readonly errors: readonly Diagnostic[];
      readonly warnings: readonly Diagnostic[];
      /** For the modified version: the conditions it was run with (an error may sit in an inherited card, at the original's line). */
      readonly conditions: ConditionsUsed | undefined;
    };

/** Relative tolerance under which two element, model or parameter values count as equal: a few hundred ulps, so `4.7u`, `4.7e-6` and `{4.7/1e6}` are one value. */
export const SAME_VALUE_RTOL = 1e-12;

/**
 * Relative tolerance under which two figure values count as the same
 * (verdict `same`): far below what a change of a part moves, above the
 * rounding and search tolerances that another order of the circuit's
 * equations leaves in a figure (observed up to 5.4e-11 on the sensor-rail
 * example written in another order, test/core/pipeline/compare.test.ts).
 */
export const SAME_FIGURE_RTOL = 1e-9;

/** Absolute floor of the figure tolerance, in the figure's unit: a figure near zero (a line change of a few fV) is the same up to this dust. */
const SAME_FIGURE_ATOL = 1e-15;

const CONDITION_KINDS = ['supply', 'figure', 'limit', 'temp'] as const;
type ConditionKind = (typeof CONDITION_KINDS)[number];

function conditionKind(card: Card): ConditionKind | undefined {
  return (CONDITION_KINDS as readonly string[]).includes(card.kind) ? (card.kind as ConditionKind) : undefined;
}

/**
 * The modified netlist with the original's condition cards of each kind it
 * has none of (`.supply`, the `.figure` set, the `.limit` set, `.temp`),
 * appended after its own cards; and where each kind came from.
 */
export function inheritConditions(original: Netlist, modified: Netlist): { netlist: Netlist; used: Omit<ConditionsUsed, 'differing'> } {
  const has = (n: Netlist, k: ConditionKind): boolean => n.cards.some((c) => c.kind === k);
  const source = (k: ConditionKind): ConditionSource => (has(modified, k) ? 'own' : has(original, k) ? 'inherited' : 'none');
  const from = Object.fromEntries(CONDITION_KINDS.map((k) => [k, source(k)])) as Record<ConditionKind, ConditionSource>;
  const inherited = original.cards.filter((c) => {
    const k = conditionKind(c);
    return k !== undefined && from[k] === 'inherited';
  });
  const netlist = inherited.length === 0 ? modified : NETLISTS.mark({ title: modified.title, file: modified.file, cards: [...modified.cards, ...inherited] });
  return { netlist, used: { supply: from.supply, figures: from.figure, limits: from.limit, temperatures: from.temp, inheritedCards: inherited.length } };
}

/** True when two numbers (or two absent values) are equal within {@link SAME_VALUE_RTOL}. */
export function sameValue(a: QuantityValue, b: QuantityValue): boolean {
  if (typeof a === 'number' && typeof b === 'number') return a === b || Math.abs(a - b) <= SAME_VALUE_RTOL * Math.max(Math.abs(a), Math.abs(b));
  if (typeof a === 'string' && typeof b === 'string') return a.toLowerCase() === b.toLowerCase();
  return a === b;
}

type Quantity = { readonly what: string; readonly unit: string; readonly value: QuantityValue };
const q = (what: string, value: QuantityValue, unit = ''): Quantity => ({ what, value, unit });

/** The quantities of a waveform, named `<kind> <field>`. */
function waveformQuantities(w: WaveformSpec | undefined, unit: string, prefix = ''): Quantity[] {
  if (w === undefined) return [q(`${prefix}waveform`, 'none')];
  const head = q(`${prefix}waveform`, w.kind);
  return [
    head,
    ...match(w)
      .with({ kind: 'sin' }, (s) => [q('sin vo', s.vo, unit), q('sin va', s.va, unit), q('sin freq', s.freq, 'Hz'), q('sin td', s.td, 's'), q('sin theta', s.theta, '1/s'), q('sin phase', s.phaseDeg, '°')])
      .with({ kind: 'pulse' }, (p) => [q('pulse v1', p.v1, unit), q('pulse v2', p.v2, unit), q('pulse td', p.td, 's'), q('pulse tr', p.tr, 's'), q('pulse tf', p.tf, 's'), q('pulse pw', p.pw, 's'), q('pulse per', p.per, 's')])
      .with({ kind: 'pwl' }, (p) => [q('pwl points', p.times.length), ...p.times.flatMap((t, k) => [q(`pwl t${k + 1}`, t, 's'), q(`pwl v${k + 1}`, p.values[k], unit)])])
      .with({ kind: 'sum' }, (s) => s.parts.flatMap((part, k) => waveformQuantities(part, unit, `part ${k + 1} `)))
      .with({ kind: 'modulated' }, (m) => [q('vo', m.vo, unit), q('freq', m.freq, 'Hz'), q('phase', m.phaseDeg, '°'), ...m.times.flatMap((t, k) => [q(`t${k + 1}`, t, 's'), q(`amplitude${k + 1}`, m.amplitudes[k], unit)])])
      .exhaustive()
      .map((x) => ({ ...x, what: prefix + x.what })),
  ];
}

function sourceQuantities(s: SourceSpec, unit: string): Quantity[] {
  return [q('dc', s.dc, unit), q('ac magnitude', s.acMag, unit), q('ac phase', s.acPhaseDeg, '°'), ...waveformQuantities(s.waveform, unit)];
}

/** Every value of an element (its nodes apart), for the comparison. */
function elementQuantities(el: FlatElement): Quantity[] {
  const own = match(el)
    .with({ kind: 'resistor' }, (e) => [q('resistance', e.ohms, 'Ω')])
    .with({ kind: 'capacitor' }, (e) => [q('capacitance', e.farads, 'F'), q('ic', e.ic, 'V')])
    .with({ kind: 'inductor' }, (e) => [q('inductance', e.henries, 'H'), q('ic', e.ic, 'A')])
    .with({ kind: 'vsource' }, (e) => sourceQuantities(e.spec, 'V'))
    .with({ kind: 'isource' }, (e) => sourceQuantities(e.spec, 'A'))
    .with({ kind: 'vcvs' }, (e) => [q('gain', e.gain, 'V/V')])
    .with({ kind: 'vccs' }, (e) => [q('gain', e.gain, 'S')])
    .with({ kind: 'cccs' }, (e) => [q('gain', e.gain, 'A/A'), q('control', e.control)])
    .with({ kind: 'ccvs' }, (e) => [q('gain', e.gain, 'Ω'), q('control', e.control)])
    .with({ kind: 'diode' }, { kind: 'bjt' }, (e) => [q('model', e.modelName), q('area', e.area)])
    .with({ kind: 'coupling' }, (e) => [q('inductors', e.inductors.join(' ')), q('coupling', e.coupling)])
    .exhaustive();
  return [...own, q('pmax', el.pmax, 'W')];
}

function changedQuantities(a: readonly Quantity[], b: readonly Quantity[]): QuantityChange[] {
  const bs = new Map(b.map((x) => [x.what, x]));
  const out: QuantityChange[] = [];
  for (const x of a) {
    const y = bs.get(x.what);
    if (!sameValue(x.value, y?.value)) out.push({ what: x.what, unit: x.unit || (y?.unit ?? ''), original: x.value, modified: y?.value });
    bs.delete(x.what);
  }
  for (const y of bs.values()) if (y.value !== undefined) out.push({ what: y.what, unit: y.unit, original: undefined, modified: y.value });
  return out;
}

/** Node names of an element's node keys in its circuit (`0` for ground). */
function nodeNames(c: FlatCircuit, keys: readonly string[]): string[] {
  const names = new Map(c.nodes.map((n) => [n.key, n.name]));
  return keys.map((k) => names.get(k) ?? k);
}

type ModelInfo = { readonly name: string; readonly type: string; readonly params: Quantity[] };

/** The models the elements use, by lower-case name (the first element's binding of a name). */
function modelsOf(c: FlatCircuit): Map<string, ModelInfo> {
  const out = new Map<string, ModelInfo>();
  for (const el of c.elements) {
    if (el.kind !== 'diode' && el.kind !== 'bjt') continue;
    const key = el.modelName.toLowerCase();
    if (out.has(key)) continue;
    const type = el.kind === 'bjt' ? el.model.polarity : 'diode';
    const params = Object.entries(el.model).filter(([k]) => k !== 'polarity').map(([k, v]) => q(k, typeof v === 'number' ? v : undefined));
    out.set(key, { name: el.modelName, type, params });
  }
  return out;
}

/**
 * What changed between two elaborated circuits: elements (by key) added,
 * removed, moved to other nodes (by node key) or changed in value; the
 * models the elements use, parameter by parameter; the top-level `.param`
 * values. Numbers agree within {@link SAME_VALUE_RTOL}; names and node
 * keys compare case-insensitively, so a netlist written in another order,
 * spacing, case or number spelling shows no change.
 */
export function circuitChanges(a: FlatCircuit, b: FlatCircuit): CircuitChanges {
  const bEls = new Map(b.elements.map((e) => [e.key, e]));
  const aKeys = new Set(a.elements.map((e) => e.key));
  const elements: ElementChange[] = [];
  for (const ea of a.elements) {
    const eb = bEls.get(ea.key);
    if (!eb || eb.kind !== ea.kind) {
      elements.push({ change: 'removed', element: ea.name, kind: ea.kind, nodes: nodeNames(a, ea.nodes) });
      if (eb) elements.push({ change: 'added', element: eb.name, kind: eb.kind, nodes: nodeNames(b, eb.nodes) });
      continue;
    }
    const sameNodes = ea.nodes.length === eb.nodes.length && ea.nodes.every((n, i) => n === eb.nodes[i]);
    const values = changedQuantities(elementQuantities(ea), elementQuantities(eb));
    if (sameNodes && values.length === 0) continue;
    elements.push({ change: 'modified', element: eb.name, kind: eb.kind, moved: sameNodes ? undefined : { from: nodeNames(a, ea.nodes), to: nodeNames(b, eb.nodes) }, values });
  }
  for (const eb of b.elements) if (!aKeys.has(eb.key)) elements.push({ change: 'added', element: eb.name, kind: eb.kind, nodes: nodeNames(b, eb.nodes) });

  const ma = modelsOf(a);
  const mb = modelsOf(b);
  const models: ModelChange[] = [];
  for (const [key, x] of ma) {
    const y = mb.get(key);
    if (!y) models.push({ change: 'removed', model: x.name, type: x.type });
    else {
      const params = [...(x.type === y.type ? [] : [{ what: 'type', unit: '', original: x.type, modified: y.type }]), ...changedQuantities(x.params, y.params)];
      if (params.length > 0) models.push({ change: 'modified', model: y.name, type: y.type, params });
    }
  }
  for (const [key, y] of mb) if (!ma.has(key)) models.push({ change: 'added', model: y.name, type: y.type });

  const pb = new Map(b.params.map((p) => [p.key, p]));
  const params: ParamChange[] = [];
  for (const p of a.params) {
    const r = pb.get(p.key);
    if (!r) params.push({ change: 'removed', name: p.name, original: p.value, modified: undefined });
    else if (!sameValue(p.value, r.value)) params.push({ change: 'modified', name: r.name, original: p.value, modified: r.value });
  }
  const pa = new Set(a.params.map((p) => p.key));
  for (const r of b.params) if (!pa.has(r.key)) params.push({ change: 'added', name: r.name, original: undefined, modified: r.value });
  return { elements, models, params };
}

/** The relative change where it means something (see {@link FigureComparison.relative}). */
export function relativeChange(original: number, modified: number, unit: FigureUnit): number | undefined {
  // A relative change of a Celsius temperature depends on where 0 °C lies (thermal figure, docs/thermal.md).
  if (unit === 'dB' || unit === 'flag' || unit === '°C') return undefined;
  if (original === 0 || original * modified < 0) return undefined;
  return (modified - original) / Math.abs(original);
}

/** The verdict on a change from `original` to `modified` of a value that is better `better` (figure registry). */
export function verdictOf(original: number, modified: number, better: Better): Verdict {
  if (better === 'none') return 'no-verdict';
  if (Math.abs(modified - original) <= SAME_FIGURE_RTOL * Math.max(Math.abs(original), Math.abs(modified)) + SAME_FIGURE_ATOL) return 'same';
  const higher = modified > original;
  return match(better)
    .with('higher', () => (higher ? 'better' : 'worse') as Verdict)
    .with('lower', () => (higher ? 'worse' : 'better') as Verdict)
    .exhaustive();
}

/** Every figure value of a report by lower-case name, with its unit, the values not measured with their reasons, and the figures not measured as a whole, by kind. */
function figureSides(r: RunReport): { names: string[]; sides: Map<string, FigureSide>; units: Map<string, FigureUnit>; failedKinds: Map<string, Diagnostic> } {
  const names: string[] = [];
  const sides = new Map<string, FigureSide>();
  const units = new Map<string, FigureUnit>();
  const failedKinds = new Map<string, Diagnostic>();
  for (const f of r.figures?.figures ?? []) {
    if (f.ok) {
      for (const [n, v] of Object.entries(f.values)) {
        names.push(n);
        sides.set(n.toLowerCase(), { status: 'measured', value: v });
        units.set(n.toLowerCase(), f.units[n]!);
      }
      for (const v of f.notMeasured) {
        names.push(v.name);
        sides.set(v.name.toLowerCase(), { status: 'not-measured', reason: v.reason });
      }
    } else if (!failedKinds.has(f.kind)) failedKinds.set(f.kind, f.reason);
  }
  return { names, sides, units, failedKinds };
}

/**
 * One version's side of a value: measured or not measured as itself, not
 * measured because its whole figure was not, or absent. A figure not
 * measured as a whole in both versions is one row under its kind's name.
 */
function sideOf(s: ReturnType<typeof figureSides>, key: string): FigureSide {
  const own = s.sides.get(key);
  if (own) return own;
  const kind = figureEntry(key)?.kind ?? key;
  const reason = s.failedKinds.get(kind);
  return reason ? { status: 'not-measured', reason } : { status: 'absent' };
}

function compareFigures(a: RunReport, b: RunReport): FigureComparison[] {
  const fa = figureSides(a);
  const fb = figureSides(b);
  // A kind neither version measured gets one row under its name; a kind one version measured gets that version's value names.
  const kindRows = (s: ReturnType<typeof figureSides>, other: ReturnType<typeof figureSides>): string[] =>
    [...s.failedKinds.keys()].filter((k) => ![...other.names].some((n) => figureEntry(n)?.kind === k));
  const seen = new Set<string>();
  const out: FigureComparison[] = [];
  for (const name of [...fa.names, ...kindRows(fa, fb), ...fb.names, ...kindRows(fb, fa)]) {
    const key = name.toLowerCase();
    if (seen.has(key)) continue;
    seen.add(key);
    const original = sideOf(fa, key);
    const modified = sideOf(fb, key);
    const entry = figureEntry(name);
    const ua = fa.units.get(key);
    const ub = fb.units.get(key);
    const unit = ua ?? ub ?? 'ratio';
    const better = entry?.better ?? 'none';
    // Values in different units (a DC-fed and a sine-fed version: dropout.headroom in V and as a ratio) are not compared.
    if (original.status === 'measured' && modified.status === 'measured' && ua === ub) {
      out.push({ name, unit, better, original, modified, absolute: modified.value - original.value, relative: relativeChange(original.value, modified.value, unit), verdict: verdictOf(original.value, modified.value, better) });
    } else {
      out.push({ name, unit, better, original, modified, absolute: undefined, relative: undefined, verdict: 'not-compared' });
    }
  }
  return out;
}

const limitKey = (figure: string, op: LimitOp, value: number): string => `${figure.toLowerCase()} ${op} ${value}`;

/** A version's side of a limit: its own result when it applies the limit, else the limit judged on its measured values. */
function limitSide(r: RunReport, figure: string, op: LimitOp, value: number): LimitSide {
  const own = (r.figures?.limits ?? []).find((l) => l.figure.toLowerCase() === figure.toLowerCase() && l.op === op && sameValue(l.value, value));
  if (own) {
    return match(own as LimitResult)
      .with({ status: 'not-evaluated' }, (l) => ({ status: 'not-evaluated' as const, reason: l.reason.message, applied: true }))
      .with({ status: 'pass' }, { status: 'fail' }, (l) => ({ status: l.status, actual: l.actual, applied: true }))
      .exhaustive();
  }
  const values = r.figures?.values ?? {};
  const name = Object.keys(values).find((n) => n.toLowerCase() === figure.toLowerCase());
  if (name === undefined) return { status: 'not-evaluated', reason: `this version measures no ${figure}`, applied: false };
  const actual = values[name]!;
  return { status: limitHolds(actual, op, value) ? 'pass' : 'fail', actual, applied: false };
}

function compareLimits(a: RunReport, b: RunReport): LimitComparison[] {
  const seen = new Set<string>();
  const out: LimitComparison[] = [];
  for (const l of [...(a.figures?.limits ?? []), ...(b.figures?.limits ?? [])]) {
    const key = limitKey(l.figure, l.op, l.value);
    if (seen.has(key)) continue;
    seen.add(key);
    out.push({ figure: l.figure, op: l.op, value: l.value, original: limitSide(a, l.figure, l.op, l.value), modified: limitSide(b, l.figure, l.op, l.value) });
  }
  return out;
}

/** The operating point a comparison uses: the cycle averages of a sine-fed stage, else the DC operating point at the first temperature. */
function nominalOp(r: RunReport): { nodes: Readonly<Record<string, number>>; power: Readonly<Record<string, number>> } {
  const cycle = r.figures?.cycleOperatingPoint;
  if (cycle) return { nodes: Object.fromEntries(Object.entries(cycle.nodes).map(([n, v]) => [n, v.mean])), power: cycle.power };
  const op = r.operatingPoints[0];
  return { nodes: op?.nodes ?? {}, power: op?.power ?? {} };
}

function compareNodes(a: RunReport, b: RunReport): { nodes: NodeComparison[]; onlyIn: { original: string[]; modified: string[] } } {
  const va = nominalOp(a).nodes;
  const vb = nominalOp(b).nodes;
  const bByKey = new Map(Object.keys(vb).map((n) => [n.toLowerCase(), n]));
  const aKeys = new Set(Object.keys(va).map((n) => n.toLowerCase()));
  const nodes: NodeComparison[] = [];
  const onlyOriginal: string[] = [];
  for (const [n, v] of Object.entries(va)) {
    const m = bByKey.get(n.toLowerCase());
    if (m === undefined) onlyOriginal.push(n);
    else nodes.push({ node: n, original: v, modified: vb[m]! });
  }
  const onlyModified = Object.keys(vb).filter((n) => !aKeys.has(n.toLowerCase()));
  return { nodes, onlyIn: { original: onlyOriginal, modified: onlyModified } };
}

function dissipationSide(r: RunReport, el: FlatElement): DissipationSide {
  const power = nominalOp(r).power[el.name] ?? 0;
  const values = r.figures?.values ?? {};
  const pdName = Object.keys(values).find((n) => n.toLowerCase() === `pd.${el.key}`);
  const figure = pdName === undefined ? undefined : values[pdName];
  const worst = Math.max(power, figure ?? -Infinity);
  return { power, figure, pmax: el.pmax, over: el.pmax !== undefined && worst > el.pmax };
}

function compareDissipation(a: RunReport, b: RunReport): DissipationComparison[] {
  const counts = (el: FlatElement): boolean => dissipates(el.kind) || el.pmax !== undefined;
  const bEls = new Map(b.circuit.elements.map((e) => [e.key, e]));
  const out: DissipationComparison[] = [];
  for (const ea of a.circuit.elements) {
    const eb = bEls.get(ea.key);
    if (!counts(ea) && !(eb && counts(eb))) continue;
    out.push({ element: eb?.name ?? ea.name, original: dissipationSide(a, ea), modified: eb ? dissipationSide(b, eb) : undefined });
  }
  const aKeys = new Set(a.circuit.elements.map((e) => e.key));
  for (const eb of b.circuit.elements) if (!aKeys.has(eb.key) && counts(eb)) out.push({ element: eb.name, original: undefined, modified: dissipationSide(b, eb) });
  return out;
}

/** Kinds of condition whose own cards in the modified netlist say something else than the original's. */
function differingConditions(a: FlatCircuit, b: FlatCircuit, used: Omit<ConditionsUsed, 'differing'>): ConditionsUsed['differing'] {
  const out: ('supply' | 'figures' | 'temperatures')[] = [];
  const s = (c: FlatCircuit): string => (c.supply ? [c.supply.input, c.supply.out, c.supply.ref, c.supply.load ?? '', c.supply.feed ?? ''].join(' ') : '');
  const f = (c: FlatCircuit): string => c.figures.map((x) => `${x.figure}(${[...x.keys].map(([k, v]) => `${k}=${v}`).sort().join(',')}${x.method ?? ''})`).sort().join(' ');
  if (used.supply === 'own' && s(a) !== s(b)) out.push('supply');
  if (used.figures === 'own' && f(a) !== f(b)) out.push('figures');
  if (used.temperatures === 'own' && (a.temperatures.length !== b.temperatures.length || a.temperatures.some((t, i) => !sameValue(t, b.temperatures[i])))) out.push('temperatures');
  return out;
}

const mainsFed = (r: RunReport): boolean => r.warnings.some((w) => w.code === 'above-elv');

function parseResultProblem(fn: string, name: string, v: unknown): Diagnostic | undefined {
  if (!isRecord(v) || typeof v['ok'] !== 'boolean' || !Array.isArray(v['warnings']) || (v['ok'] === true ? netlistShapeProblem(v['netlist']) !== undefined : !Array.isArray(v['errors']))) {
    return argumentDiagnostic(fn, name, 'a result of parseNetlist or readNetlistFile', v);
  }
  return undefined;
}

/**
 * Compares two read netlists (results of `parseNetlist` or
 * `readNetlistFile`): the modified one inherits the original's `.supply`,
 * `.figure`, `.limit` and `.temp` cards of each kind it has none of; both
 * are run (figures at the first `.temp` temperature) and set side by side
 * (docs/compare.md). Units: volts, watts and each figure's own unit (figure
 * registry); relative changes are ratios. Never throws: a netlist that
 * cannot be read, elaborated or run is an `ok: false` result naming which
 * version it was (`original` first); so is an argument that is not a
 * parse result (`bad-argument`).
 *
 * @example
 * ```ts
 * import { compareNetlists, parseNetlist } from '@railcheck/core';
 * const original = parseNetlist('Divider\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.op\n', { file: 'a.cir' });
 * const modified = parseNetlist('Divider\nV1 in 0 12\nR1 in out 2k\nR2 out 0 1k\n.op\n', { file: 'b.cir' });
 * const r = compareNetlists(original, modified);
 * if (r.ok) {
 *   // R1: resistance 3 kΩ → 2 kΩ; V(out) 3 V → 4 V (the divider formula 12·1k/(R1 + 1k))
 *   console.log(r.report.changes.elements, r.report.nodes);
 * } else {
 *   console.error(`the ${r.file} netlist has errors`, r.errors);
 * }
 * ```
 */
export function compareNetlists(original: ParseResult, modified: ParseResult): CompareResult {
  const bad = (file: CompareSide, d: Diagnostic): CompareResult => ({ ok: false, file, path: '', errors: [d], warnings: [], conditions: undefined });
  const wrongA = parseResultProblem('compareNetlists', 'original', original);
  if (wrongA) return bad('original', wrongA);
  const wrongB = parseResultProblem('compareNetlists', 'modified', modified);
  if (wrongB) return bad('modified', wrongB);
  try {
    return compareChecked(original, modified);
  } catch (e) {
    // A foreign exception here comes from a parse result edited by hand (bad-argument) or is a bug (internal).
    const made = (!original.ok || NETLISTS.has(original.netlist)) && (!modified.ok || NETLISTS.has(modified.netlist));
    return bad('modified', foreignFailure('compareNetlists', e, made, 'results of parseNetlist or readNetlistFile').diagnostics[0]!);
  }
}

function compareChecked(original: ParseResult, modified: ParseResult): CompareResult {
  const pathOf = (p: ParseResult, side: CompareSide): string => (p.ok ? p.netlist.file : (p.errors.find((e) => e.pos)?.pos?.file ?? side));
  const ranA = runParsed(original);
  if (!ranA.ok) return { ok: false, file: 'original', path: pathOf(original, 'original'), errors: ranA.errors, warnings: ranA.warnings, conditions: undefined };
  if (!modified.ok || !original.ok) return { ok: false, file: 'modified', path: pathOf(modified, 'modified'), errors: modified.ok ? [] : modified.errors, warnings: modified.warnings, conditions: undefined };
  const { netlist, used } = inheritConditions(original.netlist, modified.netlist);
  const ranB = runParsed({ ok: true, netlist, warnings: modified.warnings });
  const a = ranA.report;
  if (!ranB.ok) return { ok: false, file: 'modified', path: modified.netlist.file, errors: ranB.errors, warnings: ranB.warnings, conditions: { ...used, differing: [] } };
  const b = ranB.report;
  const conditions: ConditionsUsed = { ...used, differing: differingConditions(a.circuit, b.circuit, used) };
  const { nodes, onlyIn } = compareNodes(a, b);
  const dissipation = compareDissipation(a, b);
  return {
    ok: true,
    report: {
      original: a,
      modified: b,
      conditions,
      overRating: dissipation.filter((d) => d.modified?.over === true),
      changes: circuitChanges(a.circuit, b.circuit),
      figures: compareFigures(a, b),
      limits: compareLimits(a, b),
      nodes,
      nodesOnlyIn: onlyIn,
      dissipation,
      mainsFed: { original: mainsFed(a), modified: mainsFed(b) },
    },
  };
}

/**
 * Compares two netlist files (UTF-8, read as `readNetlistFile` reads them)
 * with {@link compareNetlists}; `options` apply to both (includes resolve
 * against each file's own folder). Never throws.
 *
 * @example
 * ```ts
 * import { compareNetlistFiles } from '@railcheck/core';
 * const r = compareNetlistFiles('examples/sensor-rail-follower.cir', 'examples/sensor-rail-follower-modified.cir');
 * if (r.ok) for (const f of r.report.figures) console.log(f.name, f.verdict);
 * ```
 */
export function compareNetlistFiles(original: string, modified: string, options: Omit<ParseOptions, 'file'> = {}): CompareResult {
  const a = readNetlistFile(original, options);
  const b = readNetlistFile(modified, options);
  const r = compareNetlists(a, b);
  return r.ok ? r : { ...r, path: r.file === 'original' ? original : modified };
}
