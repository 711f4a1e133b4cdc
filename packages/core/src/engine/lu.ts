/**
 * Dense LU factorisation in place, with partial (row) pivoting and a relative
 * pivot tolerance, and the matching forward/back substitution. Storage is the
 * engine's: row-major, stride `size`, unknowns 1..size-1 (row and column 0
 * belong to ground and are skipped). Nothing is allocated per call.
 *
 * Algorithm: Doolittle elimination with partial pivoting (Golub and Van Loan,
 * Matrix Computations, 4th ed., §3.4, algorithm 3.4.1).
 */

/**
 * A pivot smaller than this fraction of the largest entry its column had
 * before elimination is taken as zero: the matrix is singular to working
 * precision. 1e-13 leaves about three decimal digits above double rounding
 * (common practice, no source; the same order as the absolute pivot floor
 * customary in circuit simulators). Such a pivot is nevertheless kept when a
 * running round-off bound (Wilkinson's running error analysis, as in Higham,
 * Accuracy and Stability of Numerical Algorithms, 2nd ed., §3.3; from
 * memory) shows it is no round-off: larger than this same fraction of the
 * bound. Rows of an MNA matrix differ in units (KCL rows in amps, branch
 * rows in volts), and a 1e15 S conductance beside a voltage source's ±1
 * leaves the exact pivot −1e-15 in a regular matrix, tiny beside the ±1 of
 * its column but with a round-off bound of a few 1e-15 · 2.2e-16.
 */
export const PIVOT_RELATIVE_TOLERANCE = 1e-13;

/**
 * The pivot rule shared by the real and complex solvers: a pivot of modulus
 * `pivot` is kept when it exceeds the relative tolerance of its column's
 * largest original entry, or of the running bound on the magnitudes that
 * went into it (then it is no cancellation residue).
 */
export function pivotAcceptable(pivot: number, columnLargest: number, roundOffBound: number): boolean {
  return pivot >= 1e-300 && (pivot > PIVOT_RELATIVE_TOLERANCE * columnLargest || pivot > PIVOT_RELATIVE_TOLERANCE * roundOffBound);
}

/** Reusable storage for one factorisation. */
export interface LuWorkspace {
  /** Matrix storage, row-major with stride `size`; overwritten by L and U. */
  readonly matrix: Float64Array;
  /** Row permutation: after factoring, row k of the factors holds original row perm[k]. */
  readonly perm: Int32Array;
  /** Scratch: the largest magnitude each column had before elimination. */
  readonly columnScale: Float64Array;
  /**
   * Scratch, same layout as `matrix`: the entries as they were before a plain
   * factorisation, and, when a pivot needs it, the running round-off bound
   * of each entry ({@link luFactorBounded}).
   */
  readonly roundoff: Float64Array;
  /** Matrix dimension including the ground row (unknowns + 1). */
  readonly size: number;
  /**
   * The last factorisation had a pivot below the plain relative test (it
   * needed the bound): the next one tracks the bound from the start instead
   * of factoring twice. A circuit's matrices keep their structure from one
   * Newton iteration to the next, so a pivot that needed the bound once
   * mostly needs it again; a bounded factorisation that finds no such pivot
   * sends the next one back to the plain pass.
   */
  boundNeeded: boolean;
}

/** Allocates a workspace for `unknowns` unknowns (plus the ground row). */
export function createLuWorkspace(unknowns: number, matrix?: Float64Array): LuWorkspace {
  const size = unknowns + 1;
  return {
    matrix: matrix ?? new Float64Array(size * size),
    perm: new Int32Array(size),
    columnScale: new Float64Array(size),
    roundoff: new Float64Array(size * size),
    size,
    boundNeeded: false,
  };
}

/**
 * Factors the matrix in place. Returns 0 on success, or the 1-based unknown
 * (column) at which no acceptable pivot was found (the matrix is singular).
 *
 * The running round-off bound costs as much again as the elimination, and
 * only a pivot that fails the plain relative test (at most 1e-13 of its
 * column, {@link PIVOT_RELATIVE_TOLERANCE}) needs it. So the matrix is first
 * factored plainly, its entries kept aside in `roundoff` as they are read for
 * the column scales; only when a pivot fails the plain test is the matrix put
 * back from that copy and factored again with the bound tracked
 * ({@link luFactorBounded}). The factors do not depend on the bound (it only
 * decides whether a pivot is accepted), so a matrix the plain pass accepts
 * gets the very factors, bit for bit, of the bounded pass, and a matrix it
 * refuses gets the bounded pass's verdict and column.
 */
export function luFactor(ws: LuWorkspace): number {
  const { matrix: a, perm, columnScale, roundoff: original, size: s } = ws;
  const n = s - 1;
  if (ws.boundNeeded) return luFactorBounded(ws);
  startFactor(ws, false);
  for (let k = 1; k <= n; k++) {
    const p = pivotRow(a, s, k);
    const best = Math.abs(a[p * s + k]!);
    // Below the absolute floor no bound can save the pivot; above the plain test it needs none.
    if (!(best >= 1e-300)) return k;
    if (!(best > PIVOT_RELATIVE_TOLERANCE * columnScale[k]!)) {
      for (let i = 1; i <= n; i++) {
        const row = i * s;
        for (let j = 1; j <= n; j++) a[row + j] = original[row + j]!;
      }
      return luFactorBounded(ws);
    }
    if (p !== k) {
      swapRows(a, s, k, p);
      swapEntries(perm, k, p);
    }
    const rk = k * s;
    const pivot = a[rk + k]!;
    for (let i = k + 1; i <= n; i++) {
      const ri = i * s;
      const lik = a[ri + k]! / pivot;
      if (lik === 0) continue;
      a[ri + k] = lik;
      for (let j = k + 1; j <= n; j++) a[ri + j] = a[ri + j]! - lik * a[rk + j]!;
    }
  }
  return 0;
}

