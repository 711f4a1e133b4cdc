/**
 * Turns one element card into a flat element: evaluates its values in the
 * scope of its instance and binds its model.
 */
import { bjtModel, diodeModel, type SourceSpec, type WaveformSpec } from '@railcheck/devices';
import { match } from 'ts-pattern';
import type { BjtCard, DiodeCard, ElementCard, ModelCard, Value, Waveform } from '../netlist/ast.js';
import type { FlatElement } from './flat.js';
import { lookupModel, resolveNode, type Scope } from './scope.js';
import type { Evaluator } from './evaluate.js';

/** Everything element conversion needs besides the card. */
export interface ElementEnv {
  readonly scope: Scope;
  readonly ev: Evaluator;
  /** Records a node's first spelling. */
  readonly noteNode: (key: string, name: string) => void;
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

function sourceSpec(env: ElementEnv, card: Extract<ElementCard, { kind: 'V' | 'I' }>): SourceSpec {
  const { ev, scope } = env;
  const waveform = card.waveform ? waveformSpec(ev, scope, card.waveform) : undefined;
  const dc = card.dc !== undefined ? ev.num(card.dc, scope) : waveform ? valueAtZero(waveform) : 0;
  return {
    dc,
    acMag: card.ac ? ev.num(card.ac.mag, scope) : 0,
    acPhaseDeg: card.ac?.phase ? ev.num(card.ac.phase, scope) : 0,
    waveform,
  };
}

function modelParams(env: ElementEnv, card: ModelCard, scope: Scope): Map<string, number> {
  const given = new Map<string, number>();
  for (const a of card.params) given.set(a.name.toUpperCase(), env.ev.num(a.value, scope));
  return given;
}

function bindModel(env: ElementEnv, card: DiodeCard | BjtCard): { model: ModelCard; scope: Scope } | undefined {
  const found = lookupModel(env.scope, card.model.toLowerCase());
  if (!found) {
    env.ev.fail(card, 'unknown-model', `model '${card.model}' of ${card.name} is not defined`, `a .model ${card.model} ${card.kind === 'D' ? 'D' : 'NPN|PNP'} (...) line`);
    return undefined;
  }
  const wanted = card.kind === 'D' ? ['D'] : ['NPN', 'PNP'];
  if (!wanted.includes(found.card.type)) {
    env.ev.fail(card, 'model-type', `${card.name} is a ${card.kind === 'D' ? 'diode' : 'transistor'} but model '${card.model}' is of type ${found.card.type}`, `a model of type ${wanted.join(' or ')}`);
    return undefined;
  }
  return { model: found.card, scope: found.scope };
}

/** Converts a non-instance element card; undefined when it had errors (already recorded). */
export function flattenElement(env: ElementEnv, card: Exclude<ElementCard, { kind: 'X' }>): FlatElement | undefined {
  const { ev, scope } = env;
  const name = scope.prefixName + card.name;
  const base = { name, key: name.toLowerCase(), origin: { pos: card.pos, lineText: card.lineText }, pmax: card.pmax ? ev.num(card.pmax, scope) : undefined };
  const before = ev.errorCount();
  const el = match(card)
    .returnType<FlatElement | undefined>()
    .with({ kind: 'R' }, (c) => {
      const ohms = ev.num(c.value, scope);
      if (ohms === 0) ev.fail(c, 'zero-resistance', `${c.name} has a value of zero`, 'a non-zero resistance in ohms');
      return { ...base, kind: 'resistor', nodes: nodesOf(env, c.nodes), ohms };
    })
    .with({ kind: 'C' }, (c) => ({ ...base, kind: 'capacitor', nodes: nodesOf(env, c.nodes), farads: ev.num(c.value, scope), ic: c.ic ? ev.num(c.ic, scope) : undefined }))
    .with({ kind: 'L' }, (c) => ({ ...base, kind: 'inductor', nodes: nodesOf(env, c.nodes), henries: ev.num(c.value, scope), ic: c.ic ? ev.num(c.ic, scope) : undefined }))
    .with({ kind: 'V' }, (c) => ({ ...base, kind: 'vsource', nodes: nodesOf(env, c.nodes), spec: sourceSpec(env, c) }))
    .with({ kind: 'I' }, (c) => ({ ...base, kind: 'isource', nodes: nodesOf(env, c.nodes), spec: sourceSpec(env, c) }))
    .with({ kind: 'E' }, (c) => ({ ...base, kind: 'vcvs', nodes: nodesOf(env, c.nodes), gain: ev.num(c.gain, scope) }))
    .with({ kind: 'G' }, (c) => ({ ...base, kind: 'vccs', nodes: nodesOf(env, c.nodes), gain: ev.num(c.gain, scope) }))
    .with({ kind: 'F' }, (c) => ({ ...base, kind: 'cccs', nodes: nodesOf(env, c.nodes), control: c.control, gain: ev.num(c.gain, scope) }))
    .with({ kind: 'H' }, (c) => ({ ...base, kind: 'ccvs', nodes: nodesOf(env, c.nodes), control: c.control, gain: ev.num(c.gain, scope) }))
    .with({ kind: 'D' }, (c) => {
      const nodes = nodesOf(env, c.nodes);
      const bound = bindModel(env, c);
      if (!bound) return undefined;
      const model = diodeModel(modelParams(env, bound.model, bound.scope));
      return { ...base, pmax: base.pmax ?? model.PMAX, kind: 'diode', nodes, model, modelName: bound.model.name, area: c.area ? ev.num(c.area, scope) : 1 };
    })
    .with({ kind: 'Q' }, (c) => {
      const nodes = nodesOf(env, c.nodes);
      const bound = bindModel(env, c);
      if (!bound) return undefined;
      const model = bjtModel(bound.model.type === 'PNP' ? 'pnp' : 'npn', modelParams(env, bound.model, bound.scope));
      return { ...base, pmax: base.pmax ?? model.PMAX, kind: 'bjt', nodes, model, modelName: bound.model.name, area: c.area ? ev.num(c.area, scope) : 1 };
    })
    .exhaustive();
  return ev.errorCount() === before ? el : undefined;
}
