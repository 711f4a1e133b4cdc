/**
 * The engine's dense LU (engine/lu.ts) against two general-purpose
 * references from npm: ml-matrix (`solve`, `LuDecomposition`) and mathjs
 * (`lusolve`). Also the storage layout (stride n + 1, ground row and column
 * unused), singular matrices and the relative pivot tolerance.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { lusolve } from 'mathjs';
import { runNetlist } from '@railcheck/core';
import { createLuWorkspace, luFactor, luFactorBounded, luSolve, PIVOT_RELATIVE_TOLERANCE, type LuWorkspace } from '@railcheck/core/internal';
import { thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';
import { ml } from '../../helpers/ml-matrix.js';
import { fcSeed } from '../../helpers/device-harness.js';
import { dominantSystem, engineSolve, generalSystem, entry, matVec, normInf, relDiff, toLu, toRhs } from '../../helpers/dense.js';

const seed = fcSeed('core/engine/lu');
const EPS = Number.EPSILON;

const mathjsSolve = (a: number[][], b: number[]): number[] => (lusolve(a, b) as number[][]).map((r) => r[0]!);
const mlSolve = (a: number[][], b: number[]): number[] => ml.solve(new ml.Matrix(a), ml.Matrix.columnVector(b)).to1DArray();

describe('factor and solve against ml-matrix and mathjs', () => {
  test('well-conditioned systems that need row swaps', () => {
    let worst = 0;
    fc.assert(
      fc.property(dominantSystem(), ({ a, b }) => {
        const { singular, x } = engineSolve(a, b);
        expect(singular).toBe(0);
        // Both references are backward-stable LU solvers (Golub & Van Loan §3.3); on a
        // matrix of condition below ~10 they agree with any other to a few ulps times n: worst
        // observed 5.8e-16 over FC_SEED 20261201, 1–13 and 424242; bound 1.5e-15.
        const d = Math.max(relDiff(x, mlSolve(a, b)), relDiff(x, mathjsSolve(a, b)));
        worst = Math.max(worst, d);
        expect(d).toBeLessThan(1.5e-15);
      }),
      { seed, numRuns: 300 },
    );
    console.log(`LU vs ml-matrix/mathjs, dominant systems: max relative difference ${worst.toExponential(2)}`);
  });

  test('general random systems: agreement within the condition-number bound, tiny residual', () => {
    fc.assert(
      fc.property(generalSystem(), ({ a, b }) => {
        let inverse: number[][];
        try {
          inverse = ml.inverse(new ml.Matrix(a)).to2DArray();
        } catch {
          fc.pre(false);
          return;
        }
        const kappa = normInf(a) * normInf(inverse);
        fc.pre(Number.isFinite(kappa) && kappa < 1e8);
        const { singular, x } = engineSolve(a, b);
        expect(singular).toBe(0);
        const n = a.length;
        // Forward error of a backward-stable solve ≲ n·κ·eps (Golub & Van Loan, §3.5, from memory):
        // worst observed 0.086·n·κ·eps over FC_SEED 20261201, 1–13 and 424242; bound 0.2·n·κ·eps.
        expect(relDiff(x, mlSolve(a, b))).toBeLessThan(0.2 * n * kappa * EPS);
        expect(relDiff(x, mathjsSolve(a, b))).toBeLessThan(0.2 * n * kappa * EPS);
        // Normwise backward error ‖Ax − b‖/(‖A‖‖x‖ + ‖b‖) (Rigal & Gaches 1967) is O(n·eps) whatever κ is:
        // worst observed 0.42·n·eps; bound n·eps.
        const r = matVec(a, x).map((v, i) => v - b[i]!);
        const size = normInf(a) * Math.max(...x.map(Math.abs)) + Math.max(...b.map(Math.abs));
        const back = size === 0 ? 0 : Math.max(...r.map(Math.abs)) / size;
        expect(back).toBeLessThan(n * EPS);
      }),
      { seed, numRuns: 300 },
    );
  });

  test('P·A = L·U, permutation and determinant as ml-matrix LuDecomposition', () => {
    fc.assert(
      fc.property(dominantSystem(2, 10), ({ a }) => {
        const n = a.length;
        const ws = toLu(a);
        expect(luFactor(ws)).toBe(0);
        const s = ws.size;
        const lu = (i: number, j: number): number => ws.matrix[i * s + j]!;
        for (let i = 1; i <= n; i++) {
          for (let j = 1; j <= n; j++) {
            let sum = 0;
            for (let k = 1; k <= Math.min(i, j); k++) sum += (k === i ? 1 : lu(i, k)) * lu(k, j);
            // Worst observed 0.33·eps·(n + 1)·n; bound eps·(n + 1)·n (entries are at most n + 2).
            expect(Math.abs(sum - a[ws.perm[i]! - 1]![j - 1]!)).toBeLessThan(EPS * (n + 1) * n);
          }
        }
        const ref = new ml.LuDecomposition(new ml.Matrix(a));
        // Both pick the largest magnitude in the column (first one on ties), so the rows agree.
        expect(Array.from(ws.perm.subarray(1)).map((p) => p - 1)).toEqual(ref.pivotPermutationVector);
        let det = 1;
        for (let k = 1; k <= n; k++) det *= lu(k, k);
        const seen = new Set<number>();
        let parity = 1;
        for (let k = 1; k <= n; k++) {
          if (seen.has(k)) continue;
          let len = 0;
          for (let j = k; !seen.has(j); j = ws.perm[j]!) {
            seen.add(j);
            len++;
          }
          if (len % 2 === 0) parity = -parity;
        }
        // Worst observed 1.5e-15 relative over FC_SEED 20261201, 1–13 and 424242; bound 4e-15.
        expect(Math.abs(parity * det - ref.determinant)).toBeLessThan(4e-15 * Math.abs(ref.determinant));
      }),
      { seed, numRuns: 200 },
    );
  });

  test('one factorisation serves many right-hand sides', () => {
    fc.assert(
      fc.property(dominantSystem(1, 8), fc.array(entry, { minLength: 8, maxLength: 8 }), ({ a }, extra) => {
        const ws = toLu(a);
        expect(luFactor(ws)).toBe(0);
        const n = a.length;
        for (let shift = 0; shift < 3; shift++) {
          const b = Array.from({ length: n }, (_, i) => extra[(i + shift) % 8]!);
          const x = new Float64Array(ws.size);
          luSolve(ws, toRhs(b), x);
          // Worst observed 6.8e-16 over FC_SEED 20261201, 1–13 and 424242; bound 1.7e-15.
          expect(relDiff(Array.from(x.subarray(1)), mlSolve(a, b))).toBeLessThan(1.7e-15);
        }
      }),
      { seed, numRuns: 100 },
    );
  });
});

describe('storage layout', () => {
  test('row and column 0 (ground) are never read: NaN there changes nothing', () => {
    fc.assert(
      fc.property(dominantSystem(1, 8), ({ a, b }) => {
        const clean = engineSolve(a, b);
        const ws = toLu(a, Number.NaN);
        expect(ws.size).toBe(a.length + 1);
        expect(luFactor(ws)).toBe(0);
        const x = new Float64Array(ws.size).fill(Number.NaN);
        luSolve(ws, toRhs(b, Number.NaN), x);
        expect(x[0]).toBe(0);
        expect(Array.from(x.subarray(1))).toEqual(clean.x);
      }),
      { seed, numRuns: 100 },
    );
  });

  test('createLuWorkspace sizes storage as (n + 1)², and adopts a given matrix', () => {
    const ws = createLuWorkspace(4);
    expect(ws.size).toBe(5);
    expect(ws.matrix.length).toBe(25);
    const m = new Float64Array(9);
    expect(createLuWorkspace(2, m).matrix).toBe(m);
  });
});

describe('singular matrices', () => {
  // Small integers: a combination of rows or columns is then exact in floating point, so the
  // matrix is singular exactly and not merely to within rounding that ill-conditioned minors
  // could magnify above the tolerance.
  const int = fc.integer({ min: -9, max: 9 });
  const rows = (r: number, n: number) => fc.array(fc.array(int, { minLength: n, maxLength: n }), { minLength: r, maxLength: r });
  const weights = (n: number) => fc.array(fc.integer({ min: -3, max: 3 }).filter((k) => k !== 0), { minLength: n, maxLength: n });
  // Leading columns independent *and* well conditioned: a nearly dependent leading block leaves
  // small pivots whose multipliers magnify elimination round-off in the last column beyond
  // 1e-13 of its original size (seen at 8e-13 against a column of 7), which the tolerance,
  // being relative to the column before elimination, then takes for a genuine pivot.
  const wellPosedColumns = (m: number[][], cols: number): boolean => {
    const svd = new ml.SingularValueDecomposition(new ml.Matrix(m.map((r) => r.slice(0, cols))));
    return svd.rank === cols && svd.condition < 30;
  };

  test('a row that is a combination of the others: no pivot in the last column', () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 9 }).chain((n) => fc.tuple(rows(n - 1, n), weights(n - 1))), ([top, c]) => {
        const n = top.length + 1;
        const m = [...top, Array.from({ length: n }, (_, j) => top.reduce((s, r, i) => s + c[i]! * r[j]!, 0))];
        // When columns 1..n−1 are independent, elimination runs dry exactly at column n.
        fc.pre(wellPosedColumns(m, n - 1));
        expect(engineSolve(m, Array(n).fill(1)).singular).toBe(n);
      }),
      { seed, numRuns: 200 },
    );
  });

  test('a column that is a combination of earlier ones is the one named', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 9 }).chain((n) => fc.tuple(rows(n, n), weights(n), fc.integer({ min: 2, max: n }))),
        ([a, c, col]) => {
          const m = a.map((r) => {
            const out = [...r];
            out[col - 1] = r.slice(0, col - 1).reduce((s, v, i) => s + c[i]! * v, 0);
            return out;
          });
          fc.pre(wellPosedColumns(m, col - 1));
          expect(engineSolve(m, Array(a.length).fill(1)).singular).toBe(col);
        },
      ),
      { seed, numRuns: 200 },
    );
  });

  test('an all-zero column (an unknown nothing stamps) is named', () => {
    const a = [
      [2, 0, 1],
      [1, 0, 3],
      [4, 0, 1],
    ];
    expect(engineSolve(a, [1, 1, 1]).singular).toBe(2);
  });
});

/**
 * An integer matrix whose last row is a combination of the others (exactly
 * singular), the same with its last entry lifted by δ (regular, det = δ·minor),
 * and power-of-two exponents (|e| ≤ maxExp) for scaling rows or columns
 * exactly. The leading block is kept well conditioned.
 */
