/**
 * The complex dense LU used by the small-signal analysis (engine/complex-lu.ts)
 * against mathjs `lusolve` on mathjs complex matrices, a general-purpose
 * reference from npm. Also the storage layout (stride n + 1, ground row and
 * column 0 unused), singular matrices, and re-use of one workspace.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { complex, lusolve, matrix, type Complex, type Matrix } from 'mathjs';
import { complexLuFactor, complexLuSolve, createComplexLuWorkspace, type ComplexLuWorkspace } from '@railcheck/core/internal';
import { fcSeed } from '../../helpers/device-harness.js';

const seed = fcSeed('core/ac/complex-lu');

interface C {
  re: number;
  im: number;
}
type Rows = C[][];

/** Loads `a` into a workspace; row and column 0 get `pad` (they must never be read). */
function load(a: Rows, pad = 0): ComplexLuWorkspace {
  const n = a.length;
  const ws = createComplexLuWorkspace(n);
  expect(ws.size).toBe(n + 1);
  ws.re.fill(pad);
  ws.im.fill(pad);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      ws.re[(i + 1) * ws.size + j + 1] = a[i]![j]!.re;
      ws.im[(i + 1) * ws.size + j + 1] = a[i]![j]!.im;
    }
  }
  return ws;
}

/** Factor and solve with the engine; x has n entries (index 0 dropped after checking it is 0). */
function engineSolve(a: Rows, b: C[], pad = 0): { singular: number; x: C[] } {
  const ws = load(a, pad);
  const singular = complexLuFactor(ws);
  if (singular !== 0) return { singular, x: [] };
  const bRe = Float64Array.from([pad, ...b.map((v) => v.re)]);
  const bIm = Float64Array.from([pad, ...b.map((v) => v.im)]);
  const xRe = new Float64Array(ws.size).fill(Number.NaN);
  const xIm = new Float64Array(ws.size).fill(Number.NaN);
  complexLuSolve(ws, bRe, bIm, xRe, xIm);
  expect(xRe[0]).toBe(0);
  expect(xIm[0]).toBe(0);
  return { singular, x: Array.from(xRe.subarray(1), (re, k) => ({ re, im: xIm[k + 1]! })) };
}

/** mathjs reference: lusolve on a Matrix of Complex values. */
function mathjsSolve(a: Rows, b: C[]): C[] {
  const A = matrix(a.map((row) => row.map((v) => complex(v.re, v.im))));
  const B = matrix(b.map((v) => [complex(v.re, v.im)]));
  const X = (lusolve(A, B) as Matrix).toArray() as unknown as (Complex | number)[][];
  return X.map((r) => {
    const v = r[0]!;
    return typeof v === 'number' ? { re: v, im: 0 } : { re: v.re, im: v.im };
  });
}

const abs = (v: C): number => Math.hypot(v.re, v.im);

/** max |x − y| / max |y|. */
function relDiff(x: C[], y: C[]): number {
  let d = 0;
  let s = 0;
  y.forEach((v, i) => {
    d = Math.max(d, Math.hypot(x[i]!.re - v.re, x[i]!.im - v.im));
    s = Math.max(s, abs(v));
  });
  return s === 0 ? d : d / s;
}

/** A·x for the residual check. */
function matVec(a: Rows, x: C[]): C[] {
  return a.map((row) =>
    row.reduce((acc, v, j) => ({ re: acc.re + v.re * x[j]!.re - v.im * x[j]!.im, im: acc.im + v.re * x[j]!.im + v.im * x[j]!.re }), { re: 0, im: 0 }),
  );
}

/** Entries of modulus between 0.1 and 10: scaling the relative pivot test can judge. */
const scaledEntry = fc
  .record({ m: fc.double({ min: 0.1, max: 10, noNaN: true }), angle: fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }) })
  .map(({ m, angle }) => ({ re: m * Math.cos(angle), im: m * Math.sin(angle) }));
/** Like a circuit matrix: many exact zeros among well-scaled entries. */
const sparseEntry = fc.oneof({ arbitrary: scaledEntry, weight: 3 }, { arbitrary: fc.constant({ re: 0, im: 0 }), weight: 1 });

/**
 * Diagonally dominant by rows after a random row shuffle: well conditioned
 * (cond ≲ 10), yet the shuffle forces the solver to pivot.
 */
