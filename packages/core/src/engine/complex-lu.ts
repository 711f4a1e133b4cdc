/**
 * Complex dense LU in place (real and imaginary parts in separate
 * Float64Arrays, same layout as {@link LuWorkspace}), with partial pivoting
 * on the modulus and the same relative pivot tolerance as the real solver.
 * For small-signal analysis: nothing is allocated per frequency point.
 * Algorithm: Golub and Van Loan, Matrix Computations, 4th ed., alg. 3.4.1,
 * in complex arithmetic; complex division by Smith's method (R. L. Smith,
 * Algorithm 116: Complex division, Commun. ACM 5(8), 1962).
 */
import { pivotAcceptable } from './lu.js';

/** Storage for one complex factorisation. */
export interface ComplexLuWorkspace {
  readonly re: Float64Array;
  readonly im: Float64Array;
  readonly perm: Int32Array;
  readonly columnScale: Float64Array;
  /** Scratch: running round-off bound of every entry, as in the real solver ({@link luFactor}). */
  readonly termScale: Float64Array;
  /** Unknowns + 1. */
  readonly size: number;
}

/** Allocates a complex workspace for `unknowns` unknowns. */
export function createComplexLuWorkspace(unknowns: number): ComplexLuWorkspace {
  const size = unknowns + 1;
  return { re: new Float64Array(size * size), im: new Float64Array(size * size), perm: new Int32Array(size), columnScale: new Float64Array(size), termScale: new Float64Array(size * size), size };
}

/** Factors in place; 0 on success, else the 1-based column without a pivot. */
export function complexLuFactor(ws: ComplexLuWorkspace): number {
  const { re, im, perm, columnScale, termScale: e, size: s } = ws;
  const n = s - 1;
  for (let k = 1; k <= n; k++) perm[k] = k;
  columnScale.fill(0);
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= n; j++) {
      const m = Math.hypot(re[i * s + j]!, im[i * s + j]!);
      e[i * s + j] = m;
      if (m > columnScale[j]!) columnScale[j] = m;
    }
  }
  for (let k = 1; k <= n; k++) {
    let p = k;
    let best = Math.hypot(re[k * s + k]!, im[k * s + k]!);
    for (let i = k + 1; i <= n; i++) {
      const m = Math.hypot(re[i * s + k]!, im[i * s + k]!);
      if (m > best) {
        best = m;
        p = i;
      }
    }
    if (!pivotAcceptable(best, columnScale[k]!, e[p * s + k]!)) return k;
    if (p !== k) {
      for (let j = 1; j <= n; j++) {
        const a = k * s + j;
        const b = p * s + j;
        let t = re[a]!;
        re[a] = re[b]!;
        re[b] = t;
        t = im[a]!;
        im[a] = im[b]!;
        im[b] = t;
        t = e[a]!;
        e[a] = e[b]!;
        e[b] = t;
      }
      const t = perm[k]!;
      perm[k] = perm[p]!;
      perm[p] = t;
    }
    const pr = re[k * s + k]!;
    const pi = im[k * s + k]!;
    // Reciprocal by Smith's method: dividing by |pivot|² would under- or overflow
    // for pivot moduli beyond about 1e±154, which the pivot floor lets through.
    let ir: number;
    let ii: number;
    if (Math.abs(pr) >= Math.abs(pi)) {
      const r = pi / pr;
      const d = pr + pi * r;
      ir = 1 / d;
      ii = -r / d;
    } else {
      const r = pr / pi;
      const d = pr * r + pi;
      ir = r / d;
      ii = -1 / d;
    }
    const pivotMod = Math.hypot(pr, pi);
    const pivotErr = e[k * s + k]!;
    for (let i = k + 1; i <= n; i++) {
      const ik = i * s + k;
      const ar = re[ik]!;
      const ai = im[ik]!;
      if (ar === 0 && ai === 0) continue;
      const lr = ar * ir - ai * ii;
      const li = ar * ii + ai * ir;
      re[ik] = lr;
      im[ik] = li;
      const l = Math.hypot(lr, li);
      const lErr = (e[ik]! + l * pivotErr) / pivotMod + l;
      for (let j = k + 1; j <= n; j++) {
        const kj = k * s + j;
        const ij = i * s + j;
        const ur = re[kj]!;
        const ui = im[kj]!;
        const u = Math.hypot(ur, ui);
        const nr = re[ij]! - (lr * ur - li * ui);
        const ni = im[ij]! - (lr * ui + li * ur);
        re[ij] = nr;
        im[ij] = ni;
        e[ij] = e[ij]! + l * e[kj]! + lErr * u + l * u + Math.hypot(nr, ni);
      }
    }
  }
  return 0;
}

/** Solves with the factors: b (re, im) in, x (re, im) out; x[0] = 0. */
export function complexLuSolve(ws: ComplexLuWorkspace, bRe: Float64Array, bIm: Float64Array, xRe: Float64Array, xIm: Float64Array): void {
  const { re, im, perm, size: s } = ws;
  const n = s - 1;
  xRe[0] = 0;
  xIm[0] = 0;
  for (let i = 1; i <= n; i++) {
    let sr = bRe[perm[i]!]!;
    let si = bIm[perm[i]!]!;
    for (let j = 1; j < i; j++) {
      const lr = re[i * s + j]!;
      const li = im[i * s + j]!;
      sr -= lr * xRe[j]! - li * xIm[j]!;
      si -= lr * xIm[j]! + li * xRe[j]!;
    }
    xRe[i] = sr;
    xIm[i] = si;
  }
  for (let i = n; i >= 1; i--) {
    let sr = xRe[i]!;
    let si = xIm[i]!;
    for (let j = i + 1; j <= n; j++) {
      const ur = re[i * s + j]!;
      const ui = im[i * s + j]!;
      sr -= ur * xRe[j]! - ui * xIm[j]!;
      si -= ur * xIm[j]! + ui * xRe[j]!;
    }
    // Smith's division, as in the factorisation.
    const dr = re[i * s + i]!;
    const di = im[i * s + i]!;
    if (Math.abs(dr) >= Math.abs(di)) {
      const r = di / dr;
      const d = dr + di * r;
      xRe[i] = (sr + si * r) / d;
      xIm[i] = (si - sr * r) / d;
    } else {
      const r = dr / di;
      const d = dr * r + di;
      xRe[i] = (sr * r + si) / d;
      xIm[i] = (si * r - sr) / d;
    }
  }
}
