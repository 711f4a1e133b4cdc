/**
 * Random linear resistive networks with independent and controlled sources,
 * written as netlist text and run through the whole pipeline, against a
 * modified-nodal-analysis system built independently in the test (Ho,
 * Ruehli and Brennan, IEEE Trans. Circuits Syst. 22(6), 1975) and solved by
 * mathjs. On every solution: Kirchhoff's current law at each node and
 * Tellegen's theorem; as network properties: superposition and reciprocity.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { parseNetlist, prepare, runNetlist, type CompiledCircuit, type OperatingPoint } from '@railcheck/core';
import { operatingPoint } from '@railcheck/core/internal';
import { fcSeed } from '../../helpers/device-harness.js';
import { kclImbalance, powerBalance } from '../../helpers/laws.js';
import { independentSources, networkArb, nodeName, onlySource, solveMna, toNetlist, type Network } from '../../helpers/linear-networks.js';

const seed = fcSeed('core/engine/linear-networks');

/** Compiles and solves netlist text; fails the test with the diagnostics if either step fails. */
function solve(text: string): { c: CompiledCircuit; op: OperatingPoint } {
  const prepared = prepare(parseNetlist(text));
  if (!prepared.ok) throw new Error(`netlist rejected: ${prepared.errors.map((e) => e.message).join('; ')}\n${text}`);
  return { c: prepared.compiled, op: operatingPoint(prepared.compiled, 27) };
}


/**
 * Error allowed in the engine's solution, relative to the largest unknown
 * (volts and amps alike, the vector LU works on): a backward-stable solve
 * has a normwise forward error ≲ n·κ·eps (Golub and Van Loan §3.5, from
 * memory). Worst observed 0.81·eps·κ over FC_SEED 20261201, 1–13 and 424242
 * (the test prints it); bound 2·eps·κ.
 */
const allowed = (condition: number): number => 2 * Number.EPSILON * condition;
/** KCL and Tellegen residuals, normwise (κ plays no part): worst observed 3.2e-16 and 9.3e-17; bounds 8e-16 and 2.5e-16. */
const KCL_BOUND = 8e-16;
const TELLEGEN_BOUND = 2.5e-16;

const stats = { worst: 0, worstRatio: 0, worstKcl: 0, worstPower: 0, runs: 0 };

function checkAgainstMna(net: Network): void {
  const ref = solveMna(net);
  // Networks the random gains made nearly singular say nothing about the engine.
  fc.pre(Number.isFinite(ref.condition) && ref.condition < 1e10);
  const { c, op } = solve(toNetlist(net));
  expect(op.method).toBe('newton');
  const tol = allowed(ref.condition);
  // The unknowns of the MNA system: node voltages, then branch currents of V, E and H.
  const unknowns: [string, number, number][] = [
    ...Object.entries(ref.voltages).map(([k, v]) => [`V(${k})`, op.nodes[k]!, v] as [string, number, number]),
    ...ref.branches.map((b) => [`I(${b})`, op.currents[b]!, ref.currents[b]!] as [string, number, number]),
  ];
  const xScale = Math.max(1e-12, ...unknowns.map(([, , r]) => Math.abs(r)));
  for (const [name, got, want] of unknowns) {
    const d = Math.abs(got - want) / xScale;
    stats.worst = Math.max(stats.worst, d);
    stats.worstRatio = Math.max(stats.worstRatio, d / (Number.EPSILON * ref.condition));
    expect(d, name).toBeLessThan(tol);
  }
  // Element currents follow from the unknowns: an error δ in V gives δ·G in I.
  for (const e of net.elements) {
    const gain = e.kind === 'R' ? 2 / e.value : e.kind === 'G' ? 2 * Math.abs(e.value) : e.kind === 'F' ? Math.abs(e.value) : 1;
    expect(Math.abs(op.currents[e.name]! - ref.currents[e.name]!), `I(${e.name})`).toBeLessThan(tol * xScale * Math.max(1, gain));
  }
  // KCL (Kirchhoff 1845) from the elements' own reported currents: a residual of the node rows,
  // bounded by tol·‖A‖·‖x‖ (normwise backward error, Rigal and Gaches 1967).
  const kcl = kclImbalance(c);
  const kclScale = ref.normA * xScale;
  stats.worstKcl = Math.max(stats.worstKcl, kcl.worst / kclScale);
  expect(kcl.worst / kclScale, `KCL at ${kcl.node}`).toBeLessThan(KCL_BOUND);
  // Tellegen (Philips Res. Rep. 7, 1952): absorbed powers sum to zero, to the round-off of ΣV·I.
  const p = powerBalance(c);
  const pScale = Math.max(p.scale, net.elements.length * kclScale * xScale);
  stats.worstPower = Math.max(stats.worstPower, Math.abs(p.sum) / pScale);
  expect(Math.abs(p.sum) / pScale, 'Tellegen').toBeLessThan(TELLEGEN_BOUND);
  stats.runs++;
}

