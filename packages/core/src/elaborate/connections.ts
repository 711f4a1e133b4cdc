/**
 * Connection checks on the flat circuit, before anything is compiled or
 * solved (docs/netlist.md, "Connection checks"):
 * - a warning for every node that exactly one element terminal touches (a
 *   misspelt node name, or an element left out);
 * - an error when the `.supply` load does not touch `out`, or touches it
 *   but shares no loop with the rail (its other end leads nowhere);
 * - an error when the `.supply` input source shares no loop with the rail.
 *
 * "Shares a loop with the rail": the rail is read between `out` and `ref`,
 * as by a voltmeter across them. The circuit is a graph in which every
 * element is a vertex joined to each node it touches (an E or G also to
 * its controlling nodes; an F or H also to the V element whose current
 * controls it), and the voltmeter is one more such vertex joined to `out`
 * and `ref`. An element shares a loop with the rail when a closed path
 * runs through it and through the voltmeter without passing any node or
 * element twice (the two lie in one biconnected component; blocks.ts).
 * A path that can reach `out` only by way of a single node (ground, say,
 * when the source's other terminal touches nothing else) does not count:
 * what hangs from the rest of the circuit by one node exchanges no current
 * with it (Kirchhoff's current law on the part that hangs), so it cannot
 * feed the stage nor load it.
 */
import { match } from 'ts-pattern';
import { errorAt, warningAt, type Diagnostic } from '../errors.js';
import { findBlocks, shareCycle, type UndirectedGraph } from './blocks.js';
import { GROUND_KEY, type FlatCircuit, type FlatElement, type FlatSupply } from './flat.js';

/** What the checks found: errors stop the run, warnings go into the report. */
export interface ConnectionFindings {
  readonly errors: readonly Diagnostic[];
  readonly warnings: readonly Diagnostic[];
}

/** The name of each terminal of an element, in the order of its `nodes`. */
function terminalNames(el: FlatElement): readonly string[] {
  return match(el)
    .with({ kind: 'resistor' }, { kind: 'capacitor' }, { kind: 'inductor' }, { kind: 'vsource' }, { kind: 'isource' }, { kind: 'cccs' }, { kind: 'ccvs' }, () => ['n+', 'n-'])
    .with({ kind: 'vcvs' }, { kind: 'vccs' }, () => ['n+', 'n-', 'nc+ (controlling)', 'nc- (controlling)'])
    .with({ kind: 'diode' }, () => ['anode', 'cathode'])
    .with({ kind: 'bjt' }, () => ['collector', 'base', 'emitter'])
    .with({ kind: 'coupling' }, () => [])
    .exhaustive();
}

/** Elements an element is joined to besides its nodes: an F or H to its controlling V element, a K to its two inductors (by key). */
function linkedElements(el: FlatElement): readonly string[] {
  return match(el)
    .with({ kind: 'cccs' }, { kind: 'ccvs' }, (e) => [e.control])
    .with({ kind: 'coupling' }, (e) => [...e.inductors])
    .with({ kind: 'resistor' }, { kind: 'capacitor' }, { kind: 'inductor' }, { kind: 'vsource' }, { kind: 'isource' }, { kind: 'vcvs' }, { kind: 'vccs' }, { kind: 'diode' }, { kind: 'bjt' }, () => [])
    .exhaustive();
}

/** The name of a node as the user wrote it (ground as `0`). */
function nodeNames(c: FlatCircuit): Map<string, string> {
  return new Map([[GROUND_KEY, '0'], ...c.nodes.map((n) => [n.key, n.name] as const)]);
}

/**
 * A warning for every node exactly one element terminal touches, at that
 * element's card. The nodes `.supply` names (out, ref, feed) count the
 * `.supply` line as one connection: the rail is read there, so an unloaded
 * output on one emitter is not a stray wire.
 */
export function singleConnectionWarnings(c: FlatCircuit): Diagnostic[] {
  const touches = new Map<string, { count: number; el: FlatElement; terminal: number }>();
  for (const el of c.elements) {
    el.nodes.forEach((key, terminal) => {
      const t = touches.get(key);
      if (t) t.count++;
      else touches.set(key, { count: 1, el, terminal });
    });
  }
  const s = c.supply;
  const measured = new Set(s ? [s.out, s.ref, ...(s.feed !== undefined ? [s.feed] : [])] : []);
  const names = nodeNames(c);
  const out: Diagnostic[] = [];
  for (const [key, t] of touches) {
    if (t.count !== 1 || measured.has(key)) continue;
    const node = key === GROUND_KEY ? 'ground (0)' : `node ${names.get(key) ?? key}`;
    out.push(warningAt(
      'single-connection',
      `${node} has a single connection: only the ${terminalNames(t.el)[t.terminal]} of ${t.el.name} touches it (a misspelt node name, or a missing element?)`,
      t.el.origin.pos, t.el.origin.lineText,
    ));
  }
  return out;
}

