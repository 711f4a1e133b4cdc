/**
 * Property: flattening does not change a circuit (netlist.md, Subcircuits).
 * A random resistor network fed by a voltage source (and a current source)
 * is written twice: flat, and with every resistor moved into a random tree
 * of subcircuit instances — ports under names of their own, nodes used only
 * inside one instance made local to it, values scaled down by an instance
 * parameter and back up inside, definitions placed at the top or nested in
 * their parent's body, ground written `0` or `gnd`. Both solve to the same
 * node voltages and element currents (names mapped to their `X1.X2.`
 * paths). The reference is the flat circuit itself, not a stored number.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { runNetlist, formatDiagnostic, type OperatingPoint } from '@railcheck/core';
import { seedFor } from './support.js';

const seed = seedFor('hierarchy.property.test.ts');

interface Resistor {
  readonly a: number;
  readonly b: number;
  readonly ohms: number;
  /** Instance path, e.g. [1, 0] = inside X1, inside its X0. */
  readonly path: readonly number[];
}

interface Net {
  readonly nodes: number;
  readonly volts: number;
  readonly inject: { readonly node: number; readonly amps: number };
  readonly resistors: readonly Resistor[];
  /** Per instance path (joined by '.'): the instance parameter g, a power of two so scaling is exact. */
  readonly gains: ReadonlyMap<string, number>;
  readonly nestDefs: boolean;
  readonly gndWord: boolean;
}

const pathArb = fc.array(fc.integer({ min: 0, max: 2 }), { maxLength: 3 });
const ohmsArb = fc.integer({ min: 1, max: 1_000_000 });

/** Node 0 is ground; nodes 1..n hang off a random spanning tree so every node has a DC path. */
const netArb: fc.Arbitrary<Net> = fc.integer({ min: 2, max: 7 }).chain((n) =>
  fc.record({
    nodes: fc.constant(n),
    volts: fc.integer({ min: 1, max: 50 }),
    inject: fc.record({ node: fc.integer({ min: 1, max: n }), amps: fc.integer({ min: -20, max: 20 }).map((k) => k * 1e-3) }),
    tree: fc.tuple(...Array.from({ length: n }, (_, i) => fc.tuple(fc.integer({ min: 0, max: i }), ohmsArb, pathArb))),
    extra: fc.array(fc.tuple(fc.integer({ min: 0, max: n }), fc.integer({ min: 0, max: n }), ohmsArb, pathArb), { maxLength: 6 }),
    gainList: fc.array(fc.constantFrom(0.25, 0.5, 1, 2, 4, 8), { minLength: 40, maxLength: 40 }),
    nestDefs: fc.boolean(),
    gndWord: fc.boolean(),
  }).map((r) => {
    const resistors: Resistor[] = r.tree.map(([parent, ohms, path], i) => ({ a: i + 1, b: parent, ohms, path }));
    for (const [a, b, ohms, path] of r.extra) if (a !== b) resistors.push({ a, b, ohms, path });
    const gains = new Map<string, number>();
    let k = 0;
    for (const res of resistors) {
      for (let d = 1; d <= res.path.length; d++) {
        const key = res.path.slice(0, d).join('.');
        if (!gains.has(key)) gains.set(key, r.gainList[k++ % r.gainList.length]!);
      }
    }
    return { nodes: n, volts: r.volts, inject: r.inject, resistors, gains, nestDefs: r.nestDefs, gndWord: r.gndWord };
  }),
);

const SOURCES = (net: Net): string => `V1 n1 0 ${net.volts}\nI1 0 n${net.inject.node} ${net.inject.amps}\n`;

function flatText(net: Net): string {
  const node = (g: number): string => (g === 0 ? '0' : `n${g}`);
  return `Flat network\n${SOURCES(net)}${net.resistors.map((r, i) => `R${i} ${node(r.a)} ${node(r.b)} ${r.ohms}`).join('\n')}\n`;
}

const isPrefix = (p: readonly number[], q: readonly number[]): boolean => p.length <= q.length && p.every((x, i) => q[i] === x);

/** The deepest instance path containing every element that touches `node` (V1 and I1 sit at the top). */
function owner(net: Net, node: number): readonly number[] {
  const paths = net.resistors.filter((r) => r.a === node || r.b === node).map((r) => r.path);
  if (node === 1 || node === net.inject.node || paths.length === 0) return [];
  let common = paths[0]!;
  for (const p of paths) {
    let i = 0;
    while (i < common.length && i < p.length && common[i] === p[i]) i++;
    common = common.slice(0, i);
  }
  return common;
}

