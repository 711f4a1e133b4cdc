/**
 * Elaboration: a parsed netlist becomes a flat circuit. Subcircuit
 * instances are expanded (ports mapped, local nodes and element names
 * prefixed by the instance path), parameters evaluated, models bound, and
 * every cross-reference (controlling sources, `.dc` and `.supply` names)
 * checked. Errors are collected, not thrown.
 */
import { kindOfLetter } from '@railcheck/devices';
import { match, P } from 'ts-pattern';
import { warningAt, type Diagnostic } from '../errors.js';
import type { AnalysisCard, Card, DeviceCard, InstanceCard, SupplyCard } from '../netlist/ast.js';
import type { FlatCircuit, FlatElement, FlatNode, FlatParam } from './flat.js';
import { FLAT_CIRCUITS, GROUND_KEY } from './flat.js';
import { createEvaluator, type Evaluator } from './evaluate.js';
import { flattenElement } from './elements.js';
import { lookupSubckt, resolveNode, topScope, type Scope } from './scope.js';
import type { Netlist } from '../netlist/ast.js';
import { resolveDirectives } from './directives.js';
import { checkConnections } from './connections.js';
import { argumentDiagnostic, foreignFailure } from '../arguments.js';
import { NETLISTS, netlistShapeProblem } from '../netlist/index.js';

/** Result of elaboration. */
export type ElaborateResult =
  | { readonly ok: true; readonly circuit: FlatCircuit; readonly warnings: readonly Diagnostic[] }
  | { readonly ok: false; readonly errors: readonly Diagnostic[]; readonly warnings: readonly Diagnostic[] };

/** Deepest subcircuit nesting accepted (a guard; real stages nest a few levels). */
const MAX_INSTANCE_DEPTH = 64;

/**
 * Most elements a flattened circuit may have (a guard: supply stages have tens). Subcircuits
 * that instantiate others several times multiply, so a short file could otherwise expand
 * into millions of elements and exhaust memory.
 */
export const MAX_FLAT_ELEMENTS = 100_000;

interface Walk {
  readonly ev: Evaluator;
  readonly elements: FlatElement[];
  readonly nodes: Map<string, FlatNode>;
  readonly analyses: AnalysisCard[];
  readonly directives: SupplyCard[];
  readonly names: Map<string, FlatElement>;
  /** Set once {@link MAX_FLAT_ELEMENTS} is reached; no further instance is expanded. */
  full: boolean;
  /** Range errors reported so far (each once). */
  readonly reported: Set<string>;
}

/** True for the element cards of the registry's letters (every element but X). */
function isDeviceCard(card: Card): card is DeviceCard {
  return kindOfLetter(card.kind) !== undefined;
}

/** Registers the definitions of one level (models, subcircuits), then its parameters in order. */
function enterLevel(w: Walk, scope: Scope, cards: readonly Card[]): void {
  for (const card of cards) {
    if (card.kind === 'model') {
      if (scope.models.has(card.name.toLowerCase())) w.ev.fail(card, 'duplicate-model', `model '${card.name}' is defined twice`, 'one .model line per name');
      scope.models.set(card.name.toLowerCase(), card);
    } else if (card.kind === 'subckt') {
      if (scope.subckts.has(card.name.toLowerCase())) w.ev.fail(card, 'duplicate-subckt', `subcircuit '${card.name}' is defined twice`, 'one .subckt definition per name');
      scope.subckts.set(card.name.toLowerCase(), card);
    }
  }
  for (const card of cards) {
    if (card.kind !== 'param') continue;
    w.ev.at(card);
    for (const a of card.assignments) scope.params.set(a.name.toLowerCase(), w.ev.num(a.value, scope));
  }
}

function walkLevel(w: Walk, scope: Scope, cards: readonly Card[]): void {
  enterLevel(w, scope, cards);
  const noteNode = (key: string, name: string): void => {
    if (key !== GROUND_KEY && !w.nodes.has(key)) w.nodes.set(key, { key, name });
  };
  for (const card of cards) {
    w.ev.at(card);
    match(card)
      .with({ kind: 'model' }, { kind: 'subckt' }, { kind: 'param' }, () => undefined)
      .with({ kind: 'op' }, { kind: 'dc' }, { kind: 'tran' }, { kind: 'ac' }, { kind: 'temp' }, (c) => {
        if (scope.parent) w.ev.fail(c, 'directive-in-subckt', `.${c.kind} inside a subcircuit definition`, 'analysis directives at the top level');
        else w.analyses.push(c);
      })
      .with({ kind: 'supply' }, { kind: 'figure' }, { kind: 'limit' }, { kind: 'spread' }, (c) => {
        if (scope.parent) w.ev.fail(c, 'directive-in-subckt', `.${c.kind} inside a subcircuit definition`, 'power-supply directives at the top level');
        else w.directives.push(c);
      })
      .with({ kind: 'X' }, (c) => instantiate(w, scope, c))
      .with(P.when(isDeviceCard), (c) => {
        const el = flattenElement({ scope, ev: w.ev, noteNode, reported: w.reported }, c);
        if (!el) return;
        const clash = w.names.get(el.key);
        if (clash) {
          w.ev.fail(c, 'duplicate-element', `element '${el.name}' is defined twice (first at line ${clash.origin.pos.line})`, 'a unique name per element');
          return;
        }
        w.names.set(el.key, el);
        w.elements.push(el);
      })
      .exhaustive();
  }
}

