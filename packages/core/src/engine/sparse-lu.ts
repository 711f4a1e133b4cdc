/**
 * Sparse LU for large circuits: a fill-reducing column ordering chosen once
 * per circuit, then a left-looking factorisation on compressed columns.
 *
 * - Ordering: minimum degree (Tinney and Walker, "Direct solutions of sparse
 *   network equations by optimally ordered triangular factorization",
 *   Proc. IEEE 55(11), 1967, scheme 2; the algorithm as surveyed by George
 *   and Liu, "The evolution of the minimum degree ordering algorithm", SIAM
 *   Review 31(1), 1989) on the pattern of A + Aᵀ, on the explicit elimination
 *   graph. It is the plain algorithm, not the approximate minimum degree of
 *   Amestoy, Davis and Duff (1996): for the few thousand unknowns the budget
 *   allows it costs milliseconds once per circuit.
 * - Factorisation: left-looking LU with partial pivoting (Gilbert and
 *   Peierls, "Sparse partial pivoting in time proportional to arithmetic
 *   operations", SIAM J. Sci. Stat. Comput. 9(5), 1988), each column's
 *   pattern found by a depth-first search in the graph of L, as in Davis,
 *   Direct Methods for Sparse Linear Systems, SIAM 2006, §6.3 (cs_lu).
 * - Reuse, as in KLU (Davis and Palamadai Natarajan, "Algorithm 907: KLU, a
 *   direct sparse solver for circuit simulation problems", ACM TOMS 37(3),
 *   2010): the first factorisation chooses the pivot rows (the largest
 *   candidate of each column, as the dense solver does) and fixes the
 *   patterns of L and U; later
 *   factorisations of the same pattern only redo the arithmetic on them. When
 *   a reused pivot fails the rule of the dense solver ({@link pivotAcceptable}
 *   in lu.ts: relative to its column's largest original entry or, only when
 *   that fails, to the magnitudes summed into it) or falls below
 *   {@link REUSE_PIVOT_THRESHOLD} of its column's largest candidate, the
 *   pivoting factorisation is done again.
 *
 * Unknowns are 1..n as in the engine (0 is ground). A matrix is given as a
 * list of entries (row, column) with a value array indexed by entry; entries
 * in row or column 0 are ignored (the engine puts every ground stamp at one
 * such dump entry). Refactorisation and solve allocate nothing; a pivoting
 * factorisation allocates only when its fill exceeds the symbolic estimate.
 */
import { pivotAcceptable } from './lu.js';

/**
 * A reused pivot is kept while it is at least this fraction of the largest
 * candidate of its column (threshold partial pivoting; growth per step at
 * most 10). 0.1 is the default pivot tolerance of the unsymmetric sparse
 * codes MA48 (Duff and Reid, ACM TOMS 22(2), 1996) and UMFPACK (Davis, ACM
 * TOMS 30(2), 2004), from memory. A pivoting factorisation itself takes the
 * largest candidate, as the dense solver does (the diagonal when it ties), so
 * its factors are as accurate as the dense ones: a preference for the
 * diagonal within 1e-3 (KLU's default) was tried and lost two to three
 * digits on MNA matrices whose 1/R diagonals sit beside a voltage source's ±1
 * (test/core/engine/linear-networks.test.ts, 30·eps·κ against 2·eps·κ).
 */
export const REUSE_PIVOT_THRESHOLD = 0.1;

/** The symmetric pattern of A + Aᵀ without the diagonal, as one adjacency set per unknown 1..n. */
function symmetricGraph(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>): Set<number>[] {
  const adj: Set<number>[] = Array.from({ length: n + 1 }, () => new Set<number>());
  for (let k = 0; k < rows.length; k++) {
    const i = rows[k]!;
    const j = cols[k]!;
    if (i === 0 || j === 0 || i === j || i > n || j > n) continue;
    adj[i]!.add(j);
    adj[j]!.add(i);
  }
  return adj;
}

/** Eliminates one vertex of the graph: its neighbours become a clique. Returns its degree at elimination. */
function eliminate(adj: Set<number>[], v: number): number {
  const nb = [...adj[v]!];
  for (const u of nb) adj[u]!.delete(v);
  for (let a = 0; a < nb.length; a++) {
    const sa = adj[nb[a]!]!;
    for (let b = a + 1; b < nb.length; b++) {
      if (!sa.has(nb[b]!)) {
        sa.add(nb[b]!);
        adj[nb[b]!]!.add(nb[a]!);
      }
    }
  }
  adj[v]!.clear();
  return nb.length;
}