const dependentPair = (maxExp: number) =>
  fc
    .integer({ min: 2, max: 8 })
    .chain((n) =>
      fc.tuple(
        fc.array(fc.array(fc.integer({ min: -9, max: 9 }), { minLength: n, maxLength: n }), { minLength: n - 1, maxLength: n - 1 }),
        fc.array(fc.integer({ min: -3, max: 3 }).filter((k) => k !== 0), { minLength: n - 1, maxLength: n - 1 }),
        fc.array(fc.integer({ min: -maxExp, max: maxExp }), { minLength: n, maxLength: n }),
        fc.double({ min: 0.01, max: 1, noNaN: true }),
      ),
    )
    .map(([top, c, exps, delta]) => {
      const n = top.length + 1;
      const last = Array.from({ length: n }, (_, j) => top.reduce((s, r, i) => s + c[i]! * r[j]!, 0));
      const dependent = [...top, last];
      const lifted = [...top, last.map((v, j) => (j === n - 1 ? v + delta : v))];
      return { n, dependent, lifted, exps };
    })
    .filter(({ n, dependent }) => {
      const lead = new ml.SingularValueDecomposition(new ml.Matrix(dependent.map((r) => r.slice(0, n - 1))));
      return lead.rank === n - 1 && lead.condition < 30;
    });

