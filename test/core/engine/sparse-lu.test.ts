/**
 * The sparse LU path (engine/sparse-lu.ts) against the dense one
 * (engine/lu.ts, itself checked against ml-matrix and 64-digit mathjs in
 * lu.test.ts and linear-networks.test.ts): the same solutions to rounding on
 * random matrices and random circuits, the minimum degree ordering a
 * permutation that removes the fill of the arrow matrix, singular matrices
 * named at the same unknown, MNA matrices with zero diagonals factored, and
 * the reuse of a pivot sequence redone when a pivot no longer passes.
 */
import fc from 'fast-check';
import { afterEach, describe, expect, test } from 'vitest';
import { parseNetlist, prepare } from '@railcheck/core';
import {
  ABSURD_CURRENT,
  createSparseLu, eliminationFill, loadAll, denseOf, factorMatrix, solveMatrix, DEFAULT_NEWTON, minimumDegreeOrder, sparseLuFactor, sparseLuSolve, solveOperatingPoint, SOLVER_PATH, REUSE_PIVOT_THRESHOLD,
  type CompiledCircuit, type SparseLu,
} from '@railcheck/core/internal';
import { dominantSystem, engineSolve, relDiff } from '../../helpers/dense.js';
import { networkArb, nodeName, toNetlist, type Network } from '../../helpers/linear-networks.js';
import { fcSeed } from '../../helpers/device-harness.js';
import { ml } from '../../helpers/ml-matrix.js';

const seed = fcSeed('core/engine/sparse-lu');
/** One Newton step on both paths: worst observed 0.50·eps·κ (FC_SEED 20261201, 1–5); bound 1.5·eps·κ. */
const STEP_BOUND = 1.5;
/** Operating points: worst observed 646 Newton tolerances apart (FC_SEED 1); bound 2000. */
const OP_BOUND = 2000;
/** Circuits solved on one path only: at most 4 of 150 observed (FC_SEED 1); bound 12. */
const OP_MISMATCH_BOUND = 12;
const saved = SOLVER_PATH.force;
afterEach(() => {
  SOLVER_PATH.force = saved;
});

/** A sparse factorisation of dense rows `a` on the pattern of the entries where `keep` holds (and every nonzero). */
function sparseOf(a: readonly (readonly number[])[], keep: (i: number, j: number) => boolean = () => false): { lu: SparseLu; values: Float64Array } {
  const n = a.length;
  const rows: number[] = [0];
  const cols: number[] = [0];
  const vals: number[] = [123]; // the dump entry (row 0): never read
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (a[i]![j] !== 0 || keep(i, j)) {
        rows.push(i + 1);
        cols.push(j + 1);
        vals.push(a[i]![j]!);
      }
    }
  }
  return { lu: createSparseLu(n, Int32Array.from(rows), Int32Array.from(cols)), values: Float64Array.from(vals) };
}

function sparseSolve(lu: SparseLu, values: Float64Array, b: readonly number[]): { singular: number; x: number[] } {
  const singular = sparseLuFactor(lu, values);
  if (singular !== 0) return { singular, x: [] };
  const x = new Float64Array(b.length + 1);
  sparseLuSolve(lu, Float64Array.from([0, ...b]), x);
  return { singular, x: Array.from(x.subarray(1)) };
}