/**
 * Minimum degree ordering of the unknowns 1..n on the pattern of A + Aᵀ
 * (Tinney and Walker 1967, scheme 2; George and Liu 1989): at each step the
 * unknown with the fewest neighbours in the elimination graph (the lowest
 * index among equals) is eliminated and its neighbours joined. Entries in row
 * or column 0, and on the diagonal, do not count.
 *
 * @param n number of unknowns
 * @param rows row of each entry (unknown index, 0 = ground)
 * @param cols column of each entry
 * @returns the unknowns in elimination order (a permutation of 1..n)
 */
export function minimumDegreeOrder(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>): Int32Array {
  const adj = symmetricGraph(n, rows, cols);
  const order = new Int32Array(n);
  const done = new Uint8Array(n + 1);
  for (let k = 0; k < n; k++) {
    let best = 0;
    let bestDegree = Number.POSITIVE_INFINITY;
    for (let v = 1; v <= n; v++) {
      if (done[v] === 0 && adj[v]!.size < bestDegree) {
        bestDegree = adj[v]!.size;
        best = v;
      }
    }
    order[k] = best;
    done[best] = 1;
    eliminate(adj, best);
  }
  return order;
}

/**
 * Number of entries strictly below the diagonal of the Cholesky factor of
 * the pattern of A + Aᵀ eliminated in `order` (George and Liu 1989: the sum
 * of the degrees at elimination), the fill of a factorisation that keeps the
 * diagonal pivots. A measure of an ordering, and the estimate of the storage
 * of L (and of U) a sparse factorisation starts with.
 *
 * @param n number of unknowns
 * @param rows row of each entry (0 = ground, ignored)
 * @param cols column of each entry
 * @param order the unknowns 1..n in elimination order
 */
export function eliminationFill(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>, order: ArrayLike<number>): number {
  const adj = symmetricGraph(n, rows, cols);
  let count = 0;
  for (let k = 0; k < order.length; k++) count += eliminate(adj, order[k]!);
  return count;
}

/** Storage and state of one sparse factorisation (see the file's TSDoc). */
export class SparseLu {
  /** Number of unknowns. */
  readonly n: number;
  /** Step k → the unknown (column) eliminated at step k. */
  readonly order: Int32Array;
  /** Columns of A: entries of column j (unknown) are aRow/aIndex[aStart[j] .. aStart[j+1]). */
  private readonly aStart: Int32Array;
  private readonly aRow: Int32Array;
  private readonly aIndex: Int32Array;
  /** Unknown (row) → step at which it is the pivot row, −1 before. */
  private readonly pinv: Int32Array;
  /** Step → pivot row (unknown). */
  private readonly prow: Int32Array;
  /** L by columns (steps), unit diagonal not stored; row indices are steps once factored. */
  private lp: Int32Array;
  private li: Int32Array;
  private lx: Float64Array;
  /** U by columns (steps), without the diagonal, in the order the entries become final. */
  private up: Int32Array;
  private ui: Int32Array;
  private ux: Float64Array;
  private readonly udiag: Float64Array;
  /** Work vectors (by unknown during a pivoting factorisation, by step in a refactorisation). */
  private readonly work: Float64Array;
  private readonly workAbs: Float64Array;
  private readonly xi: Int32Array;
  private readonly stack: Int32Array;
  private readonly pstack: Int32Array;
  private readonly mark: Int32Array;
  private generation = 0;
  private readonly y: Float64Array;
  /** Whether a pivot sequence (and the patterns of L and U) exists to reuse. */
  private pivoted = false;
  /** Pivoting factorisations done so far (the first and every redo). */
  pivotings = 0;
  /** Factorisations that reused the pivot sequence. */
  refactorisations = 0;

