/**
 * Checks that need the whole netlist (includes expanded): names defined
 * twice in one scope, run directives inside subcircuit definitions, and the
 * consistency of `.supply`, `.figure` and `.limit` (figures.md).
 */
import type { Diagnostic } from '../errors.js';
import { errorAt } from '../errors.js';
import type { Card, FigureKind } from './ast.js';
import { figureKindOf } from './parse-supply.js';

const RUN_DIRECTIVES: ReadonlySet<string> = new Set(['op', 'dc', 'tran', 'ac', 'temp', 'supply', 'figure', 'limit', 'spread']);

/** A card kind as written on its line, for messages. */
function written(card: Card): string {
  return /^[a-z]/.test(card.kind) ? `.${card.kind}` : card.kind;
}

/** Where a card is, as `file:line`. */
function at(card: Card): string {
  return `${card.pos.file}:${card.pos.line}`;
}

/** Names defined twice in one scope (elements, models, subcircuits; case-insensitive). */
function checkScope(cards: readonly Card[], out: Diagnostic[]): void {
  const seen = new Map<string, Card>();
  for (const card of cards) {
    let key: string | undefined;
    let what = '';
    if (card.kind === 'model') [key, what] = [`model:${card.name.toLowerCase()}`, `model ${card.name}`];
    else if (card.kind === 'subckt') [key, what] = [`subckt:${card.name.toLowerCase()}`, `subcircuit ${card.name}`];
    else if ('name' in card) [key, what] = [`element:${card.name.toLowerCase()}`, `element ${card.name}`];
    if (key === undefined) continue;
    const first = seen.get(key);
    if (first) out.push(errorAt('duplicate-name', `${what} is defined twice (first at ${at(first)})`, card.pos, card.lineText, 'each name once per scope (names are case-insensitive)'));
    else seen.set(key, card);
  }
  for (const card of cards) {
    if (card.kind !== 'subckt') continue;
    for (const inner of card.body) {
      if (RUN_DIRECTIVES.has(inner.kind)) {
        out.push(errorAt('not-in-subckt', `${written(inner)} cannot appear inside .subckt ${card.name}`, inner.pos, inner.lineText, 'elements, .model, .param and nested .subckt inside a definition'));
      }
    }
    checkScope(card.body, out);
  }
}

/** `.supply` at most once; `.figure` needs it, each kind once; a `.limit` needs its figure asked for. */
function checkFigures(cards: readonly Card[], out: Diagnostic[]): void {
  const supplies = cards.filter((c) => c.kind === 'supply');
  for (const extra of supplies.slice(1)) {
    out.push(errorAt('duplicate-supply', `a netlist names one stage; .supply is given again (first at ${at(supplies[0] as Card)})`, extra.pos, extra.lineText, 'a single .supply line'));
  }
  const figures = new Map<FigureKind, Card>();
  for (const card of cards) {
    if (card.kind !== 'figure') continue;
    if (supplies.length === 0) out.push(errorAt('figure-without-supply', `.figure ${card.figure} needs a .supply line naming the stage`, card.pos, card.lineText, '.supply in=<Vsource> out=<node> ...'));
    const first = figures.get(card.figure);
    if (first) out.push(errorAt('duplicate-figure', `.figure ${card.figure} is asked for twice (first at ${at(first)})`, card.pos, card.lineText, 'each figure kind once'));
    else figures.set(card.figure, card);
  }
  for (const card of cards) {
    if (card.kind !== 'limit') continue;
    const kind = figureKindOf(card.figure);
    if (kind && !figures.has(kind)) {
      out.push(errorAt('limit-without-figure', `.limit ${card.figure}: that figure is not asked for`, card.pos, card.lineText, `a ".figure ${kind}" line`));
    }
  }
}

/** Runs the whole-netlist checks on the top-level cards; returns the errors, in source order per check. */
export function checkNetlist(cards: readonly Card[]): Diagnostic[] {
  const out: Diagnostic[] = [];
  checkScope(cards, out);
  checkFigures(cards, out);
  return out;
}