describe('sparse against dense on random matrices', () => {
  // Both solvers pick the largest candidate of each column, but in other column orders, so the
  // rounding differs. Worst relative difference observed 6.9e-16 (FC_SEED 20261201 and 1–5,
  // dominant systems n ≤ 12, condition ≲ 10); bound 2e-15 (about three times it).
  const AGREE = 2e-15;
  // Reused pivots may be down to REUSE_PIVOT_THRESHOLD of their column's largest candidate, so the
  // growth, and the rounding, can be larger than with pivots chosen afresh: worst observed 1.44e-14
  // (FC_SEED 20261201, 1–5); bound 4e-14.
  const REUSED = 4e-14;
  test('dominant systems, with random structural zeros kept in the pattern', () => {
    let worst = 0;
    fc.assert(
      fc.property(dominantSystem(1, 12), fc.array(fc.boolean(), { minLength: 144, maxLength: 144 }), ({ a, b }, keep) => {
        const dense = engineSolve(a, b);
        const { lu, values } = sparseOf(a, (i, j) => keep[i * 12 + j]!);
        const sparse = sparseSolve(lu, values, b);
        expect(sparse.singular).toBe(0);
        const d = relDiff(sparse.x, dense.x);
        worst = Math.max(worst, d);
        expect(d).toBeLessThan(AGREE);
      }),
      { seed, numRuns: 300 },
    );
    console.log(`sparse vs dense, random dominant systems: worst relative difference ${worst.toExponential(2)}`);
  });

  test('a refactorisation of the same pattern gives a fresh factorisation\'s answer, and reuses the pivots', () => {
    let worst = 0;
    fc.assert(
      fc.property(dominantSystem(2, 10), dominantSystem(2, 10), ({ a, b }, other) => {
        fc.pre(other.a.length === a.length);
        const keepAll = (): boolean => true;
        const first = sparseOf(a, keepAll);
        const second = sparseOf(other.a, keepAll);
        expect(sparseLuFactor(first.lu, first.values)).toBe(0);
        // The same full pattern: factor the other matrix's values on the first one's pivot sequence.
        const reused = sparseSolve(first.lu, second.values, b);
        const fresh = sparseSolve(second.lu, second.values, b);
        expect(reused.singular).toBe(0);
        const d = relDiff(reused.x, fresh.x);
        worst = Math.max(worst, d);
        expect(d).toBeLessThan(REUSED);
        expect(first.lu.pivotings + first.lu.refactorisations).toBe(2);
      }),
      { seed, numRuns: 200 },
    );
    console.log(`reused against fresh pivots: worst relative difference ${worst.toExponential(2)}`);
  });

  test('a reused pivot that falls below the reuse threshold makes the factorisation pivot again', () => {
    // [[1, 1], [1, 0]]: column 1's pivot is the diagonal (a tie). Then its value falls to 1e-3 of
    // the other candidate: below REUSE_PIVOT_THRESHOLD, so rows are chosen afresh.
    const { lu, values } = sparseOf([[1, 1], [1, 0]], () => true);
    expect(sparseLuFactor(lu, values)).toBe(0);
    expect(lu.pivotings).toBe(1);
    const small = 1e-3;
    expect(small).toBeLessThan(REUSE_PIVOT_THRESHOLD);
    values[1] = small; // entry (1, 1)
    const { x } = sparseSolve(lu, values, [1, 2]);
    expect(lu.pivotings).toBe(2);
    // By hand: x2 = (1 − small·2)/1 from row 1 with x1 = 2 from row 2.
    expect(x[0]).toBe(2);
    expect(Math.abs(x[1]! - (1 - 2 * small))).toBeLessThanOrEqual(2 * Number.EPSILON);
  });
});