describe('relative pivot tolerance', () => {
  const scales = [1e-9, 1, 1e9];
  // [[1, 1], [1, 1 + δ]] leaves the pivot δ in column 2, whose largest entry is ≈ 1.
  const nearSingular = (delta: number, s: number): number[][] => [
    [s, s],
    [s, s * (1 + delta)],
  ];

  test('threshold: pivots well below 1e-13 of their column are singular, well above are not, at every scale', () => {
    expect(PIVOT_RELATIVE_TOLERANCE).toBe(1e-13);
    for (const s of scales) {
      expect(engineSolve(nearSingular(1e-15, s), [1, 1]).singular, `scale ${s}`).toBe(2);
      expect(engineSolve(nearSingular(1e-11, s), [1, 1]).singular, `scale ${s}`).toBe(0);
    }
  });

  test('scaling the whole matrix by 1e-9 or 1e9 scales the solution by the inverse and keeps the verdict', () => {
    fc.assert(
      fc.property(dominantSystem(1, 10), fc.constantFrom(1e-9, 1e9), ({ a, b }, s) => {
        const base = engineSolve(a, b);
        const scaled = engineSolve(a.map((r) => r.map((v) => v * s)), b);
        expect(scaled.singular).toBe(0);
        // Worst observed 8.1e-16 over FC_SEED 20261201, 1–13 and 424242 (1e±9 is not a power of two); bound 2e-15.
        expect(relDiff(scaled.x.map((v) => v * s), base.x)).toBeLessThan(2e-15);
      }),
      { seed, numRuns: 200 },
    );
  });

  test('a rank-deficient matrix stays singular under column scalings from ~1e-9 to ~1e9 (megohms and milliohms alike)', () => {
    fc.assert(
      fc.property(
        dependentPair(30),
        ({ n, dependent, lifted, exps }) => {
          // Powers of two (2^±30 ≈ 1e±9) scale exactly, so an exactly singular matrix stays so.
          const colScaled = (m: number[][]): number[][] => m.map((r) => r.map((v, j) => v * 2 ** exps[j]!));
          expect(engineSolve(colScaled(dependent), Array(n).fill(1)).singular).toBe(n);
          // det(lifted) = δ·(a non-zero integer minor), so the last pivot is ≥ δ/∏(other pivots),
          // many decades above 1e-13 of its column.
          expect(engineSolve(colScaled(lifted), Array(n).fill(1)).singular).toBe(0);
        },
      ),
      { seed, numRuns: 200 },
    );
  });

  test('row scaling from ~1e-12 to ~1e12 keeps the verdict too (KCL rows in amps, branch rows in volts)', () => {
    let worstRatio = 0;
    fc.assert(
      fc.property(
        dependentPair(40),
        ({ n, dependent, lifted, exps }) => {
          const rowScaled = (m: number[][]): number[][] => m.map((r, i) => r.map((v) => v * 2 ** exps[i]!));
          expect(engineSolve(rowScaled(dependent), Array(n).fill(1)).singular).not.toBe(0);
          const { singular, x } = engineSolve(rowScaled(lifted), rowScaled(lifted).map((r) => r.reduce((s, v) => s + v, 0)));
          expect(singular).toBe(0);
          // The right-hand side is the row sums, so the solution is all ones. The lifted matrix is nearly
          // singular, so the forward error scales with its condition number: for Gaussian elimination with
          // partial pivoting, |δx|/|x| ≲ κ(A)·c·n·u (Higham, Accuracy and Stability of Numerical
          // Algorithms, 2nd ed., §9.4 — from memory). κ₂ from ml-matrix's SVD; a fixed bound (3.7e-10)
          // failed for FC_SEED 925646673 (2.6e-9). Largest ratio err/(κ·n·eps) observed 0.055 (FC_SEED
          // 925646673, 20261201, 1, 2, 3, 424242); bound 0.15.
          const kappa = new ml.SingularValueDecomposition(new ml.Matrix(rowScaled(lifted))).condition;
          const err = relDiff(x, Array(n).fill(1));
          worstRatio = Math.max(worstRatio, err / (kappa * n * Number.EPSILON));
          expect(err).toBeLessThan(0.15 * kappa * n * Number.EPSILON);
        },
      ),
      { seed, numRuns: 200 },
    );
    console.log(`row scaling: worst forward error / (κ·n·eps) = ${worstRatio.toExponential(2)}`);
  });

  test('a huge conductance against a voltage-source branch is not a singular matrix', () => {
    // [[g, 1], [1, 0]]: a node tied to ground by g siemens and held by a source (det = −1).
    // Elimination leaves the pivot −1/g in the branch column, whose entries are all ±1 or 0.
    for (const g of [1e3, 1e12, 1e15, 1e21]) {
      const { singular, x } = engineSolve([[g, 1], [1, 0]], [3 * g, 2]);
      expect(singular, `g = ${g}`).toBe(0);
      // By hand: V = 2 from the branch row, then I = 3g − 2g = g (observed 4.4e-16 and 3.9e-16
      // relative; bounds 1e-15).
      expect(Math.abs(x[0]! - 2)).toBeLessThan(1e-15);
      expect(Math.abs(x[1]! - g) / g).toBeLessThan(1e-15);
    }
  });
});

