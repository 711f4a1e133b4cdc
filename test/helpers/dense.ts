/**
 * Dense-matrix helpers for tests: moving plain row arrays in and out of the
 * engine's LU storage (row-major, stride n + 1, row and column 0 reserved
 * for ground), norms, and fast-check arbitraries for test matrices.
 */
import fc from 'fast-check';
import { createLuWorkspace, luFactor, luSolve, type LuWorkspace } from '@railcheck/core/internal';

/** A workspace holding `a` (n×n, rows of numbers); row/column 0 are filled with `pad`. */
export function toLu(a: readonly (readonly number[])[], pad = 0): LuWorkspace {
  const n = a.length;
  const ws = createLuWorkspace(n);
  ws.matrix.fill(pad);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) ws.matrix[(i + 1) * ws.size + j + 1] = a[i]![j]!;
  return ws;
}

/** b as the engine's right-hand side (entry 0 = `pad`, then b). */
export function toRhs(b: readonly number[], pad = 0): Float64Array {
  return Float64Array.from([pad, ...b]);
}

/** Factors and solves with the engine's LU; `singular` is luFactor's return value. */
export function engineSolve(a: readonly (readonly number[])[], b: readonly number[]): { singular: number; x: number[] } {
  const ws = toLu(a);
  const singular = luFactor(ws);
  if (singular !== 0) return { singular, x: [] };
  const x = new Float64Array(ws.size);
  luSolve(ws, toRhs(b), x);
  return { singular, x: Array.from(x.subarray(1)) };
}

/** Largest |x_i − y_i| over the largest |y_i| (∞-norm relative difference). */
export function relDiff(x: readonly number[], y: readonly number[]): number {
  let d = 0;
  let s = 0;
  for (let i = 0; i < y.length; i++) {
    d = Math.max(d, Math.abs(x[i]! - y[i]!));
    s = Math.max(s, Math.abs(y[i]!));
  }
  return s === 0 ? d : d / s;
}

/** Matrix ∞-norm (largest absolute row sum). */
export function normInf(a: readonly (readonly number[])[]): number {
  return Math.max(...a.map((row) => row.reduce((s, v) => s + Math.abs(v), 0)));
}

/** Matrix-vector product. */
export function matVec(a: readonly (readonly number[])[], x: readonly number[]): number[] {
  return a.map((row) => row.reduce((s, v, j) => s + v * x[j]!, 0));
}

/**
 * An entry in [−1, 1] on a grid of 1e-6, uniform-ish (fast-check's doubles
 * favour extreme and subnormal values, which is not what a test matrix
 * wants); magnitudes below 1e-3 become exact zeros, so matrices are sparse
 * now and then but carry no near-zero values, against which
 * general-purpose references apply zero thresholds of their own.
 */
export const entry: fc.Arbitrary<number> = fc.integer({ min: -1_000_000, max: 1_000_000 }).map((k) => (Math.abs(k) < 1000 ? 0 : k / 1e6));

/** A value of magnitude in [0.1, 1] with either sign: generic, never zero. */
export const generic: fc.Arbitrary<number> = fc.tuple(fc.integer({ min: 100_000, max: 1_000_000 }), fc.boolean()).map(([k, neg]) => (neg ? -k : k) / 1e6);

/**
 * A square matrix of entries in [−1, 1] with one entry per row raised by
 * n + 1 at a randomly permuted column: well conditioned (row diagonally
 * dominant after a column permutation), yet partial pivoting has to swap rows.
 */
export function dominantSystem(minN = 1, maxN = 12): fc.Arbitrary<{ a: number[][]; b: number[] }> {
  return fc.integer({ min: minN, max: maxN }).chain((n) =>
    fc.record({
      a: fc.array(fc.array(entry, { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
      keys: fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: n, maxLength: n }),
      signs: fc.array(fc.boolean(), { minLength: n, maxLength: n }),
      b: fc.array(entry.map((v) => 10 * v), { minLength: n, maxLength: n }),
    }).map(({ a, keys, signs, b }) => {
      const perm = keys.map((k, i) => [k, i] as const).sort((p, q) => p[0] - q[0] || p[1] - q[1]).map(([, i]) => i);
      const m = a.map((row) => [...row]);
      perm.forEach((col, row) => {
        m[row]![col] = m[row]![col]! + (signs[row] ? 1 : -1) * (n + 1);
      });
      return { a: m, b };
    }),
  );
}

/** A square matrix of plain random entries in [−1, 1] and a right-hand side. */
export function generalSystem(minN = 1, maxN = 10): fc.Arbitrary<{ a: number[][]; b: number[] }> {
  return fc.integer({ min: minN, max: maxN }).chain((n) =>
    fc.record({
      a: fc.array(fc.array(entry, { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
      b: fc.array(entry, { minLength: n, maxLength: n }),
    }),
  );
}
