/**
 * Topology checks before any solve: every node needs a DC path to ground,
 * and no loop may consist of voltage-defining branches only (voltage
 * sources, E and H outputs, and inductors, which are shorts at DC). Both
 * make the MNA matrix singular; naming the nodes and elements is far more
 * useful to a user than a pivot failure.
 */
import type { Device } from '@railcheck/devices';
import { errorAt, type Diagnostic } from '../errors.js';
import type { FlatCircuit } from '../elaborate/flat.js';
import type { UnknownInfo } from './unknowns.js';

function makeSets(n: number): { find: (i: number) => number; union: (a: number, b: number) => boolean } {
  const parent = Int32Array.from({ length: n }, (_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) {
      parent[i] = parent[parent[i]!]!;
      i = parent[i]!;
    }
    return i;
  };
  return {
    find,
    union: (a, b) => {
      const ra = find(a);
      const rb = find(b);
      if (ra === rb) return false;
      parent[ra] = rb;
      return true;
    },
  };
}

/** Returns one diagnostic per problem found (empty when the topology is sound). */
export function checkTopology(flat: FlatCircuit, devices: readonly Device[], unknowns: readonly UnknownInfo[]): Diagnostic[] {
  const errors: Diagnostic[] = [];
  const n = unknowns.length;
  const dc = makeSets(n);
  const loops = makeSets(n);
  const touching = new Map<number, string[]>();
  // Unknown index of each node key (nodes come first, after ground): one look-up per terminal, not a scan.
  const indexOf = new Map(flat.nodes.map((node, i) => [node.key, i + 1] as const));
  devices.forEach((d, i) => {
    const topo = d.topology();
    for (const [a, b] of topo.dcPaths) dc.union(a, b);
    for (const [a, b] of topo.voltageDefined) {
      if (!loops.union(a, b)) {
        const el = flat.elements[i]!;
        const na = unknowns[a]?.name ?? '?';
        const nb = unknowns[b]?.name ?? '?';
        errors.push(errorAt('voltage-loop', `${el.name} closes a loop of voltage sources and inductors between ${na} and ${nb}`, el.origin.pos, el.origin.lineText, 'no loop made only of V, E, H and L elements (add a series resistance)'));
      }
    }
    for (const key of flat.elements[i]!.nodes) {
      const idx = indexOf.get(key);
      if (idx === undefined) continue;
      const list = touching.get(idx);
      if (list) list.push(flat.elements[i]!.name);
      else touching.set(idx, [flat.elements[i]!.name]);
    }
  });
  const ground = dc.find(0);
  const floating = new Map<number, number[]>();
  for (let i = 1; i < n; i++) {
    if (unknowns[i]!.kind !== 'node' || dc.find(i) === ground) continue;
    const root = dc.find(i);
    const group = floating.get(root);
    if (group) group.push(i);
    else floating.set(root, [i]);
  }
  for (const group of floating.values()) {
    const names = group.map((i) => unknowns[i]!.name);
    const elements = [...new Set(group.flatMap((i) => touching.get(i) ?? []))];
    const attached = new Set(elements);
    const first = flat.elements.find((el) => attached.has(el.name));
    errors.push(errorAt(
      'no-dc-path',
      `node${names.length > 1 ? 's' : ''} ${names.join(', ')} ha${names.length > 1 ? 've' : 's'} no DC path to ground (connected only through ${elements.join(', ') || 'nothing'})`,
      // No element names the node (it comes from a directive or a subcircuit's internals): the netlist as a whole, at its title line.
      first?.origin.pos ?? { file: flat.file, line: 1, column: 1 }, first ? first.origin.lineText : flat.title,
      'a resistive or conducting path from every node to ground (a capacitor or current source alone is not one)',
    ));
  }
  return errors;
}
