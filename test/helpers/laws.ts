/**
 * Reusable law checks on a solved circuit: Kirchhoff's current law at every
 * node and Tellegen's theorem (the absorbed powers of all elements sum to
 * zero; B. D. H. Tellegen, Philips Research Reports 7, 1952).
 */
import type { CompiledCircuit, FlatElement } from '@railcheck/core';
import { readSolution } from '@railcheck/core/internal';
import { DEVICES } from '@railcheck/devices';

/**
 * The currents an element draws from each of its nodes, as (node key, amps)
 * pairs, from its reported currents (`current(label)`, labels as the
 * registry's report shape gives them): one current '' enters n+ and leaves
 * at n− (the passive convention of netlist.md); labelled currents (a
 * transistor's c, b, e) enter their own terminals; a coupling has none.
 */
export function terminalCurrents(el: FlatElement, current: (label: string) => number): Array<readonly [string, number]> {
  const labels: readonly string[] = DEVICES[el.kind].currents;
  const nodes: readonly string[] = el.nodes;
  if (labels.length === 1 && labels[0] === '') {
    const i = current('');
    return [[nodes[0]!, i], [nodes[1]!, -i]];
  }
  return labels.map((label, k) => [nodes[k]!, current(label)] as const);
}

/**
 * Largest KCL imbalance (A) over all nodes, and the scale it is relative to
 * (the largest current through any element at that node).
 */
export function kclImbalance(c: CompiledCircuit): { worst: number; scale: number; node: string } {
  const sol = readSolution(c);
  const sums = new Map<string, number>();
  const scale = new Map<string, number>();
  const add = (key: string, amps: number): void => {
    sums.set(key, (sums.get(key) ?? 0) + amps);
    scale.set(key, Math.max(scale.get(key) ?? 0, Math.abs(amps)));
  };
  for (const el of c.elements) {
    for (const [node, amps] of terminalCurrents(el, (label) => sol.currents[label ? `${el.name}.${label}` : el.name]!)) add(node, amps);
  }
  let worst = 0;
  let worstScale = 0;
  let node = '';
  for (const [key, sum] of sums) {
    if (key === '0') continue;
    if (Math.abs(sum) >= worst) {
      worst = Math.abs(sum);
      worstScale = scale.get(key) ?? 0;
      node = key;
    }
  }
  return { worst, scale: worstScale, node };
}

/** Sum of absorbed powers (W) and the largest single power, for Tellegen's theorem. */
export function powerBalance(c: CompiledCircuit): { sum: number; scale: number } {
  const sol = readSolution(c);
  let sum = 0;
  let scale = 0;
  for (const p of Object.values(sol.power)) {
    sum += p;
    scale = Math.max(scale, Math.abs(p));
  }
  return { sum, scale };
}
