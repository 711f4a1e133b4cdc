// Floors of the speed benchmarks, and the growth fit: bare LU factorisations written here, with
// none of the engine's checks, that one Newton iteration is measured against
// (bench/run.mjs, bench/sparse-threshold.mjs).

/**
 * The textbook Doolittle elimination with partial pivoting (Golub and Van
 * Loan, Matrix Computations, 4th ed., algorithm 3.4.1) in place on `a`
 * (row-major, stride s, the ground row and column 0 unused), then forward
 * and back substitution of `b` into `x`: no pivot tolerance, no round-off
 * bound. Returns 0, or the column with a zero pivot.
 */
export function bareFactorSolve(a, s, perm, b, x) {
  const n = s - 1;
  for (let k = 1; k <= n; k++) perm[k] = k;
  for (let k = 1; k <= n; k++) {
    let p = k;
    let best = Math.abs(a[k * s + k]);
    for (let i = k + 1; i <= n; i++) {
      const m = Math.abs(a[i * s + k]);
      if (m > best) {
        best = m;
        p = i;
      }
    }
    if (best === 0) return k;
    const rk = k * s;
    if (p !== k) {
      const rp = p * s;
      for (let j = 1; j <= n; j++) {
        const t = a[rk + j];
        a[rk + j] = a[rp + j];
        a[rp + j] = t;
      }
      const t = perm[k];
      perm[k] = perm[p];
      perm[p] = t;
    }
    const pivot = a[rk + k];
    for (let i = k + 1; i <= n; i++) {
      const ri = i * s;
      const l = a[ri + k] / pivot;
      if (l === 0) continue;
      a[ri + k] = l;
      for (let j = k + 1; j <= n; j++) a[ri + j] -= l * a[rk + j];
    }
  }
  for (let i = 1; i <= n; i++) {
    const ri = i * s;
    let sum = b[perm[i]];
    for (let j = 1; j < i; j++) sum -= a[ri + j] * x[j];
    x[i] = sum;
  }
  for (let i = n; i >= 1; i--) {
    const ri = i * s;
    let sum = x[i];
    for (let j = i + 1; j <= n; j++) sum -= a[ri + j] * x[j];
    x[i] = sum / a[ri + i];
  }
  return 0;
}

/** A bare dense LU factor and solve of a copy of a matrix `a` (stride s) and right-hand side `b`: {@link bareFactorSolve} on a scratch copy. */
export function bareDense(s) {
  const m = new Float64Array(s * s);
  const perm = new Int32Array(s);
  const x = new Float64Array(s);
  return (a, b) => {
    m.set(a);
    bareFactorSolve(m, s, perm, b, x);
    return x;
  };
}

/**
 * The bare floor: the loaded matrix permuted by the engine's pivot rows and
 * column order (so the diagonal holds the pivots), its L and U patterns found
 * once, then an up-looking (row by row, i-k-j) elimination on them and the
 * two triangular solves: no pivot search, no checks, no reuse logic.
 */
export function bareSparse(c) {
  const { ws } = c;
  const lu = ws.solver.lu;
  const n = ws.unknowns;
  const order = lu.order;
  const prow = lu.pivotRows;
  const colStep = new Int32Array(n + 1);
  for (let k = 0; k < n; k++) colStep[order[k]] = k;
  const { rows, cols, offsets, count } = ws.stamps;
  // Pattern of each permuted row, then its elimination closure (symbolic, once).
  const rowOf = new Int32Array(n + 1);
  for (let k = 0; k < n; k++) rowOf[prow[k]] = k;
  const pattern = Array.from({ length: n }, () => new Set());
  const source = Array.from({ length: n }, () => []);
  for (let e = 0; e < count; e++) {
    const i = rowOf[rows[e]];
    const j = colStep[cols[e]];
    pattern[i].add(j);
    source[i].push([j, offsets[e]]);
  }
  const upper = [];
  for (let i = 0; i < n; i++) {
    const set = pattern[i];
    set.add(i);
    const lower = [...set].filter((j) => j < i).sort((a, b) => a - b);
    for (let t = 0; t < lower.length; t++) {
      for (const j of upper[lower[t]]) {
        if (!set.has(j)) {
          set.add(j);
          if (j < i) {
            lower.push(j);
            lower.sort((a, b) => a - b);
          }
        }
      }
    }
    upper.push([...set].filter((j) => j > i).sort((a, b) => a - b));
    pattern[i] = [...set].sort((a, b) => a - b);
  }
  const rowPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) rowPtr[i + 1] = rowPtr[i] + pattern[i].length;
  const colIdx = new Int32Array(rowPtr[n]);
  const diagAt = new Int32Array(n);
  for (let i = 0; i < n; i++) pattern[i].forEach((j, t) => { colIdx[rowPtr[i] + t] = j; if (j === i) diagAt[i] = rowPtr[i] + t; });
  const val = new Float64Array(rowPtr[n]);
  const srcPos = [];
  const srcOff = [];
  for (let i = 0; i < n; i++) for (const [j, off] of source[i]) { srcPos.push(rowPtr[i] + pattern[i].indexOf(j)); srcOff.push(off); }
  const sp = Int32Array.from(srcPos);
  const so = Int32Array.from(srcOff);
  const w = new Float64Array(n);
  const y = new Float64Array(n);
  const values = new Float64Array(ws.matrix);
  const b = ws.rhs;
  const x = new Float64Array(n + 1);
  const run = () => {
    val.fill(0);
    for (let t = 0; t < sp.length; t++) val[sp[t]] += values[so[t]];
    for (let i = 0; i < n; i++) {
      const r0 = rowPtr[i];
      const r1 = rowPtr[i + 1];
      for (let p = r0; p < r1; p++) w[colIdx[p]] = val[p];
      for (let p = r0; p < diagAt[i]; p++) {
        const k = colIdx[p];
        const l = w[k] / val[diagAt[k]];
        w[k] = l;
        for (let q = diagAt[k] + 1; q < rowPtr[k + 1]; q++) w[colIdx[q]] -= l * val[q];
      }
      for (let p = r0; p < r1; p++) val[p] = w[colIdx[p]];
    }
    for (let i = 0; i < n; i++) {
      let s = b[prow[i]];
      for (let p = rowPtr[i]; p < diagAt[i]; p++) s -= val[p] * y[colIdx[p]];
      y[i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = y[i];
      for (let p = diagAt[i] + 1; p < rowPtr[i + 1]; p++) s -= val[p] * y[colIdx[p]];
      y[i] = s / val[diagAt[i]];
    }
    for (let k = 0; k < n; k++) x[order[k]] = y[k];
  };
  run();
  return { run, x, fill: rowPtr[n] };
}


/** Least-squares slope of log(y) on log(x) over points [x, y]: a growth exponent. */
export function logSlope(points) {
  const lx = points.map((p) => Math.log(p[0]));
  const ly = points.map((p) => Math.log(p[1]));
  const mx = lx.reduce((s, v) => s + v, 0) / lx.length;
  const my = ly.reduce((s, v) => s + v, 0) / ly.length;
  let num = 0;
  let den = 0;
  for (let i = 0; i < lx.length; i++) {
    num += (lx[i] - mx) * (ly[i] - my);
    den += (lx[i] - mx) ** 2;
  }
  return num / den;
}
