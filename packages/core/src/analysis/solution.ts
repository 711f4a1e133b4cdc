/**
 * Reading a solution vector back in the user's terms: node voltages by
 * name, element currents and absorbed power by element name.
 */
import type { CompiledCircuit } from '../engine/compile.js';

/** Node voltages, element currents and powers at one solution. */
export interface SolutionValues {
  /** Node name → volts against ground. */
  readonly nodes: Readonly<Record<string, number>>;
  /** Element current in amps (`R1`; transistor terminals as `Q1.c`, `Q1.b`, `Q1.e`). */
  readonly currents: Readonly<Record<string, number>>;
  /** Element name → absorbed power in watts (negative: the element delivers power). */
  readonly power: Readonly<Record<string, number>>;
}

/** Reads node voltages, currents and powers from the present workspace solution. */
export function readSolution(c: CompiledCircuit): SolutionValues {
  const { x } = c.ws;
  const state = c.ws.states[0]!;
  const nodes: Record<string, number> = {};
  for (const node of c.flat.nodes) nodes[node.name] = x[c.nodeIndex.get(node.key)!]!;
  const currents: Record<string, number> = {};
  const power: Record<string, number> = {};
  for (const d of c.devices) {
    const rep = d.report(x, state);
    for (const [label, amps] of rep.currents) currents[label ? `${d.name}.${label}` : d.name] = amps;
    power[d.name] = rep.power;
  }
  return { nodes, currents, power };
}

/** Voltage of node `key` against node `refKey` in the present solution. */
export function nodeVoltage(c: CompiledCircuit, key: string, refKey = '0'): number {
  const { x } = c.ws;
  return x[c.nodeIndex.get(key) ?? 0]! - x[c.nodeIndex.get(refKey) ?? 0]!;
}
