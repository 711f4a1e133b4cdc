/**
 * Random linear networks for engine tests: fast-check arbitraries, their
 * netlist text, and an independent modified-nodal-analysis solution built
 * from the element list (not from the netlist) with the element stamps of
 * Ho, Ruehli and Brennan, "The modified nodal approach to network
 * analysis", IEEE Trans. Circuits Syst. 22(6), 1975, solved by mathjs in
 * 64-digit decimal arithmetic.
 */
import fc from 'fast-check';
import { all, create, type BigNumber } from 'mathjs';
import { ml } from './ml-matrix.js';

/** One element; nodes are 0 (ground) .. nodes. Currents use the passive convention (enter p, leave n). */
export type NetElement =
  | { readonly kind: 'R'; readonly name: string; readonly p: number; readonly n: number; readonly value: number }
  | { readonly kind: 'V' | 'I'; readonly name: string; readonly p: number; readonly n: number; readonly value: number }
  | { readonly kind: 'E' | 'G'; readonly name: string; readonly p: number; readonly n: number; readonly cp: number; readonly cn: number; readonly value: number }
  | { readonly kind: 'F' | 'H'; readonly name: string; readonly p: number; readonly n: number; readonly control: string; readonly value: number };

/** A network of `nodes` nodes besides ground. */
export interface Network {
  readonly nodes: number;
  readonly elements: readonly NetElement[];
}

export const nodeName = (i: number): string => (i === 0 ? '0' : `n${i}`);

/** Netlist text (title line, elements, .op). */
export function toNetlist(net: Network, title = 'random linear network'): string {
  const lines = net.elements.map((e) => {
    const pn = `${nodeName(e.p)} ${nodeName(e.n)}`;
    switch (e.kind) {
      case 'E':
      case 'G':
        return `${e.name} ${pn} ${nodeName(e.cp)} ${nodeName(e.cn)} ${e.value}`;
      case 'F':
      case 'H':
        return `${e.name} ${pn} ${e.control} ${e.value}`;
      default:
        return `${e.name} ${pn} ${e.value}`;
    }
  });
  return [title, ...lines, '.op', ''].join('\n');
}

/** The independent MNA solution: node voltages by node name, currents by element name. */
export interface MnaSolution {
  readonly voltages: Record<string, number>;
  readonly currents: Record<string, number>;
  /** Names of the branch-current unknowns (V, E, H), in matrix order after the nodes. */
  readonly branches: readonly string[];
  /** 2-norm condition number of the MNA matrix (ml-matrix SVD); Infinity, with no values, when singular. */
  readonly condition: number;
  /** ∞-norm of the MNA matrix (mixed units: siemens and the ±1 of branch incidence). */
  readonly normA: number;
}

/**
 * mathjs in 64-digit decimal arithmetic: a reference whose own round-off is
 * far below double precision. Its default comparison tolerances (relTol
 * 1e-12, absTol 1e-15) would make the triangular solves treat right-hand
 * entries below 1e-15 as zero (a node at 1 nV behind 1 MΩ came back at 0 V),
 * so they are set to the working precision.
 */
const big = create(all!, { number: 'BigNumber', precision: 64, relTol: 1e-60, absTol: 1e-300 });
type Big = BigNumber;

/**
 * Builds the MNA matrix of Ho, Ruehli and Brennan (1975) from the element
 * list and solves it with mathjs `lusolve` in 64-digit BigNumber arithmetic.
 * Element values enter as the decimal strings the netlist carries.
 */