describe('circuits whose matrix the pivot test once took for singular', () => {
  // The branch row of a source holds ±1 while the node row beside it holds g: elimination leaves −1/g.
  test('a nano-ohm resistor (the smallest the ranges allow) straight across a 1 V source draws 1e9 A (Ohm)', () => {
    const r = runNetlist('stiff\nV1 in 0 1\nR1 in 0 1e-9\n.op\n');
    if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
    // Observed at most 1.3e-16 relative (at 1e-15 Ω, before the plausibility bounds); bound 3e-16.
    expect(Math.abs(r.report.operatingPoints[0]!.currents['R1']! - 1e9) / 1e9).toBeLessThan(3e-16);
  });

  test('a diode straight across a 2 V source carries IS·(exp(2 V/Vt) − 1) (Shockley, models.md)', () => {
    const r = runNetlist('stiff diode\nV1 in 0 2\nD1 in 0 dm\n.model dm D (IS=1e-14)\n.op\n');
    if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
    const op = r.report.operatingPoints[0]!;
    // 2/Vt = 77.3: still the plain exponential (the device continues it linearly only beyond 80).
    const want = 1e-14 * Math.expm1(2 / thermalVoltage(T_NOM));
    // Observed 0 (the same exponential); bound 2·eps.
    expect(Math.abs(op.currents['D1']! - want) / want).toBeLessThanOrEqual(2 * EPS);
    expect(op.method).toBe('newton');
  });
});