/** The connection graph: a vertex per node, per element and for the voltmeter across the rail. */
interface ConnectionGraph extends UndirectedGraph {
  /** Vertex of each element, by key. */
  readonly elementVertex: ReadonlyMap<string, number>;
  /** Vertex of the voltmeter across out–ref. */
  readonly meter: number;
}

function connectionGraph(c: FlatCircuit, supply: FlatSupply): ConnectionGraph {
  const nodeVertex = new Map<string, number>([[GROUND_KEY, 0]]);
  c.nodes.forEach((n) => nodeVertex.set(n.key, nodeVertex.size));
  const elementVertex = new Map<string, number>();
  c.elements.forEach((el, i) => elementVertex.set(el.key, nodeVertex.size + i));
  const meter = nodeVertex.size + c.elements.length;
  const edges: Array<readonly [number, number]> = [];
  for (const el of c.elements) {
    const v = elementVertex.get(el.key)!;
    for (const key of new Set(el.nodes)) edges.push([v, nodeVertex.get(key)!]);
    for (const other of linkedElements(el)) {
      const w = elementVertex.get(other);
      if (w !== undefined) edges.push([v, w]);
    }
  }
  edges.push([meter, nodeVertex.get(supply.out)!], [meter, nodeVertex.get(supply.ref)!]);
  return { vertexCount: meter + 1, edges, elementVertex, meter };
}

/** The nodes of an element in words: `in and 0`. */
function nodesInWords(el: FlatElement, names: ReadonlyMap<string, string>): string {
  const list = el.nodes.map((k) => names.get(k) ?? k);
  return list.length === 2 ? `${list[0]} and ${list[1]}` : `${list.slice(0, -1).join(', ')} and ${list[list.length - 1]}`;
}

/**
 * Errors for a `.supply` whose load does not touch `out` (or shares no
 * loop with the rail) and whose input source shares no loop with the rail
 * (module comment), at the `.supply` line. Nothing to check when `out` and
 * `ref` are one node.
 */
export function supplyConnectionErrors(c: FlatCircuit): Diagnostic[] {
  const s = c.supply;
  if (!s || s.out === s.ref) return [];
  const names = nodeNames(c);
  const byKey = new Map(c.elements.map((el) => [el.key, el] as const));
  const input = byKey.get(s.input);
  const load = s.load === undefined ? undefined : byKey.get(s.load);
  const g = connectionGraph(c, s);
  const blocks = findBlocks(g);
  const onLoop = (el: FlatElement): boolean => shareCycle(g, blocks, g.elementVertex.get(el.key)!, g.meter);
  const out = names.get(s.out) ?? s.out;
  const rail = `${out}–${names.get(s.ref) ?? s.ref}`;
  const at = (code: string, message: string, expected: string): Diagnostic => errorAt(code, message, s.origin.pos, s.origin.lineText, expected);
  const errors: Diagnostic[] = [];
  if (load) {
    if (!(load.nodes as readonly string[]).includes(s.out)) {
      errors.push(at('load-off-output', `.supply load=${load.name} does not touch the output node ${out}: ${load.name} connects ${nodesInWords(load, names)}, so the figures would be taken with a load that carries none of the stage's current`, `a load element with one terminal on ${out} (out=), e.g. ${load.name} ${out} 0 ...`));
    } else if (!onLoop(load)) {
      errors.push(at('load-not-across-rail', `.supply load=${load.name} touches ${out} but shares no loop with the rail ${rail}: ${load.name} connects ${nodesInWords(load, names)}, and its other end leads nowhere, so it carries no current`, `a load element from ${out} to a node that returns to the rail's reference, e.g. ${load.name} ${out} 0 ...`));
    }
  }
  if (input && !onLoop(input)) {
    errors.push(at('input-not-connected', `.supply in=${input.name} is not connected to the stage: ${input.name} connects ${nodesInWords(input, names)}, and no loop runs from it through the circuit to ${out} and back across the rail ${rail} without passing a node twice (a path only by way of one node, such as ground, carries no current)`, `the V element that feeds the stage, its terminals wired to the stage's input and return (e.g. ${input.name} in 0 ... with the stage on node in)`));
  }
  return errors;
}

/** Runs every connection check on a flat circuit that elaborated without errors. */
export function checkConnections(c: FlatCircuit): ConnectionFindings {
  return { errors: supplyConnectionErrors(c), warnings: singleConnectionWarnings(c) };
}