  constructor(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>, order: Int32Array) {
    this.n = n;
    this.order = order;
    const count = new Int32Array(n + 2);
    for (let k = 0; k < rows.length; k++) if (rows[k]! !== 0 && cols[k]! !== 0) count[cols[k]! + 1]!++;
    for (let j = 1; j <= n + 1; j++) count[j] = count[j]! + count[j - 1]!;
    this.aStart = count;
    const nnz = count[n + 1]!;
    this.aRow = new Int32Array(nnz);
    this.aIndex = new Int32Array(nnz);
    const fill = new Int32Array(count);
    for (let k = 0; k < rows.length; k++) {
      const i = rows[k]!;
      const j = cols[k]!;
      if (i === 0 || j === 0) continue;
      const at = fill[j]!++;
      this.aRow[at] = i;
      this.aIndex[at] = k;
    }
    const estimate = eliminationFill(n, rows, cols, order) + n + 16;
    this.lp = new Int32Array(n + 1);
    this.li = new Int32Array(estimate);
    this.lx = new Float64Array(estimate);
    this.up = new Int32Array(n + 1);
    this.ui = new Int32Array(estimate);
    this.ux = new Float64Array(estimate);
    this.udiag = new Float64Array(n);
    this.pinv = new Int32Array(n + 1);
    this.prow = new Int32Array(n);
    this.work = new Float64Array(n + 1);
    this.workAbs = new Float64Array(n + 1);
    this.xi = new Int32Array(n + 1);
    this.stack = new Int32Array(n + 1);
    this.pstack = new Int32Array(n + 1);
    this.mark = new Int32Array(n + 1);
    this.y = new Float64Array(n);
  }

  /** Forgets the pivot sequence: the next factorisation pivots afresh (as after construction). */
  reset(): void {
    this.pivoted = false;
  }

  /** Step → pivot row (unknown) of the last factorisation, for measurements (a benchmark's floor on the same pivots). */
  get pivotRows(): Int32Array {
    return this.prow;
  }

  /** Entries stored in L and U (without U's diagonal), for measurements. */
  get factorEntries(): number {
    return this.lp[this.n]! + this.up[this.n]!;
  }

  /**
   * Factors the matrix whose entry k has value `values[k]`. Returns 0, or
   * the unknown (column) for which no acceptable pivot exists.
   */
  factor(values: Float64Array): number {
    if (this.pivoted) {
      const r = this.refactor(values);
      if (r) {
        this.refactorisations++;
        return 0;
      }
    }
    return this.factorPivoting(values);
  }

  /** Grows L's or U's storage to hold `need` entries (only in a pivoting factorisation). */
  private ensure(need: number): void {
    if (need > this.li.length) {
      const size = Math.max(need, 2 * this.li.length);
      const li = new Int32Array(size);
      li.set(this.li);
      const lx = new Float64Array(size);
      lx.set(this.lx);
      this.li = li;
      this.lx = lx;
    }
    if (need > this.ui.length) {
      const size = Math.max(need, 2 * this.ui.length);
      const ui = new Int32Array(size);
      ui.set(this.ui);
      const ux = new Float64Array(size);
      ux.set(this.ux);
      this.ui = ui;
      this.ux = ux;
    }
  }

  /** Depth-first search from unknown `start` in the graph of L (rows not yet pivotal are leaves); pushes the finished nodes onto xi from `top` down. */
  private dfs(start: number, top: number): number {
    const { stack, pstack, mark, pinv, xi, lp } = this;
    const li = this.li;
    const g = this.generation;
    let head = 0;
    stack[0] = start;
    while (head >= 0) {
      const j = stack[head]!;
      const jc = pinv[j]!;
      if (mark[j] !== g) {
        mark[j] = g;
        pstack[head] = jc < 0 ? 0 : lp[jc]!;
      }
      let done = true;
      const end = jc < 0 ? 0 : lp[jc + 1]!;
      for (let p = pstack[head]!; p < end; p++) {
        const i = li[p]!;
        if (mark[i] === g) continue;
        pstack[head] = p + 1;
        stack[++head] = i;
        done = false;
        break;
      }
      if (done) {
        head--;
        xi[--top] = j;
      }
    }
    return top;
  }