describe('minimum degree ordering', () => {
  const patternArb = fc.integer({ min: 1, max: 30 }).chain((n) => fc.tuple(fc.constant(n), fc.array(fc.tuple(fc.integer({ min: 0, max: n }), fc.integer({ min: 0, max: n })), { maxLength: 4 * n })));
  test('is a permutation of the unknowns, whatever the pattern (ground entries included)', () => {
    fc.assert(
      fc.property(patternArb, ([n, entries]) => {
        const order = minimumDegreeOrder(n, entries.map((e) => e[0]), entries.map((e) => e[1]));
        expect([...order].sort((p, q) => p - q)).toEqual(Array.from({ length: n }, (_, k) => k + 1));
      }),
      { seed, numRuns: 200 },
    );
  });

  test('never fills more than the natural order on random patterns it could keep (a tree)', () => {
    // Every tree (a resistor tree of a circuit) has a perfect elimination order, leaves first
    // (Rose, "A graph-theoretic study of the numerical solution of sparse positive definite
    // systems", 1972): minimum degree always takes a leaf, so it adds no fill.
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 40 }).chain((n) => fc.array(fc.nat(), { minLength: n - 1, maxLength: n - 1 })), (parents) => {
        const n = parents.length + 1;
        const rows = parents.map((p, k) => (p % (k + 1)) + 1);
        const cols = parents.map((_, k) => k + 2);
        const order = minimumDegreeOrder(n, rows, cols);
        expect(eliminationFill(n, rows, cols, order)).toBe(n - 1);
      }),
      { seed, numRuns: 100 },
    );
  });

  test('the arrow matrix: hub first fills the whole factor, minimum degree none', () => {
    // The textbook example of ordering (George and Liu, Computer Solution of Large Sparse
    // Positive Definite Systems, 1981, ch. 1; from memory): unknown 1 coupled to every other.
    // Eliminated first it joins all the others, n(n−1)/2 entries below the diagonal; eliminated
    // last there is no fill, n − 1 entries.
    const n = 12;
    const rows = Array.from({ length: n - 1 }, () => 1);
    const cols = Array.from({ length: n - 1 }, (_, k) => k + 2);
    const natural = Int32Array.from({ length: n }, (_, k) => k + 1);
    expect(eliminationFill(n, rows, cols, natural)).toBe((n * (n - 1)) / 2);
    const order = minimumDegreeOrder(n, rows, cols);
    expect(eliminationFill(n, rows, cols, order)).toBe(n - 1);
    // The hub goes last but one at most (with one leaf left both have degree 1; the lower index wins).
    expect([...order].indexOf(1)).toBeGreaterThanOrEqual(n - 2);
    // And the numeric factorisation stores only the arrow (2(n − 1) entries in L and U).
    const a = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? n : i === 0 || j === 0 ? 1 : 0)));
    const { lu, values } = sparseOf(a);
    expect(sparseLuFactor(lu, values)).toBe(0);
    expect(lu.factorEntries).toBe(2 * (n - 1));
  });
});

describe('singular and zero-diagonal matrices', () => {
  test('an all-zero column is named at the same unknown as the dense solver names it', () => {
    fc.assert(
      fc.property(dominantSystem(2, 10).chain((s) => fc.tuple(fc.constant(s), fc.integer({ min: 1, max: s.a.length }))), ([{ a }, col]) => {
        const m = a.map((r) => r.map((v, j) => (j === col - 1 ? 0 : v)));
        const ones = Array(m.length).fill(1) as number[];
        expect(engineSolve(m, ones).singular).toBe(col);
        const { lu, values } = sparseOf(m, (_, j) => j === col - 1);
        expect(sparseSolve(lu, values, ones).singular).toBe(col);
        // The same with the column absent from the pattern altogether (an unknown nothing stamps).
        const bare = sparseOf(m);
        expect(sparseSolve(bare.lu, bare.values, ones).singular).toBe(col);
      }),
      { seed, numRuns: 200 },
    );
  });

  test('MNA of a voltage source feeding a divider (zero diagonal on the branch row) factors', () => {
    // Unknowns n1, n2, I(V): V = 5 V from n1 to ground, R1 = 1 kΩ n1–n2, R2 = 4 kΩ n2–ground.
    // By hand: V(n1) = 5, V(n2) = 5·4/5 = 4, the source current −1 mA (into its + terminal).
    const g1 = 1e-3;
    const g2 = 1 / 4000;
    const a = [
      [g1, -g1, 1],
      [-g1, g1 + g2, 0],
      [1, 0, 0],
    ];
    const { lu, values } = sparseOf(a);
    const { singular, x } = sparseSolve(lu, values, [0, 0, 5]);
    expect(singular).toBe(0);
    // Rounding of a 3×3 solve: a few eps of each value.
    expect(Math.abs(x[0]! - 5)).toBeLessThan(8 * Number.EPSILON * 5);
    expect(Math.abs(x[1]! - 4)).toBeLessThan(8 * Number.EPSILON * 4);
    expect(Math.abs(x[2]! + 1e-3)).toBeLessThan(8 * Number.EPSILON * 1e-3);
  });

  test('a legitimately tiny pivot beside a voltage source passes through the round-off bound, as on the dense path', () => {
    // [[g, 1], [1, 0]] with g = 1e15 S: the second pivot is exactly −1/g, far below 1e-13 of its
    // column's ±1 but made of that one product, so it is no cancellation residue (lu.ts).
    const g = 1e15;
    const a = [
      [g, 1],
      [1, 0],
    ];
    const dense = engineSolve(a, [1, 2]);
    const { lu, values } = sparseOf(a);
    const sparse = sparseSolve(lu, values, [1, 2]);
    expect(dense.singular).toBe(0);
    expect(sparse.singular).toBe(0);
    // By hand: x1 = 2, x2 = 1 − 2g.
    // The solution rounds as the dense one does (x1 observed 2 − 2.2e-16 on both paths).
    expect(Math.abs(sparse.x[0]! - 2)).toBeLessThanOrEqual(2 * Number.EPSILON * 2);
    expect(Math.abs(sparse.x[1]! - (1 - 2 * g))).toBeLessThanOrEqual(2 * Number.EPSILON * 2 * g);
    expect(relDiff(sparse.x, dense.x)).toBeLessThanOrEqual(2 * Number.EPSILON);
  });
});

