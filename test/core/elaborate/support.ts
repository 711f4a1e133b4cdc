/**
 * Helpers for the elaboration tests: a netlist string → its flat circuit or
 * its operating point, failing the test with the formatted diagnostics when
 * something that should work does not.
 */
import { elaborate, formatDiagnostic, parseNetlist, runNetlist, type Diagnostic, type FlatCircuit, type FlatElement, type OperatingPoint } from '@railcheck/core';

/** The fast-check seed for a file, printed once so that a failure can be replayed with FC_SEED=... */
export function seedFor(file: string): number {
  const seed = Number(process.env.FC_SEED ?? Date.now() % 2 ** 31);
  console.log(`[${file}] fast-check seed ${seed} (replay with FC_SEED=${seed})`);
  return seed;
}

/** Reads and elaborates `text`; throws (failing the test) with every diagnostic when either step fails. */
export function flatten(text: string): FlatCircuit {
  const parsed = parseNetlist(text, { file: 'e.cir' });
  if (!parsed.ok) throw new Error(`the netlist should read:\n${parsed.errors.map(formatDiagnostic).join('\n')}`);
  const r = elaborate(parsed.netlist);
  if (!r.ok) throw new Error(`the netlist should elaborate:\n${r.errors.map(formatDiagnostic).join('\n')}`);
  return r.circuit;
}

/** Reads and elaborates `text`, which must fail in elaboration; returns the errors. */
export function elaborationErrors(text: string): readonly Diagnostic[] {
  const parsed = parseNetlist(text, { file: 'e.cir' });
  if (!parsed.ok) throw new Error(`the netlist should read:\n${parsed.errors.map(formatDiagnostic).join('\n')}`);
  const r = elaborate(parsed.netlist);
  if (r.ok) throw new Error('the netlist should have been refused by elaboration');
  return r.errors;
}

/** The element of `c` whose flat name is `name` (case-insensitive). */
export function element(c: FlatCircuit, name: string): FlatElement {
  const el = c.elements.find((e) => e.key === name.toLowerCase());
  if (!el) throw new Error(`no element ${name}; have ${c.elements.map((e) => e.name).join(', ')}`);
  return el;
}

/** Ohms of resistor `name`. */
export function ohms(c: FlatCircuit, name: string): number {
  const el = element(c, name);
  if (el.kind !== 'resistor') throw new Error(`${name} is a ${el.kind}`);
  return el.ohms;
}

/** The nominal operating point of `text`; throws with the diagnostics when the run fails. */
export function solve(text: string): OperatingPoint {
  const r = runNetlist(text, { file: 'e.cir' });
  if (!r.ok) throw new Error(`the netlist should run:\n${r.errors.map(formatDiagnostic).join('\n')}`);
  const op = r.report.operatingPoints[0];
  if (!op) throw new Error('no operating point');
  return op;
}