  /** The pivoting factorisation: pattern by depth-first search, partial pivoting (the diagonal on a tie). */
  private factorPivoting(values: Float64Array): number {
    this.pivotings++;
    this.pivoted = false;
    const { n, order, aStart, aRow, aIndex, pinv, prow, udiag, work: x, workAbs: xa, xi, mark } = this;
    pinv.fill(-1);
    let lnz = 0;
    let unz = 0;
    this.lp[0] = 0;
    this.up[0] = 0;
    for (let k = 0; k < n; k++) {
      const col = order[k]!;
      this.generation++;
      const g = this.generation;
      let top = n + 1;
      for (let p = aStart[col]!; p < aStart[col + 1]!; p++) {
        const i = aRow[p]!;
        if (mark[i] !== g) top = this.dfs(i, top);
      }
      for (let p = top; p <= n; p++) x[xi[p]!] = 0;
      for (let p = aStart[col]!; p < aStart[col + 1]!; p++) x[aRow[p]!] = x[aRow[p]!]! + values[aIndex[p]!]!;
      let columnLargest = 0;
      for (let p = aStart[col]!; p < aStart[col + 1]!; p++) {
        const m = Math.abs(x[aRow[p]!]!);
        if (m > columnLargest) columnLargest = m;
      }
      const lp = this.lp;
      const li = this.li;
      const lx = this.lx;
      for (let p = top; p <= n; p++) {
        const i = xi[p]!;
        const j = pinv[i]!;
        if (j < 0) continue;
        const xj = x[i]!;
        if (xj === 0) continue;
        for (let q = lp[j]!; q < lp[j + 1]!; q++) x[li[q]!] = x[li[q]!]! - lx[q]! * xj;
      }
      this.ensure(Math.max(lnz, unz) + (n + 1 - top));
      let best = -1;
      let bestAbs = -1;
      for (let p = top; p <= n; p++) {
        const i = xi[p]!;
        if (pinv[i]! >= 0) {
          this.ui[unz] = pinv[i]!;
          this.ux[unz++] = x[i]!;
        } else {
          const m = Math.abs(x[i]!);
          if (m > bestAbs) {
            bestAbs = m;
            best = i;
          }
        }
      }
      if (best < 0) return col;
      if (mark[col] === g && pinv[col]! < 0 && Math.abs(x[col]!) >= bestAbs) best = col;
      const pivot = x[best]!;
      const m = Math.abs(pivot);
      if (!pivotAcceptable(m, columnLargest, Number.POSITIVE_INFINITY)) {
        // The magnitudes summed into the pivot: |a| + Σ|l·u| over the same pattern.
        for (let p = top; p <= n; p++) xa[xi[p]!] = 0;
        for (let p = aStart[col]!; p < aStart[col + 1]!; p++) xa[aRow[p]!] = xa[aRow[p]!]! + Math.abs(values[aIndex[p]!]!);
        for (let p = top; p <= n; p++) {
          const i = xi[p]!;
          const j = pinv[i]!;
          if (j < 0) continue;
          const xj = Math.abs(x[i]!);
          for (let q = lp[j]!; q < lp[j + 1]!; q++) xa[li[q]!] = xa[li[q]!]! + Math.abs(lx[q]!) * xj;
        }
        if (!pivotAcceptable(m, columnLargest, xa[best]!)) return col;
      }
      udiag[k] = pivot;
      pinv[best] = k;
      prow[k] = best;
      for (let p = top; p <= n; p++) {
        const i = xi[p]!;
        if (pinv[i]! < 0) {
          this.li[lnz] = i;
          this.lx[lnz++] = x[i]! / pivot;
        }
      }
      this.lp[k + 1] = lnz;
      this.up[k + 1] = unz;
    }
    for (let p = 0; p < lnz; p++) this.li[p] = pinv[this.li[p]!]!;
    this.pivoted = true;
    return 0;
  }