/**
 * The factorisation of {@link luFactor} with the running round-off bound of
 * every entry tracked in `roundoff` (Wilkinson's running error analysis, as
 * in Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., §3.3;
 * from memory), so that a pivot below the plain relative test is still
 * accepted when it exceeds the same fraction of its bound. Same return value
 * as {@link luFactor}; exported for the tests that compare the two passes.
 */
export function luFactorBounded(ws: LuWorkspace): number {
  const { matrix: a, perm, columnScale, roundoff: e, size: s } = ws;
  const n = s - 1;
  // Each stamped entry may already carry the rounding of its own sum: its bound starts at its magnitude.
  startFactor(ws, true);
  ws.boundNeeded = false;
  for (let k = 1; k <= n; k++) {
    const p = pivotRow(a, s, k);
    const best = Math.abs(a[p * s + k]!);
    if (!pivotAcceptable(best, columnScale[k]!, e[p * s + k]!)) return k;
    if (!(best > PIVOT_RELATIVE_TOLERANCE * columnScale[k]!)) ws.boundNeeded = true;
    if (p !== k) {
      swapRows(a, s, k, p);
      swapRows(e, s, k, p);
      swapEntries(perm, k, p);
    }
    const rk = k * s;
    const pivot = a[rk + k]!;
    const pivotErr = e[rk + k]!;
    for (let i = k + 1; i <= n; i++) {
      const ri = i * s;
      const lik = a[ri + k]! / pivot;
      if (lik === 0) continue;
      a[ri + k] = lik;
      const l = Math.abs(lik);
      // Round-off bound of l: its numerator's and the pivot's, relative, plus the division.
      const lErr = (e[ri + k]! + l * pivotErr) / Math.abs(pivot) + l;
      for (let j = k + 1; j <= n; j++) {
        const u = a[rk + j]!;
        const product = l * Math.abs(u);
        const next = a[ri + j]! - lik * u;
        a[ri + j] = next;
        e[ri + j] = e[ri + j]! + l * e[rk + j]! + lErr * Math.abs(u) + product + Math.abs(next);
      }
    }
  }
  return 0;
}

/**
 * The identity permutation, the largest magnitude of every column, and into
 * `roundoff` each entry (the plain pass's copy) or its magnitude (the
 * bounded pass's starting bound).
 */
function startFactor(ws: LuWorkspace, magnitudes: boolean): void {
  const { matrix: a, perm, columnScale, roundoff: into, size: s } = ws;
  for (let k = 1; k < s; k++) perm[k] = k;
  columnScale.fill(0);
  for (let i = 1; i < s; i++) {
    const row = i * s;
    for (let j = 1; j < s; j++) {
      const v = a[row + j]!;
      const m = Math.abs(v);
      into[row + j] = magnitudes ? m : v;
      if (m > columnScale[j]!) columnScale[j] = m;
    }
  }
}

/** The row at or below k holding the largest magnitude of column k (the first on ties): partial pivoting. */
function pivotRow(a: Float64Array, s: number, k: number): number {
  let p = k;
  let best = Math.abs(a[k * s + k]!);
  for (let i = k + 1; i < s; i++) {
    const m = Math.abs(a[i * s + k]!);
    if (m > best) {
      best = m;
      p = i;
    }
  }
  return p;
}

/** Swaps rows k and p (columns 1..s−1) of a row-major matrix of stride s. */
function swapRows(a: Float64Array, s: number, k: number, p: number): void {
  const rk = k * s;
  const rp = p * s;
  for (let j = 1; j < s; j++) {
    const t = a[rk + j]!;
    a[rk + j] = a[rp + j]!;
    a[rp + j] = t;
  }
}

function swapEntries(v: Int32Array, k: number, p: number): void {
  const t = v[k]!;
  v[k] = v[p]!;
  v[p] = t;
}

/**
 * Solves A·x = b with the factors from {@link luFactor}. `b` (indexed by
 * unknown, entry 0 ignored) is read; the solution is written to `x`
 * (x[0] = 0). `b` and `x` must be different arrays.
 */
export function luSolve(ws: LuWorkspace, b: Float64Array, x: Float64Array): void {
  const { matrix: a, perm, size: s } = ws;
  const n = s - 1;
  x[0] = 0;
  for (let i = 1; i <= n; i++) {
    const ri = i * s;
    let sum = b[perm[i]!]!;
    for (let j = 1; j < i; j++) sum -= a[ri + j]! * x[j]!;
    x[i] = sum;
  }
  for (let i = n; i >= 1; i--) {
    const ri = i * s;
    let sum = x[i]!;
    for (let j = i + 1; j <= n; j++) sum -= a[ri + j]! * x[j]!;
    x[i] = sum / a[ri + i]!;
  }
}
