/**
 * The netlists the reader made ({@link Brand}): the boundary of elaborate
 * and printNetlist tells a failure on one of them (a bug, `internal`) from
 * one on a netlist built or edited by hand (`bad-argument`).
 */
import { Brand } from '../arguments.js';
import type { Netlist } from './ast.js';

/** Netlists returned by parseNetlist. */
export const NETLISTS: Brand<Netlist> = new Brand<Netlist>('a netlist as parseNetlist returns it');

/** What is wrong with `v` as a Netlist at first sight (not an object, no string title or file, no card list), or undefined. */
export function netlistShapeProblem(v: unknown): string | undefined {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) return 'not an object';
  const n = v as Record<string, unknown>;
  if (typeof n['title'] !== 'string') return 'its title is not a string';
  if (typeof n['file'] !== 'string') return 'its file is not a string';
  if (!Array.isArray(n['cards'])) return 'its cards are not an array';
  return undefined;
}