  /** Refactorisation on the fixed pivot sequence and patterns; false when a pivot fails (nothing is then valid). */
  private refactor(values: Float64Array): boolean {
    const { n, order, aStart, aRow, aIndex, pinv, udiag, work: x, workAbs: xa, lp, li, lx, up, ui, ux } = this;
    for (let k = 0; k < n; k++) {
      const col = order[k]!;
      const u0 = up[k]!;
      const u1 = up[k + 1]!;
      const l0 = lp[k]!;
      const l1 = lp[k + 1]!;
      for (let q = u0; q < u1; q++) x[ui[q]!] = 0;
      for (let q = l0; q < l1; q++) x[li[q]!] = 0;
      x[k] = 0;
      const a0 = aStart[col]!;
      const a1 = aStart[col + 1]!;
      for (let p = a0; p < a1; p++) {
        const s = pinv[aRow[p]!]!;
        x[s] = x[s]! + values[aIndex[p]!]!;
      }
      let columnLargest = 0;
      for (let p = a0; p < a1; p++) {
        const m = Math.abs(x[pinv[aRow[p]!]!]!);
        if (m > columnLargest) columnLargest = m;
      }
      for (let q = u0; q < u1; q++) {
        const j = ui[q]!;
        const xj = x[j]!;
        ux[q] = xj;
        if (xj === 0) continue;
        for (let r = lp[j]!; r < lp[j + 1]!; r++) x[li[r]!] = x[li[r]!]! - lx[r]! * xj;
      }
      const pivot = x[k]!;
      const m = Math.abs(pivot);
      let largest = 0;
      for (let q = l0; q < l1; q++) {
        const v = Math.abs(x[li[q]!]!);
        if (v > largest) largest = v;
      }
      if (!(m >= REUSE_PIVOT_THRESHOLD * largest)) return false;
      if (!pivotAcceptable(m, columnLargest, Number.POSITIVE_INFINITY)) {
        for (let q = u0; q < u1; q++) xa[ui[q]!] = 0;
        xa[k] = 0;
        for (let p = a0; p < a1; p++) {
          const s = pinv[aRow[p]!]!;
          xa[s] = xa[s]! + Math.abs(values[aIndex[p]!]!);
        }
        for (let q = u0; q < u1; q++) {
          const j = ui[q]!;
          const xj = Math.abs(ux[q]!);
          for (let r = lp[j]!; r < lp[j + 1]!; r++) if (li[r]! === k) xa[k] = xa[k]! + Math.abs(lx[r]!) * xj;
        }
        if (!pivotAcceptable(m, columnLargest, xa[k]!)) return false;
      }
      udiag[k] = pivot;
      for (let q = l0; q < l1; q++) lx[q] = x[li[q]!]! / pivot;
    }
    return true;
  }

  /**
   * Solves A·x = b with the last factors. `b` and `x` are indexed by
   * unknown (entry 0 ignored; x[0] = 0) and must be different arrays.
   */
  solve(b: Float64Array, x: Float64Array): void {
    const { n, prow, order, lp, li, lx, up, ui, ux, udiag, y } = this;
    for (let k = 0; k < n; k++) y[k] = b[prow[k]!]!;
    for (let k = 0; k < n; k++) {
      const yk = y[k]!;
      if (yk === 0) continue;
      for (let q = lp[k]!; q < lp[k + 1]!; q++) y[li[q]!] = y[li[q]!]! - lx[q]! * yk;
    }
    for (let k = n - 1; k >= 0; k--) {
      const yk = y[k]! / udiag[k]!;
      y[k] = yk;
      if (yk === 0) continue;
      for (let q = up[k]!; q < up[k + 1]!; q++) y[ui[q]!] = y[ui[q]!]! - ux[q]! * yk;
    }
    x[0] = 0;
    for (let k = 0; k < n; k++) x[order[k]!] = y[k]!;
  }
}

/**
 * Sets up a sparse factorisation of the pattern given by `rows`/`cols`
 * (entry k at (rows[k], cols[k]); row or column 0 ignored): the columns of
 * A, the ordering ({@link minimumDegreeOrder} unless `order` is given) and
 * storage for L and U sized by {@link eliminationFill}.
 *
 * @param n number of unknowns
 * @param rows row of each entry (unknown index)
 * @param cols column of each entry
 * @param order elimination order of the unknowns (default: minimum degree)
 */
export function createSparseLu(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>, order?: Int32Array): SparseLu {
  return new SparseLu(n, rows, cols, order ?? minimumDegreeOrder(n, rows, cols));
}

/**
 * Factors the matrix with entry values `values` (indexed as the pattern's
 * entries): refactorisation on the last pivot sequence, or a pivoting one.
 * Returns 0, or the unknown (column) without an acceptable pivot.
 */
export function sparseLuFactor(lu: SparseLu, values: Float64Array): number {
  return lu.factor(values);
}

/** Solves A·x = b with the factors of {@link sparseLuFactor}; `b`, `x` indexed by unknown, x[0] = 0. */
export function sparseLuSolve(lu: SparseLu, b: Float64Array, x: Float64Array): void {
  lu.solve(b, x);
}
