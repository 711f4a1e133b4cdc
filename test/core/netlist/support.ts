/**
 * Shared helpers for the netlist reader tests: the fast-check seed (printed
 * once per file so a failure can be replayed with FC_SEED=...), a strict
 * parse helper, and position-free comparison of netlists.
 */
import { expect } from 'vitest';
import type { Diagnostic } from '../../../packages/core/src/errors.js';
import { formatDiagnostic } from '../../../packages/core/src/errors.js';
import type { Card, Netlist } from '../../../packages/core/src/netlist/ast.js';
import type { ParseOptions } from '../../../packages/core/src/netlist/index.js';
import { parseNetlist } from '../../../packages/core/src/netlist/index.js';

/** The seed for every property in a file; log it once per file. */
export function seedFor(file: string): number {
  const seed = Number(process.env.FC_SEED ?? Date.now() % 2 ** 31);
  console.log(`[${file}] fast-check seed ${seed} (replay with FC_SEED=${seed})`);
  return seed;
}

/** Parses text that must be valid; fails the test with the formatted errors otherwise. */
export function mustParse(text: string, options: ParseOptions = {}): { netlist: Netlist; warnings: Diagnostic[] } {
  const r = parseNetlist(text, options);
  if (!r.ok) throw new Error(`expected the netlist to read:\n${r.errors.map(formatDiagnostic).join('\n')}`);
  return { netlist: r.netlist, warnings: r.warnings };
}

/** Parses text that must fail; returns its errors. */
export function mustFail(text: string, options: ParseOptions = {}): Diagnostic[] {
  const r = parseNetlist(text, options);
  expect(r.ok, 'expected the netlist to be refused').toBe(false);
  return r.ok ? [] : r.errors;
}

/** The cards of a one-title netlist whose body is `body`. */
export function cardsOf(body: string, options: ParseOptions = {}): readonly Card[] {
  return mustParse(`test title\n${body}`, options).netlist.cards;
}

/** The only card of a one-card netlist. */
export function oneCard(line: string): Card {
  const cards = cardsOf(line);
  expect(cards).toHaveLength(1);
  return cards[0] as Card;
}

const DROP = new Set(['pos', 'lineText', 'text']);

/** A deep copy without positions, quoted lines and spellings: what "equivalent" compares. */
export function strip(x: unknown): unknown {
  if (Array.isArray(x)) return x.map(strip);
  if (x !== null && typeof x === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(x)) if (!DROP.has(k)) out[k] = strip(v);
    return out;
  }
  return x;
}