const dominantSystem = fc.integer({ min: 1, max: 8 }).chain((n) =>
  fc.record({
    a: fc.array(fc.array(sparseEntry, { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
    b: fc.array(scaledEntry, { minLength: n, maxLength: n }),
    order: fc.shuffledSubarray([...Array(n).keys()], { minLength: n, maxLength: n }),
  }).map(({ a, b, order }) => {
    const dominant = a.map((row, i) => {
      const sum = row.reduce((s, v) => s + abs(v), 0);
      return row.map((v, j) => (j === i ? { re: v.re + (v.re >= 0 ? 1 : -1) * (sum + 1), im: v.im } : v));
    });
    return { a: order.map((k) => dominant[k]!), b };
  }),
);

const generalSystem = fc.integer({ min: 1, max: 7 }).chain((n) =>
  fc.record({
    a: fc.array(fc.array(sparseEntry, { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
    b: fc.array(scaledEntry, { minLength: n, maxLength: n }),
  }),
);

describe('complex LU against mathjs lusolve', () => {
  test('well-conditioned systems that need row swaps agree to rounding', () => {
    let worst = 0;
    fc.assert(
      fc.property(dominantSystem, ({ a, b }) => {
        const { singular, x } = engineSolve(a, b);
        expect(singular).toBe(0);
        // Two backward-stable LU solves of a matrix with cond ≲ 10 agree to a few
        // ulps times n (Golub & Van Loan, Matrix Computations §3.3, from memory): worst observed
        // 2.3e-15 over FC_SEED 20261201, 1–13 and 424242; bound 6e-15.
        const d = relDiff(x, mathjsSolve(a, b));
        worst = Math.max(worst, d);
        expect(d).toBeLessThan(6e-15);
      }),
      { seed, numRuns: 300 },
    );
    console.log(`complex LU vs mathjs, dominant systems: max relative difference ${worst.toExponential(2)}`);
  });

  test('general random systems: tiny normwise backward error', () => {
    fc.assert(
      fc.property(generalSystem, ({ a, b }) => {
        const { singular, x } = engineSolve(a, b);
        fc.pre(singular === 0);
        // Normwise backward error ‖Ax − b‖/(‖A‖‖x‖ + ‖b‖) is O(n·eps) for LU with partial
        // pivoting whatever the condition number (Rigal & Gaches 1967; Higham, Accuracy and
        // Stability of Numerical Algorithms, §7.1, from memory). Worst observed 0.41·n·eps·(‖A‖‖x‖ + ‖b‖)
        // over FC_SEED 20261201, 1–13 and 424242 (the bound had a growth allowance of 100); bound 1·n·eps·(…).
        const r = matVec(a, x).map((v, i) => Math.hypot(v.re - b[i]!.re, v.im - b[i]!.im));
        const normA = Math.max(...a.map((row) => row.reduce((s, v) => s + abs(v), 0)));
        const size = normA * Math.max(...x.map(abs)) + Math.max(...b.map(abs));
        expect(Math.max(...r)).toBeLessThanOrEqual(a.length * Number.EPSILON * size);
      }),
      { seed, numRuns: 300 },
    );
  });

  test('scaling the whole system by a power of two changes nothing, even near under- and overflow', () => {
    // Multiplying A and b by 2^k is exact in binary floating point and leaves x unchanged
    // (IEEE 754 arithmetic, common knowledge): an LU whose pivots are divided by their squared
    // modulus would lose x to underflow (|pivot|² < 1e-308) or overflow, hence Smith's division.
    fc.assert(
      fc.property(dominantSystem, fc.constantFrom(-560, -520, 500, 520), ({ a, b }, k) => {
        const s = 2 ** k;
        const scale = (v: C): C => ({ re: v.re * s, im: v.im * s });
        const plain = engineSolve(a, b);
        const scaled = engineSolve(a.map((row) => row.map(scale)), b.map(scale));
        expect(scaled.singular).toBe(0);
        // Exact but for entries pushed into the subnormal range by 2^-560, whose loss is far below an ulp
        // of the largest (worst observed 7.6e-142 over FC_SEED 20261201, 1–13 and 424242, scattered over
        // decades from seed to seed): bound 2 ulps rather than a multiple of that.
        expect(relDiff(scaled.x, plain.x)).toBeLessThanOrEqual(2 * Number.EPSILON);
      }),
      { seed, numRuns: 100 },
    );
  });

  test('purely real input gives the real solution with zero imaginary part', () => {
    // A circuit at ω = 0 has a real matrix: the complex solver must reduce to real LU.
    const a: Rows = [
      [{ re: 0, im: 0 }, { re: 2, im: 0 }, { re: 1, im: 0 }],
      [{ re: 1, im: 0 }, { re: 1, im: 0 }, { re: 0, im: 0 }],
      [{ re: 3, im: 0 }, { re: 0, im: 0 }, { re: 1, im: 0 }],
    ];
    // x = (1, 2, 3) gives b = (7, 3, 6) by substitution.
    const b = [{ re: 7, im: 0 }, { re: 3, im: 0 }, { re: 6, im: 0 }];
    const { singular, x } = engineSolve(a, b);
    expect(singular).toBe(0);
    x.forEach((v, i) => {
      // Observed 4.4e-16 at most; bound 1e-15.
      expect(Math.abs(v.re - (i + 1))).toBeLessThan(1e-15);
      expect(v.im === 0).toBe(true); // +0 or −0
    });
    // Observed 0; bound 2·eps.
    expect(relDiff(x, mathjsSolve(a, b))).toBeLessThanOrEqual(2 * Number.EPSILON);
  });
});

describe('storage layout and singular matrices', () => {
  test('row and column 0 (ground) are never read: NaN there changes nothing', () => {
    fc.assert(
      fc.property(dominantSystem, ({ a, b }) => {
        const clean = engineSolve(a, b, 0);
        const padded = engineSolve(a, b, Number.NaN);
        expect(padded.singular).toBe(0);
        expect(padded.x).toEqual(clean.x);
      }),
      { seed, numRuns: 50 },
    );
  });

  test('one workspace re-used for several right-hand sides and refactorisations', () => {
    // The sweep refactors one workspace per frequency; stale permutation or scale must not leak.
    const a1: Rows = [
      [{ re: 0, im: 1 }, { re: 1, im: 0 }],
      [{ re: 1, im: 0 }, { re: 0, im: 0 }],
    ];
    const a2: Rows = [
      [{ re: 2, im: 0 }, { re: 0, im: 0 }],
      [{ re: 0, im: 0 }, { re: 0, im: 4 }],
    ];
    const ws = load(a1);
    expect(complexLuFactor(ws)).toBe(0);
    const xRe = new Float64Array(3);
    const xIm = new Float64Array(3);
    complexLuSolve(ws, Float64Array.from([0, 1, 0]), Float64Array.from([0, 0, 0]), xRe, xIm);
    // [[j, 1], [1, 0]]·x = (1, 0) → x2 = 1, x1 = 0 (by substitution).
    expect([xRe[1], xIm[1], xRe[2], xIm[2]]).toEqual([0, 0, 1, 0]);
    const ws2 = load(a2);
    ws.re.set(ws2.re);
    ws.im.set(ws2.im);
    expect(complexLuFactor(ws)).toBe(0);
    complexLuSolve(ws, Float64Array.from([0, 2, 4]), Float64Array.from([0, 0, 0]), xRe, xIm);
    // diag(2, 4j)·x = (2, 4) → x = (1, −j).
    expect([xRe[1], xIm[1], xRe[2], xIm[2]]).toEqual([1, 0, 0, -1]);
  });

  test('an exactly singular matrix reports the column without a pivot', () => {
    // Row 2 = (1 + j)·row 1: rank 1, so elimination finds no pivot in column 2.
    const r1 = [{ re: 1, im: 2 }, { re: -3, im: 0.5 }];
    const r2 = r1.map((v) => ({ re: v.re - v.im, im: v.re + v.im }));
    expect(engineSolve([r1, r2], [{ re: 1, im: 0 }, { re: 0, im: 0 }]).singular).toBe(2);
    // A zero column is found at its own index.
    const z: Rows = [
      [{ re: 1, im: 0 }, { re: 0, im: 0 }, { re: 2, im: 1 }],
      [{ re: 0, im: 3 }, { re: 0, im: 0 }, { re: 1, im: 0 }],
      [{ re: 5, im: 0 }, { re: 0, im: 0 }, { re: 0, im: -1 }],
    ];
    expect(engineSolve(z, z.map(() => ({ re: 1, im: 0 }))).singular).toBe(2);
  });

  test('rank-deficient random matrices are caught (last row a combination of the others)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 7 }), fc.array(fc.array(scaledEntry, { minLength: 7, maxLength: 7 }), { minLength: 7, maxLength: 7 }), fc.array(scaledEntry, { minLength: 7, maxLength: 7 }), (n, rows, w) => {
        // The first n − 1 rows are made diagonally dominant, so that they are well
        // conditioned; row n = Σ w_k·row k is then exactly singular in exact arithmetic, and
        // after rounding its last pivot is ~1e-16 of the column, below the relative tolerance
        // 1e-13. (Rounding of an ill-conditioned block, or entries spanning many decades, can
        // lift that pivot past any relative threshold: rank is not decidable there.)
        const a = rows.slice(0, n - 1).map((row, i) => {
          const r = row.slice(0, n);
          const sum = r.reduce((acc, v) => acc + abs(v), 0);
          r[i] = { re: r[i]!.re + (r[i]!.re >= 0 ? 1 : -1) * (sum + 1), im: r[i]!.im };
          return r;
        });
        const last = a[0]!.map((_, j) =>
          a.reduce((acc, row, k) => ({
            re: acc.re + w[k]!.re * row[j]!.re - w[k]!.im * row[j]!.im,
            im: acc.im + w[k]!.re * row[j]!.im + w[k]!.im * row[j]!.re,
          }), { re: 0, im: 0 }),
        );
        const { singular } = engineSolve([...a, last], last.map(() => ({ re: 1, im: 0 })));
        expect(singular).not.toBe(0);
      }),
      { seed, numRuns: 200 },
    );
  });
});
