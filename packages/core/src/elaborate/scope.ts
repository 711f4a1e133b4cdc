/**
 * Name scopes used while flattening: parameters, models and subcircuit
 * definitions visible at a point, and the node map of a subcircuit instance.
 */
import type { ModelCard, SubcktDef } from '../netlist/ast.js';
import { GROUND_KEY, type FlatNode } from './flat.js';

/** One level of scope: the top level or one subcircuit instance. */
export interface Scope {
  /** Parameters defined at this level (lower-case names). */
  readonly params: Map<string, number>;
  /** Model cards defined at this level (lower-case names). */
  readonly models: Map<string, ModelCard>;
  /** Subcircuit definitions at this level (lower-case names). */
  readonly subckts: Map<string, SubcktDef>;
  /** Port name (lower-case) → node of the caller. */
  readonly ports: Map<string, FlatNode>;
  /** The enclosing scope (the caller), or undefined at the top level. */
  readonly parent: Scope | undefined;
  /** Instance path as written, e.g. `X1.X3.` ('' at the top level). */
  readonly prefixName: string;
  /** Lower-case instance path. */
  readonly prefixKey: string;
  /** Subcircuit names on the instantiation path, for recursion detection. */
  readonly path: readonly string[];
}

/** The top-level scope. */
export function topScope(): Scope {
  return { params: new Map(), models: new Map(), subckts: new Map(), ports: new Map(), parent: undefined, prefixName: '', prefixKey: '', path: [] };
}

/** Finds a parameter in this scope or any enclosing one. */
export function lookupParam(scope: Scope, name: string): number | undefined {
  for (let s: Scope | undefined = scope; s; s = s.parent) {
    const v = s.params.get(name);
    if (v !== undefined) return v;
  }
  return undefined;
}

/** Finds a model card and the scope that defines it. */
export function lookupModel(scope: Scope, name: string): { card: ModelCard; scope: Scope } | undefined {
  for (let s: Scope | undefined = scope; s; s = s.parent) {
    const card = s.models.get(name);
    if (card) return { card, scope: s };
  }
  return undefined;
}

/** Finds a subcircuit definition visible from this scope. */
export function lookupSubckt(scope: Scope, name: string): SubcktDef | undefined {
  for (let s: Scope | undefined = scope; s; s = s.parent) {
    const def = s.subckts.get(name);
    if (def) return def;
  }
  return undefined;
}

/** Maps a node name written in this scope to its flat node. */
export function resolveNode(scope: Scope, written: string): FlatNode {
  const lower = written.toLowerCase();
  if (lower === '0' || lower === 'gnd') return { key: GROUND_KEY, name: '0' };
  const port = scope.ports.get(lower);
  if (port) return port;
  return { key: scope.prefixKey + lower, name: scope.prefixName + written };
}