/** The hierarchical text, and for each flat node and element name its expected flat name after elaboration. */
function hierText(net: Net): { text: string; nodeName: Map<string, string>; elementName: Map<string, string> } {
  const owners = Array.from({ length: net.nodes + 1 }, (_, g) => (g === 0 ? [] : owner(net, g)));
  const key = (p: readonly number[]): string => p.join('.');
  const instances = [...new Set(net.resistors.flatMap((r) => r.path.map((_, d) => key(r.path.slice(0, d + 1)))))]
    .map((k) => k.split('.').map(Number));
  const defName = (p: readonly number[]): string => `S_${p.join('_')}`;
  const prefix = (p: readonly number[]): string => p.map((i) => `X${i}.`).join('');
  // Inside the definition for path p: how node g is written there.
  const ports = (p: readonly number[]): number[] =>
    [...new Set(net.resistors.filter((r) => isPrefix(p, r.path)).flatMap((r) => [r.a, r.b]))]
      .filter((g) => g !== 0 && !isPrefix(p, owners[g]!)).sort((x, y) => x - y);
  const nameIn = (p: readonly number[], g: number): string => {
    if (g === 0) return net.gndWord ? 'gnd' : '0';
    if (p.length === 0) return `n${g}`;
    return ports(p).includes(g) ? `p${g}` : `m${g}`;
  };
  const gainOf = (p: readonly number[]): number => (p.length === 0 ? 1 : net.gains.get(key(p))!);
  const body = (p: readonly number[]): string[] => {
    const lines: string[] = [];
    net.resistors.forEach((r, i) => {
      if (key(r.path) !== key(p)) return;
      const value = p.length === 0 ? `${r.ohms}` : `{${r.ohms / gainOf(p)}*g}`;
      lines.push(`R${i} ${nameIn(p, r.a)} ${nameIn(p, r.b)} ${value}`);
    });
    for (const child of instances.filter((q) => q.length === p.length + 1 && isPrefix(p, q))) {
      const conn = ports(child).map((g) => nameIn(p, g)).join(' ');
      lines.push(`X${child[child.length - 1]} ${conn} ${defName(child)} g=${gainOf(child)}`);
    }
    return lines;
  };
  const definition = (p: readonly number[]): string[] => {
    const nested = net.nestDefs ? instances.filter((q) => q.length === p.length + 1 && isPrefix(p, q)).flatMap(definition) : [];
    return [`.subckt ${defName(p)} ${ports(p).map((g) => `p${g}`).join(' ')} g=1`, ...nested, ...body(p), `.ends ${defName(p)}`];
  };
  const defs = net.nestDefs ? instances.filter((q) => q.length === 1).flatMap(definition) : instances.flatMap(definition);
  const text = `Hierarchical network\n${defs.join('\n')}\n${SOURCES(net)}${body([]).join('\n')}\n`;
  const nodeName = new Map<string, string>();
  for (let g = 1; g <= net.nodes; g++) nodeName.set(`n${g}`, owners[g]!.length === 0 ? `n${g}` : `${prefix(owners[g]!)}m${g}`);
  const elementName = new Map<string, string>([['V1', 'V1'], ['I1', 'I1']]);
  net.resistors.forEach((r, i) => elementName.set(`R${i}`, `${prefix(r.path)}R${i}`));
  return { text, nodeName, elementName };
}

function op(text: string): OperatingPoint {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(`${r.errors.map(formatDiagnostic).join('\n')}\n--- netlist ---\n${text}`);
  return r.report.operatingPoints[0]!;
}

describe('flattening preserves the circuit', () => {
  test('random resistor networks in random subcircuit hierarchies solve like the flat network', () => {
    fc.assert(
      fc.property(netArb, (net) => {
        const flat = op(flatText(net));
        const hier = hierText(net);
        const nested = op(hier.text);
        const scaleV = Math.max(...Object.values(flat.nodes).map(Math.abs), 1e-12);
        const scaleI = Math.max(...Object.values(flat.currents).map(Math.abs), 1e-15);
        expect(Object.keys(nested.nodes).sort()).toEqual([...hier.nodeName.values()].sort());
        for (const [flatName, volts] of Object.entries(flat.nodes)) {
          const v = nested.nodes[hier.nodeName.get(flatName)!];
          // Same equations in another unknown order: agreement to round-off of the dense solve (worst observed
          // 7.8e-11·scale for voltages and 7.6e-11·scale for currents over FC_SEED 20261201, 1–13 and 424242; bounds 2e-10·scale).
          expect(Math.abs(v! - volts), `${flatName}\n${hier.text}`).toBeLessThanOrEqual(2e-10 * scaleV);
        }
        for (const [flatName, amps] of Object.entries(flat.currents)) {
          const i = nested.currents[hier.elementName.get(flatName)!];
          expect(Math.abs(i! - amps), `${flatName}\n${hier.text}`).toBeLessThanOrEqual(2e-10 * scaleI);
        }
      }),
      { seed, numRuns: Number(process.env.RUNS ?? 150) },
    );
  });
});