describe('the round-off bound, tracked only when a pivot needs it', () => {
  /** Both passes on copies of `a`: luFactor (plain first, bounded on demand) and luFactorBounded (always bounded). */
  const bothPasses = (a: readonly (readonly number[])[]): { plain: LuWorkspace; bounded: LuWorkspace; r1: number; r2: number } => {
    const plain = toLu(a);
    const bounded = toLu(a);
    return { plain, bounded, r1: luFactor(plain), r2: luFactorBounded(bounded) };
  };
  /** Bit-for-bit equality of two float arrays (NaN and the sign of zero included). */
  const sameBits = (x: Float64Array, y: Float64Array): boolean => {
    const p = new Uint32Array(x.buffer, x.byteOffset, x.length * 2);
    const q = new Uint32Array(y.buffer, y.byteOffset, y.length * 2);
    return p.every((v, i) => v === q[i]);
  };
  // A node tied to ground by g siemens beside a voltage source's branch (the stiff block of the pivot
  // rule's comment), placed among generic entries: elimination leaves a pivot near −1/g.
  const stiff = (g: number) =>
    dominantSystem(1, 6).map(({ a, b }) => {
      const n = a.length + 2;
      const m = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i < n - 2 && j < n - 2 ? a[i]![j]! : 0)));
      m[n - 2]![n - 2] = g;
      m[n - 2]![n - 1] = 1;
      m[n - 1]![n - 2] = 1;
      // Couple the block to the rest so that the elimination mixes them.
      m[0]![n - 2] = 0.5;
      m[n - 2]![0] = 0.5;
      return { a: m, b: [...b, 0, 1] };
    });

  test('consistency of our two passes: same verdict and the same factors bit for bit, regular, stiff and singular matrices', () => {
    let restarted = 0;
    fc.assert(
      fc.property(
        fc.oneof(
          dominantSystem(1, 12).map(({ a }) => a),
          generalSystem().map(({ a }) => a),
          stiff(1e15).map(({ a }) => a),
          stiff(1e21).map(({ a }) => a),
          dependentPair(20).map(({ dependent }) => dependent),
          dependentPair(20).map(({ lifted, exps }) => lifted.map((r, i) => r.map((v) => v * 2 ** exps[i]!))),
        ),
        (a) => {
          const { plain, bounded, r1, r2 } = bothPasses(a);
          expect(r1).toBe(r2);
          expect(sameBits(plain.matrix, bounded.matrix)).toBe(true);
          expect(Array.from(plain.perm)).toEqual(Array.from(bounded.perm));
          // The plain pass left its copy of the matrix in `roundoff` unless it went over to the bounded pass.
          if (!sameBits(plain.roundoff, bounded.roundoff)) return;
          restarted++;
        },
      ),
      { seed, numRuns: 400 },
    );
    // The stiff and singular families must have sent some matrices down the bounded pass.
    expect(restarted).toBeGreaterThan(0);
  });

  test('one workspace factoring a sequence of matrices (the bound carried over when the last one needed it) gives each the factors of a fresh bounded pass, bit for bit', () => {
    let carried = 0;
    fc.assert(
      fc.property(
        fc.array(fc.oneof(dominantSystem(1, 6).map(({ a }) => a), stiff(1e15).map(({ a }) => a)), { minLength: 2, maxLength: 6 }),
        (list) => {
          // All of one size (8 unknowns: the stiff family's); others are left out of the sequence.
          const same = list.filter((a) => a.length === list[0]!.length);
          const ws = toLu(same[0]!);
          for (const a of same) {
            const fresh = toLu(a);
            ws.matrix.set(fresh.matrix);
            if (ws.boundNeeded) carried++;
            const r1 = luFactor(ws);
            const r2 = luFactorBounded(fresh);
            expect(r1).toBe(r2);
            expect(sameBits(ws.matrix, fresh.matrix)).toBe(true);
            expect(Array.from(ws.perm)).toEqual(Array.from(fresh.perm));
          }
        },
      ),
      { seed, numRuns: 200 },
    );
    // Some factorisations must have started bounded, carried over from a stiff matrix before them.
    expect(carried).toBeGreaterThan(0);
  });

  test('a 1e15 S conductance beside a voltage source fails the plain pivot test and still factors (Ohm and KCL by hand)', () => {
    // Unknowns V1, V2, I: V1 held at 2 V by the source (branch row V1 = 2), tied to ground by g and to
    // node 2 by G = 1 mS; 1 mA injected at node 2. By hand: V2 = 2 + 1e-3/G = 3 V, and KCL at node 1,
    // g·V1 + G·(V1 − V2) + I = 0, gives I = −(2g − 1e-3).
    const g = 1e15;
    const G = 1e-3;
    const a = [
      [g + G, -G, 1],
      [-G, G, 0],
      [1, 0, 0],
    ];
    const { plain, r1 } = bothPasses(a);
    expect(r1).toBe(0);
    // The matrix does need the bound: some pivot is at most 1e-13 of its column's largest original entry.
    const s = plain.size;
    const smallest = Math.min(...[1, 2, 3].map((k) => Math.abs(plain.matrix[k * s + k]!) / Math.max(...a.map((r) => Math.abs(r[k - 1]!)))));
    expect(smallest).toBeLessThanOrEqual(PIVOT_RELATIVE_TOLERANCE);
    const x = new Float64Array(s);
    luSolve(plain, toRhs([0, 1e-3, 2]), x);
    // Observed 2.2e-16 (one ulp of 2), 0 and 1.25e-16 relative; bounds 3·eps, 2 ulps of 3 and 3e-16.
    expect(Math.abs(x[1]! - 2)).toBeLessThanOrEqual(3 * EPS);
    expect(Math.abs(x[2]! - 3)).toBeLessThanOrEqual(2 * EPS * 3);
    expect(Math.abs(x[3]! + (2 * g - 1e-3)) / (2 * g)).toBeLessThanOrEqual(3e-16);
  });

  test('a matrix singular to rounding is refused at the same column by both passes', () => {
    // Column 3 is 0.1·column 1 + 0.7·column 2, each entry rounded once: elimination leaves a residue
    // (observed −8.3e-17) in column 3, above the absolute floor, below the plain test, and below 1e-13 of
    // its bound, so the plain pass hands over to the bounded one, which refuses it.
    const c1 = [2, 1, 3];
    const c2 = [1, 4, 1];
    const a = c1.map((v, i) => [v, c2[i]!, 0.1 * v + 0.7 * c2[i]!]);
    const { r1, r2 } = bothPasses(a);
    expect(r2).toBe(3);
    expect(r1).toBe(3);
    // [[1, 1], [1, 1 + 1e-15]]: pivot 1.1e-15 in column 2, refused as before.
    expect(bothPasses([[1, 1], [1, 1 + 1e-15]]).r1).toBe(2);
    // The stiff block beside that rounded combination: the stiff pivot is accepted by the bound and the
    // refusal comes at the dependent column, 5, not at the stiff one.
    const stiffSingular = [
      [1e15, 1, 0, 0, 0],
      [1, 0, 0, 0, 0],
      ...a.map((r) => [0, 0, ...r]),
    ];
    const both = bothPasses(stiffSingular);
    expect(both.r2).toBe(5);
    expect(both.r1).toBe(5);
  });
});