export function solveMna(net: Network): MnaSolution {
  const branchOf = new Map<string, number>();
  let size = net.nodes;
  for (const e of net.elements) if (e.kind === 'V' || e.kind === 'E' || e.kind === 'H') branchOf.set(e.name, size++);
  const zero = big.bignumber(0) as Big;
  const a: Big[][] = Array.from({ length: size }, () => Array<Big>(size).fill(zero));
  const z: Big[] = Array<Big>(size).fill(zero);
  const num = (v: number): Big => big.bignumber(String(v)) as Big;
  // Node k is row/column k − 1; ground is dropped.
  const add = (r: number, c: number, v: Big): void => {
    if (r >= 0 && c >= 0) a[r]![c] = a[r]![c]!.add(v);
  };
  const inject = (r: number, v: Big): void => {
    if (r >= 0) z[r] = z[r]!.add(v);
  };
  const one = big.bignumber(1) as Big;
  const node = (k: number): number => k - 1;
  for (const e of net.elements) {
    const p = node(e.p);
    const n = node(e.n);
    const val = num(e.value);
    switch (e.kind) {
      case 'R': {
        const g = one.div(val);
        add(p, p, g), add(n, n, g), add(p, n, g.neg()), add(n, p, g.neg());
        break;
      }
      case 'I':
        // The source current flows from p through the source to n: it leaves node p.
        inject(p, val.neg()), inject(n, val);
        break;
      case 'G':
        add(p, node(e.cp), val), add(p, node(e.cn), val.neg()), add(n, node(e.cp), val.neg()), add(n, node(e.cn), val);
        break;
      case 'F': {
        const kc = branchOf.get(e.control)!;
        add(p, kc, val), add(n, kc, val.neg());
        break;
      }
      default: {
        const k = branchOf.get(e.name)!;
        add(p, k, one), add(n, k, one.neg()), add(k, p, one), add(k, n, one.neg());
        if (e.kind === 'V') z[k] = val;
        if (e.kind === 'E') add(k, node(e.cp), val.neg()), add(k, node(e.cn), val);
        if (e.kind === 'H') add(k, branchOf.get(e.control)!, val.neg());
      }
    }
  }
  const dbl = a.map((row) => row.map((v) => v.toNumber()));
  const condition = new ml.SingularValueDecomposition(new ml.Matrix(dbl)).condition;
  const normA = Math.max(...dbl.map((row) => row.reduce((t, v) => t + Math.abs(v), 0)));
  const branches = [...branchOf.keys()];
  // Random gains can make a network singular (an F that absorbs its own controlling current).
  if (!(condition < 1e14)) return { voltages: {}, currents: {}, branches, condition: Number.POSITIVE_INFINITY, normA };
  const sol = big.lusolve(big.matrix(a), big.matrix(z)) as unknown as { toArray(): (Big | number)[][] };
  // An all-zero right-hand side comes back as plain numbers.
  const xb = sol.toArray().map((r) => big.bignumber(r[0]!) as Big);
  const vb = (k: number): Big => (k === 0 ? zero : xb[k - 1]!);
  const voltages: Record<string, number> = {};
  for (let k = 1; k <= net.nodes; k++) voltages[nodeName(k)] = vb(k).toNumber();
  const currents: Record<string, number> = {};
  for (const e of net.elements) {
    if (e.kind === 'R') currents[e.name] = vb(e.p).sub(vb(e.n)).div(num(e.value)).toNumber();
    else if (e.kind === 'I') currents[e.name] = e.value;
    else if (e.kind === 'G') currents[e.name] = num(e.value).mul(vb(e.cp).sub(vb(e.cn))).toNumber();
    else if (e.kind === 'F') currents[e.name] = num(e.value).mul(xb[branchOf.get(e.control)!]!).toNumber();
    else currents[e.name] = xb[branchOf.get(e.name)!]!.toNumber();
  }
  return { voltages, currents, branches, condition, normA };
}

/** Options of the network generator. */
export interface NetworkShape {
  readonly minNodes: number;
  readonly maxNodes: number;
  /** Independent voltage sources, at least / at most. */
  readonly vSources: readonly [number, number];
  readonly iSources: readonly [number, number];
  /** Include E, G, F and H elements. */
  readonly controlled: boolean;
}

const DEFAULT_SHAPE: NetworkShape = { minNodes: 2, maxNodes: 8, vSources: [0, 3], iSources: [0, 3], controlled: false };

/** Log-uniform on a grid of 1000 steps per decade: 10^lo .. 10^hi, rounded to 6 digits. */
export const logUniform = (lo: number, hi: number): fc.Arbitrary<number> => fc.integer({ min: Math.round(lo * 1000), max: Math.round(hi * 1000) }).map((k) => Number((10 ** (k / 1000)).toPrecision(6)));
const signed = (mag: fc.Arbitrary<number>): fc.Arbitrary<number> => fc.tuple(mag, fc.boolean()).map(([m, s]) => (s ? -m : m));

/**
 * Random networks: a resistor tree reaching every node from ground (so
 * every node has a DC path), extra resistors, independent V and I sources
 * and, optionally, controlled sources. No loop is made of voltage-defining
 * branches (V, E, H) only.
 */
