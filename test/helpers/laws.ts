/**
 * Reusable law checks on a solved circuit: Kirchhoff's current law at every
 * node and Tellegen's theorem (the absorbed powers of all elements sum to
 * zero; B. D. H. Tellegen, Philips Research Reports 7, 1952).
 */
import type { CompiledCircuit, FlatElement } from '@railcheck/core';
import { readSolution } from '@railcheck/core';

/** Terminal node keys of an element, in the order its report lists currents. */
function terminals(el: FlatElement): readonly string[] {
  switch (el.kind) {
    case 'bjt':
      return el.nodes;
    case 'vcvs':
    case 'vccs':
      return [el.nodes[0], el.nodes[1]];
    default:
      return el.nodes;
  }
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
    const t = terminals(el);
    if (el.kind === 'bjt') {
      add(t[0]!, sol.currents[`${el.name}.c`]!);
      add(t[1]!, sol.currents[`${el.name}.b`]!);
      add(t[2]!, sol.currents[`${el.name}.e`]!);
    } else {
      const i = sol.currents[el.name]!;
      add(t[0]!, i);
      add(t[1]!, -i);
    }
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