/** Compiles `text` on the given path. */
function compileOn(text: string, path: 'dense' | 'sparse'): CompiledCircuit {
  SOLVER_PATH.force = path;
  const p = prepare(parseNetlist(text));
  if (!p.ok) throw new Error(p.errors[0]?.message);
  expect(p.compiled.ws.solver.kind).toBe(path);
  return p.compiled;
}

describe('sparse against dense on random circuits', () => {
  // Random resistor networks with V and I sources and diodes added between random nodes (no
  // controlled sources: their random gains make nearly singular matrices, which
  // linear-networks.test.ts screens by condition number).
  const arb = networkArb({ minNodes: 2, maxNodes: 12, vSources: [1, 3], iSources: [0, 2], controlled: false }).chain((net) =>
    fc.tuple(fc.constant(net), fc.array(fc.tuple(fc.nat(), fc.nat(), fc.boolean()), { maxLength: 4 })),
  );
  const textOf = ([net, diodes]: [Network, [number, number, boolean][]]): string => {
    const span = net.nodes + 1;
    const lines = toNetlist(net, 'random network with diodes').split('\n').filter((l) => l !== '' && l !== '.op');
    diodes.forEach(([a, k, zener], i) => {
      if (a % span !== k % span) lines.push(`DX${i} ${nodeName(a % span)} ${nodeName(k % span)} ${zener ? 'dz' : 'dd'}`);
    });
    lines.push('.model dd D (IS=1e-14 N=1.5)', '.model dz D (IS=1e-12 N=1 BV=6.2 IBV=1m)', '.op', '');
    return lines.join('\n');
  };

  test('one Newton step from the same iterate gives the same next iterate to rounding', () => {
    // Both circuits loaded at the dense path's operating point, factored and solved once. Worst
    // difference observed 0.50·eps·κ of the largest unknown over FC_SEED 20261201 and 1–5 (diode
    // conductances span 1e-12 S to siemens, so κ, which the bound scales by, is large); bound
    // STEP_BOUND = 1.5·eps·κ. Matrices with κ ≥ 1e14 (near singular to working precision) are skipped.
    let worst = 0;
    let compared = 0;
    fc.assert(
      fc.property(arb, (c) => {
        const text = textOf(c);
        const dense = compileOn(text, 'dense');
        const sparse = compileOn(text, 'sparse');
        // Both solved first, so that every junction's memory (the limiting of its step) is at the solution.
        if (!solveOperatingPoint(dense).ok || !solveOperatingPoint(sparse).ok) return;
        compared++;
        sparse.ws.x.set(dense.ws.x);
        const next = [dense, sparse].map((circuit) => {
          loadAll(circuit);
          expect(factorMatrix(circuit.ws)).toBe(0);
          const out = new Float64Array(circuit.ws.size);
          solveMatrix(circuit.ws, circuit.ws.rhs, out);
          return out;
        });
        // The 2-norm condition number of the loaded matrix (ml-matrix's SVD), unknowns 1..n.
        const full = denseOf(sparse.ws, sparse.ws.matrix);
        const n = sparse.ws.unknowns;
        const rows = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => full[(i + 1) * (n + 1) + j + 1]!));
        const kappa = new ml.SingularValueDecomposition(new ml.Matrix(rows)).condition;
        fc.pre(Number.isFinite(kappa) && kappa < 1e14);
        // Normwise, as the bound of a backward-stable solve is (‖Δx‖ ≲ c·eps·κ·‖x‖, Golub and Van Loan §3.5).
        const scale = Math.max(1e-12, ...Array.from(next[0]!.subarray(1), Math.abs));
        for (let i = 1; i <= n; i++) {
          const d = Math.abs(next[1]![i]! - next[0]![i]!) / scale / (Number.EPSILON * kappa);
          worst = Math.max(worst, d);
          expect(d, dense.unknowns[i]!.name).toBeLessThan(STEP_BOUND);
        }
      }),
      { seed, numRuns: 150 },
    );
    console.log(`sparse vs dense, one Newton step on ${compared} random circuits: worst difference ${worst.toExponential(2)}·eps·κ of the largest unknown`);
    expect(compared).toBeGreaterThan(100);
  });

  test('operating points agree within the Newton tolerances', () => {
    // Newton stops within reltol·|x| + vntol (abstol for currents) of its last update, and the two
    // paths' iterates differ by rounding, so they stop at different iterates; on nodes held only
    // by reverse junctions (1e-12 S of gmin) the last update says little about the distance to
    // the solution, and the two points differ by up to hundreds of tolerances there. Worst
    // observed 646 tolerances; bound OP_BOUND. A circuit that converges on one path and not on
    // the other (a marginal case of gmin or source stepping) is counted: up to 4 in 150 observed.
    let worst = 0;
    let both = 0;
    let mismatch = 0;
    fc.assert(
      fc.property(arb, (c) => {
        const text = textOf(c);
        const dense = compileOn(text, 'dense');
        const sparse = compileOn(text, 'sparse');
        const od = solveOperatingPoint(dense);
        const os = solveOperatingPoint(sparse);
        if (od.ok !== os.ok) mismatch++;
        if (!od.ok || !os.ok) return;
        // A Zener with no series resistance across a source above its BV converges to an absurd current
        // (1.7e34 A through DX0 on FC seed 1020078843), which the run's sanity note reports; beside it the
        // other branch currents are rounding of that sum on either path, so such a point is not compared.
        // ABSURD_CURRENT is the project's own threshold for that note (common practice, no source).
        const absurd = (x: Float64Array): boolean => dense.unknowns.some((u, i) => u.kind === 'branch' && Math.abs(x[i]!) > ABSURD_CURRENT);
        if (absurd(dense.ws.x) || absurd(sparse.ws.x)) return;
        both++;
        for (let i = 1; i < dense.unknowns.length; i++) {
          const a = dense.ws.x[i]!;
          const b = sparse.ws.x[i]!;
          const tol = DEFAULT_NEWTON.reltol * Math.max(Math.abs(a), Math.abs(b)) + (dense.unknowns[i]!.kind === 'branch' ? DEFAULT_NEWTON.abstol : DEFAULT_NEWTON.vntol);
          const r = Math.abs(a - b) / tol;
          worst = Math.max(worst, r);
          expect(r, dense.unknowns[i]!.name).toBeLessThan(OP_BOUND);
        }
      }),
      { seed, numRuns: 150 },
    );
    console.log(`sparse vs dense operating points (${both} both solved, ${mismatch} solved on one path only): worst difference ${worst.toExponential(2)} tolerances`);
    expect(mismatch).toBeLessThanOrEqual(OP_MISMATCH_BOUND);
  });

  test('a circuit singular through a controlled source is named at the same unknown on both paths', () => {
    // F1 returns exactly the current of V1 into the same node: V1's current is undetermined.
    const text = 'singular\nRT1 n1 0 1\nRT2 n2 0 1\nV1 n2 0 1\nF1 n2 0 V1 -1\n.op\n';
    const named = (['dense', 'sparse'] as const).map((path) => {
      const o = solveOperatingPoint(compileOn(text, path));
      return o.ok ? 'solved' : `${o.reason} at ${o.singularAt}`;
    });
    expect(named[0]).toBe('singular at V1');
    expect(named[1]).toBe(named[0]);
  });
});