export function networkArb(shape: Partial<NetworkShape> = {}): fc.Arbitrary<Network> {
  const s = { ...DEFAULT_SHAPE, ...shape };
  const pair = fc.tuple(fc.nat(), fc.nat());
  return fc.integer({ min: s.minNodes, max: s.maxNodes }).chain((nodes) =>
    fc.record({
      tree: fc.array(fc.tuple(fc.nat(), logUniform(0, 6)), { minLength: nodes, maxLength: nodes }),
      extra: fc.array(fc.tuple(pair, logUniform(0, 6)), { maxLength: nodes }),
      vs: fc.array(fc.tuple(pair, signed(logUniform(-1, 1.3))), { minLength: s.vSources[0], maxLength: s.vSources[1] }),
      is: fc.array(fc.tuple(pair, signed(logUniform(-6, -2))), { minLength: s.iSources[0], maxLength: s.iSources[1] }),
      e: fc.array(fc.tuple(pair, pair, signed(logUniform(-2, 0.7))), { maxLength: s.controlled ? 2 : 0 }),
      g: fc.array(fc.tuple(pair, pair, signed(logUniform(-6, -2))), { maxLength: s.controlled ? 2 : 0 }),
      f: fc.array(fc.tuple(pair, fc.nat(), signed(logUniform(-2, 0.7))), { maxLength: s.controlled ? 2 : 0 }),
      h: fc.array(fc.tuple(pair, fc.nat(), signed(logUniform(0, 3))), { maxLength: s.controlled ? 2 : 0 }),
    }).map((raw) => buildNetwork(nodes, raw)),
  );
}

type Pair = [number, number];
interface RawNetwork {
  tree: [number, number][];
  extra: [Pair, number][];
  vs: [Pair, number][];
  is: [Pair, number][];
  e: [Pair, Pair, number][];
  g: [Pair, Pair, number][];
  f: [Pair, number, number][];
  h: [Pair, number, number][];
}

function buildNetwork(nodes: number, raw: RawNetwork): Network {
  const els: NetElement[] = [];
  const distinct = ([a, b]: Pair): Pair | undefined => {
    const p = a % (nodes + 1);
    const n = b % (nodes + 1);
    return p === n ? undefined : [p, n];
  };
  const parent = Array.from({ length: nodes + 1 }, (_, i) => i);
  const find = (i: number): number => (parent[i] === i ? i : (parent[i] = find(parent[i]!)));
  // A voltage-defining branch is kept only when it joins two separate groups (no V/E/H loop).
  const joins = ([p, n]: Pair): boolean => {
    const rp = find(p);
    const rn = find(n);
    if (rp === rn) return false;
    parent[rp] = rn;
    return true;
  };
  raw.tree.forEach(([k, ohms], i) => els.push({ kind: 'R', name: `RT${i + 1}`, p: i + 1, n: k % (i + 1), value: ohms }));
  raw.extra.forEach(([pr, ohms], i) => {
    const pn = distinct(pr);
    if (pn) els.push({ kind: 'R', name: `RX${i + 1}`, p: pn[0], n: pn[1], value: ohms });
  });
  const vNames: string[] = [];
  raw.vs.forEach(([pr, volts], i) => {
    const pn = distinct(pr);
    if (pn && joins(pn)) {
      els.push({ kind: 'V', name: `V${i + 1}`, p: pn[0], n: pn[1], value: volts });
      vNames.push(`V${i + 1}`);
    }
  });
  raw.is.forEach(([pr, amps], i) => {
    const pn = distinct(pr);
    if (pn) els.push({ kind: 'I', name: `I${i + 1}`, p: pn[0], n: pn[1], value: amps });
  });
  raw.e.forEach(([pr, cr, gain], i) => {
    const pn = distinct(pr);
    const c = distinct(cr);
    if (pn && c && joins(pn)) els.push({ kind: 'E', name: `E${i + 1}`, p: pn[0], n: pn[1], cp: c[0], cn: c[1], value: gain });
  });
  raw.g.forEach(([pr, cr, gm], i) => {
    const pn = distinct(pr);
    const c = distinct(cr);
    if (pn && c) els.push({ kind: 'G', name: `G${i + 1}`, p: pn[0], n: pn[1], cp: c[0], cn: c[1], value: gm });
  });
  if (vNames.length > 0) {
    raw.f.forEach(([pr, k, gain], i) => {
      const pn = distinct(pr);
      if (pn) els.push({ kind: 'F', name: `F${i + 1}`, p: pn[0], n: pn[1], control: vNames[k % vNames.length]!, value: gain });
    });
    raw.h.forEach(([pr, k, rm], i) => {
      const pn = distinct(pr);
      if (pn && joins(pn)) els.push({ kind: 'H', name: `H${i + 1}`, p: pn[0], n: pn[1], control: vNames[k % vNames.length]!, value: rm });
    });
  }
  return { nodes, elements: els };
}

/** The same network with every independent source but `keep` set to zero (V: short, I: open). */
export function onlySource(net: Network, keep: string): Network {
  return { ...net, elements: net.elements.map((e) => ((e.kind === 'V' || e.kind === 'I') && e.name !== keep ? { ...e, value: 0 } : e)) };
}

/** Names of the independent sources. */
export function independentSources(net: Network): string[] {
  return net.elements.filter((e) => e.kind === 'V' || e.kind === 'I').map((e) => e.name);
}