function instantiate(w: Walk, scope: Scope, card: InstanceCard): void {
  if (w.full) return;
  if (w.elements.length >= MAX_FLAT_ELEMENTS) {
    w.full = true;
    w.ev.fail(card, 'too-many-elements', `the flattened circuit has more than ${MAX_FLAT_ELEMENTS} elements by the time ${scope.prefixName}${card.name} is expanded`, 'subcircuits that do not multiply into so many elements');
    return;
  }
  const defName = card.subckt.toLowerCase();
  const def = lookupSubckt(scope, defName);
  if (!def) {
    w.ev.fail(card, 'unknown-subckt', `subcircuit '${card.subckt}' of ${card.name} is not defined`, `a .subckt ${card.subckt} ... .ends definition`);
    return;
  }
  if (scope.path.includes(defName)) {
    const cycle = [...scope.path.slice(scope.path.indexOf(defName)), defName].join(' → ');
    w.ev.fail(card, 'subckt-recursion', `subcircuit instantiates itself: ${cycle}`, 'a subcircuit that does not contain itself, directly or through others');
    return;
  }
  if (scope.path.length >= MAX_INSTANCE_DEPTH) {
    w.ev.fail(card, 'subckt-depth', `subcircuits nest deeper than ${MAX_INSTANCE_DEPTH} levels`, 'shallower nesting');
    return;
  }
  if (card.nodes.length !== def.ports.length) {
    w.ev.fail(card, 'port-count', `${card.name} connects ${card.nodes.length} nodes but '${def.name}' has ${def.ports.length} ports (${def.ports.join(' ')})`, `${def.ports.length} nodes`);
    return;
  }
  const inner: Scope = {
    params: new Map(),
    models: new Map(),
    subckts: new Map(),
    ports: new Map(def.ports.map((p, i) => [p.toLowerCase(), resolveNode(scope, card.nodes[i]!)])),
    parent: scope,
    prefixName: `${scope.prefixName}${card.name}.`,
    prefixKey: `${scope.prefixKey}${card.name.toLowerCase()}.`,
    path: [...scope.path, defName],
  };
  for (const port of inner.ports.values()) if (port.key !== GROUND_KEY && !w.nodes.has(port.key)) w.nodes.set(port.key, port);
  // Instance values are evaluated in the caller's scope. Defaults follow, in order, in the
  // instance's own scope, so that (as with .param) a default may use an earlier one and
  // follows the instance's value of it; every default is evaluated so its mistakes are reported.
  w.ev.at(card);
  const known = new Set(def.defaults.map((d) => d.name.toLowerCase()));
  for (const a of card.params) {
    if (!known.has(a.name.toLowerCase())) w.ev.fail(card, 'unknown-instance-param', `'${a.name}' is not a parameter of subcircuit '${def.name}'`, known.size ? `one of: ${[...known].join(', ')}` : 'no parameters (the definition declares none)');
    inner.params.set(a.name.toLowerCase(), w.ev.num(a.value, scope));
  }
  const given = new Set(inner.params.keys());
  w.ev.at(def);
  for (const d of def.defaults) {
    const value = w.ev.num(d.value, inner);
    if (!given.has(d.name.toLowerCase())) inner.params.set(d.name.toLowerCase(), value);
  }
  walkLevel(w, inner, def.body);
}

/**
 * Finds the element an F, H or K names, written in the instance of `el`:
 * first within the same instance, then at the top level (docs/netlist.md).
 * Returns it only when it is of kind `wanted`; otherwise records an error
 * naming what was written and what was expected.
 */