describe('random networks against an independent MNA solution (mathjs lusolve, 64 digits)', () => {
  test('resistors with V and I sources', () => {
    fc.assert(fc.property(networkArb({ vSources: [0, 3], iSources: [1, 3] }), checkAgainstMna), { seed, numRuns: 200 });
  });

  test('with controlled sources E, G, F, H', () => {
    let kinds = new Set<string>();
    fc.assert(
      fc.property(networkArb({ vSources: [1, 3], iSources: [0, 2], controlled: true }), (net) => {
        checkAgainstMna(net);
        kinds = new Set([...kinds, ...net.elements.map((e) => e.kind)]);
      }),
      { seed, numRuns: 300 },
    );
    // The generator must really have produced every controlled kind.
    expect([...kinds].sort()).toEqual(['E', 'F', 'G', 'H', 'I', 'R', 'V']);
  });

  test('agreement achieved', () => {
    console.log(
      `linear networks (${stats.runs} solved): max normwise error vs 64-digit MNA ${stats.worst.toExponential(2)} ` +
        `(${stats.worstRatio.toFixed(2)}·eps·κ); KCL ${stats.worstKcl.toExponential(2)}, Tellegen ${stats.worstPower.toExponential(2)}`,
    );
    expect(stats.runs).toBeGreaterThan(100);
  });
});

describe('network theorems', () => {
  test('superposition: the response to all sources is the sum of the responses to each alone', () => {
    fc.assert(
      fc.property(networkArb({ vSources: [1, 3], iSources: [1, 3], controlled: true }), (net) => {
        const sources = independentSources(net);
        const ref = solveMna(net);
        fc.pre(sources.length >= 2 && ref.condition < 1e10);
        // Every unknown of the MNA vector: node voltages and V/E/H branch currents.
        const unknowns = (n: Network): number[] => {
          const r = runNetlist(toNetlist(n));
          if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
          const op = r.report.operatingPoints[0]!;
          return [...Array.from({ length: net.nodes }, (_, k) => op.nodes[nodeName(k + 1)]!), ...ref.branches.map((b) => op.currents[b]!)];
        };
        const total = unknowns(net);
        const parts = sources.map((s) => unknowns(onlySource(net, s)));
        // Each solve errs by up to allowed(κ) of its largest unknown; sums of parts can cancel. Worst
        // observed 0.16·(parts + 1)·eps·κ of the largest value over FC_SEED 20261201, 1–13, 100–105 and
        // 424242; bound 0.4·(parts + 1)·eps·κ.
        const scale = Math.max(1e-12, ...[total, ...parts].flat().map(Math.abs));
        const tol = 0.4 * (parts.length + 1) * Number.EPSILON * ref.condition * scale;
        total.forEach((x, k) => {
          const sum = parts.reduce((acc, p) => acc + p[k]!, 0);
          expect(Math.abs(x - sum), `unknown ${k + 1}`).toBeLessThan(tol);
        });
      }),
      { seed, numRuns: 100 },
    );
  });

  test('reciprocity: transfer resistance a→b equals b→a in a network of resistors', () => {
    fc.assert(
      fc.property(networkArb({ minNodes: 2, vSources: [0, 0], iSources: [0, 0] }), fc.nat(), fc.nat(), (net, i, j) => {
        const a = 1 + (i % net.nodes);
        const b = 1 + (j % net.nodes);
        fc.pre(a !== b);
        const inject = (at: number): Network => ({ ...net, elements: [...net.elements, { kind: 'I', name: 'ITEST', p: 0, n: at, value: 1e-3 }] });
        const va = solve(toNetlist(inject(a))).op.nodes;
        const vb = solve(toNetlist(inject(b))).op.nodes;
        const rab = va[nodeName(b)]! / 1e-3;
        const rba = vb[nodeName(a)]! / 1e-3;
        // The driving-point resistances bound the transfer resistance; compare relative to them
        // (worst observed 6.7e-16 over FC_SEED 20261201, 1–13 and 424242; bound 1.7e-15).
        const scale = Math.max(va[nodeName(a)]!, vb[nodeName(b)]!) / 1e-3;
        expect(Math.abs(rab - rba) / scale).toBeLessThan(1.7e-15);
        expect(rab).toBeGreaterThanOrEqual(0);
      }),
      { seed, numRuns: 200 },
    );
  });

  test('a network singular through a controlled source (not through its topology) is reported, not solved', () => {
    // F1 returns exactly the current of V1 into the same node: V1's current is undetermined.
    const r = runNetlist('singular\nRT1 n1 0 1\nRT2 n2 0 1\nV1 n2 0 1\nF1 n2 0 V1 -1\n.op\n');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((e) => e.message).join(' ')).toMatch(/singular/);
  });

  test('a dependent source breaks reciprocity: hand-solved two-node example', () => {
    // 1 kΩ from each node to ground and between them; G1 feeds 1 mS·V(n1) into n2.
    // By hand: 1 mA into n1 gives V(n1) = V(n2) = 1 V; 1 mA into n2 gives V(n1) = 0.5 V.
    const base = 'recip\nR1 n1 0 1k\nR2 n2 0 1k\nR3 n1 n2 1k\nG1 0 n2 n1 0 1m\n';
    const r12 = runNetlist(`${base}IT 0 n1 1m\n.op\n`);
    const r21 = runNetlist(`${base}IT 0 n2 1m\n.op\n`);
    if (!r12.ok || !r21.ok) throw new Error('rejected');
    const t12 = r12.report.operatingPoints[0]!.nodes['n2']!;
    const t21 = r21.report.operatingPoints[0]!.nodes['n1']!;
    // Observed 0 for both; bounds 2·eps·|value|.
    expect(Math.abs(t12 - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(t21 - 0.5)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.5);
  });
});
