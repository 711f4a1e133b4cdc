/**
 * The `.ac` analysis in the user's terms: complex node voltages per
 * frequency, with magnitude in dB (20·log10|V|) and phase in degrees.
 */
import { errorAt, RailcheckError } from '../errors.js';
import type { CardOrigin } from '../netlist/ast.js';
import type { CompiledCircuit } from '../engine/compile.js';
import { linearise, solveAt } from '../engine/ac.js';
import { solveOperatingPoint } from '../engine/dcop.js';
import { opFailure } from './dc.js';
import { checkFinite } from '../arguments.js';

/** A small-signal sweep at one temperature. */
export interface AcResult {
  readonly temperature: number;
  /** Hz. */
  readonly frequencies: readonly number[];
  /** Node name → real and imaginary parts of its phasor (V per unit of ac excitation). */
  readonly nodes: Readonly<Record<string, { readonly re: readonly number[]; readonly im: readonly number[] }>>;
}

/** Magnitude in dB of a phasor. */
export function phasorDb(re: number, im: number): number {
  checkFinite('phasorDb', 're', re);
  checkFinite('phasorDb', 'im', im);
  return 20 * Math.log10(Math.hypot(re, im));
}

/** Phase in degrees of a phasor. */
export function phasorDeg(re: number, im: number): number {
  checkFinite('phasorDeg', 're', re);
  checkFinite('phasorDeg', 'im', im);
  return (Math.atan2(im, re) * 180) / Math.PI;
}

/** Solves the operating point, linearises there and sweeps the frequencies. */
export function acSweep(c: CompiledCircuit, temperature: number, frequencies: readonly number[], origin?: CardOrigin): AcResult {
  const op = solveOperatingPoint(c);
  if (!op.ok) throw new RailcheckError([opFailure(op, `operating point for .ac at ${temperature} °C`, origin)]);
  const sys = linearise(c);
  const nodes: Record<string, { re: number[]; im: number[] }> = {};
  for (const node of c.flat.nodes) nodes[node.name] = { re: [], im: [] };
  for (const f of frequencies) {
    const singular = solveAt(sys, f);
    if (singular !== 0) {
      throw new RailcheckError([errorAt('ac-singular', `small-signal matrix singular at ${f} Hz, at ${c.unknowns[singular]?.name ?? 'an unknown'}`, origin?.pos, origin?.lineText)]);
    }
    for (const node of c.flat.nodes) {
      const i = c.nodeIndex.get(node.key)!;
      nodes[node.name]!.re.push(sys.xRe[i]!);
      nodes[node.name]!.im.push(sys.xIm[i]!);
    }
  }
  return { temperature, frequencies, nodes };
}

export { acFrequencies } from '../engine/ac.js';