function resolveReference<K extends FlatElement['kind']>(w: Walk, el: FlatElement, written: string, wanted: K, expected: string): Extract<FlatElement, { kind: K }> | undefined {
  const dot = el.key.lastIndexOf('.');
  const key = written.toLowerCase();
  const local = dot >= 0 ? el.key.slice(0, dot + 1) + key : key;
  const target = w.names.get(local) ?? w.names.get(key);
  if (target && target.kind === wanted) return target as Extract<FlatElement, { kind: K }>;
  w.ev.at(el.origin);
  const what = target ? `a ${target.kind === 'vsource' || target.kind === 'isource' ? 'source' : target.kind}` : 'no element of the circuit';
  if (el.kind === 'coupling') {
    w.ev.fail(el.origin, 'unknown-inductor', `${el.name} couples '${written}', which is ${what}, not an inductor`, expected);
  } else {
    w.ev.fail(el.origin, 'unknown-control', `${el.name} is controlled by '${written}', which is not a voltage source`, expected);
  }
  return undefined;
}

/**
 * Resolves the element names F, H and K carry into keys: the controlling V
 * of F and H, the two inductors of K (each pair coupled at most once).
 */
function resolveReferences(w: Walk): FlatElement[] {
  const pairs = new Map<string, FlatElement>();
  return w.elements.map((el) => {
    if (el.kind === 'cccs' || el.kind === 'ccvs') {
      const target = resolveReference(w, el, el.control, 'vsource', 'the name of an independent voltage source (V line) whose current controls it');
      return target ? { ...el, control: target.key } : el;
    }
    if (el.kind !== 'coupling') return el;
    const expected = 'the names of two inductors (L lines) of the same instance or the top level';
    const first = resolveReference(w, el, el.inductors[0], 'inductor', expected);
    const second = resolveReference(w, el, el.inductors[1], 'inductor', expected);
    if (!first || !second) return el;
    if (first.key === second.key) {
      w.ev.fail(el.origin, 'bad-coupling', `${el.name} couples ${first.name} with itself`, 'two different inductors');
      return el;
    }
    const pair = [first.key, second.key].sort().join(' ');
    const earlier = pairs.get(pair);
    if (earlier) {
      w.ev.fail(el.origin, 'duplicate-coupling', `${first.name} and ${second.name} are already coupled by ${earlier.name} (line ${earlier.origin.pos.line})`, 'one K element per pair of inductors');
      return el;
    }
    pairs.set(pair, el);
    return { ...el, inductors: [first.key, second.key] as const };
  });
}

/**
 * Flattens a parsed netlist. Every problem is returned as a diagnostic; a
 * netlist with errors yields `ok: false`, and so does an argument that is
 * not a netlist (`bad-argument`).
 */
export function elaborate(netlist: Netlist): ElaborateResult {
  const wrong = netlistShapeProblem(netlist);
  if (wrong !== undefined) return { ok: false, errors: [argumentDiagnostic('elaborate', `netlist (${wrong})`, 'a netlist as parseNetlist returns it', netlist)], warnings: [] };
  try {
    return elaborateChecked(netlist);
  } catch (e) {
    return { ok: false, errors: foreignFailure('elaborate', e, NETLISTS.has(netlist), 'a netlist as parseNetlist returns it').diagnostics, warnings: [] };
  }
}

/** The top-level `.param` values as evaluated into the top scope, each with its first spelling and card. */
function topParams(netlist: Netlist, top: Scope): FlatParam[] {
  const out = new Map<string, FlatParam>();
  for (const card of netlist.cards) {
    if (card.kind !== 'param') continue;
    for (const a of card.assignments) {
      const key = a.name.toLowerCase();
      const value = top.params.get(key);
      if (!out.has(key) && value !== undefined) out.set(key, { key, name: a.name, value, origin: { pos: card.pos, lineText: card.lineText } });
    }
  }
  return [...out.values()];
}

function elaborateChecked(netlist: Netlist): ElaborateResult {
  const w: Walk = { ev: createEvaluator(), elements: [], nodes: new Map(), analyses: [], directives: [], names: new Map(), full: false, reported: new Set() };
  const top = topScope();
  walkLevel(w, top, netlist.cards);
  const elements = resolveReferences(w);
  const resolved = resolveDirectives(w.ev, w.analyses, w.directives, w.names, w.nodes, top);
  const errors = w.ev.diagnostics.filter((d) => d.severity === 'error');
  const warnings = w.ev.diagnostics.filter((d) => d.severity === 'warning');
  if (elements.length === 0 && errors.length === 0) warnings.push(warningAt('empty-circuit', 'the netlist has no elements'));
  if (errors.length > 0) return { ok: false, errors, warnings };
  const circuit: FlatCircuit = {
    title: netlist.title,
    file: netlist.file,
    nodes: [...w.nodes.values()],
    elements,
    ...resolved,
    params: topParams(netlist, top),
  };
  const connections = checkConnections(circuit);
  for (const d of connections.warnings) warnings.push(d); // not push(...): a long list would overflow the call stack
  if (connections.errors.length > 0) return { ok: false, errors: connections.errors, warnings };
  return { ok: true, circuit: FLAT_CIRCUITS.mark(circuit), warnings };
}
