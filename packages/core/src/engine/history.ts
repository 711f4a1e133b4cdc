/**
 * Accepted-solution history for the transient step controller: the last
 * few accepted time points and their solution vectors, in preallocated
 * buffers rotated by reference (no allocation per step), and the local
 * truncation error estimate from divided differences over them.
 *
 * LTE forms (Gear, Numerical Initial Value Problems in ODEs, 1971, ch. 9;
 * Hairer, Nørsett and Wanner, Solving ODEs I, §III.7): backward Euler
 * LTE ≈ (h²/2)·x'', trapezoidal LTE ≈ (h³/12)·x''', with the derivatives
 * estimated as k!·(k-th divided difference).
 */

/** Ring of the last `depth` accepted solutions plus a candidate. */
export class SolutionHistory {
  /** points[0] is the newest accepted solution; points[depth] holds the candidate. */
  private readonly points: Float64Array[];
  private readonly times: Float64Array;
  /** Accepted points since the last reset (capped at depth). */
  count = 0;

  constructor(
    private readonly size: number,
    private readonly depth: number,
  ) {
    this.points = Array.from({ length: depth + 1 }, () => new Float64Array(size));
    this.times = new Float64Array(depth + 1);
  }

  /** Forgets everything and starts from (t, x): after a breakpoint derivatives jump. */
  reset(t: number, x: Float64Array): void {
    this.points[0]!.set(x);
    this.times[0] = t;
    this.count = 1;
  }

  /** Makes the candidate (t, x) the newest accepted point. */
  accept(t: number, x: Float64Array): void {
    const last = this.points[this.depth]!;
    for (let k = this.depth; k > 0; k--) {
      this.points[k] = this.points[k - 1]!;
      this.times[k] = this.times[k - 1]!;
    }
    this.points[0] = last;
    last.set(x);
    this.times[0] = t;
    if (this.count < this.depth) this.count++;
  }

  /** Time of the newest accepted point. */
  get lastTime(): number {
    return this.times[0]!;
  }

  /** The newest accepted solution. */
  get last(): Float64Array {
    return this.points[0]!;
  }

  /**
   * The predictor of a step's first Newton iterate: the polynomial through
   * the newest accepted points (Lagrange's quadratic through three, the
   * straight line through two), extrapolated to `t`, written into `out`
   * (the explicit extrapolation of a predictor-corrector pair; Gear,
   * Numerical Initial Value Problems in ODEs, 1971, ch. 9, from memory).
   * False, and `out` untouched, with fewer than two points since the last
   * reset. It moves only Newton's starting point: the solution is the one
   * the corrector converges to, within the Newton tolerances.
   */
  predict(t: number, out: Float64Array): boolean {
    if (this.count < 2) return false;
    const t0 = this.times[0]!;
    const dt = t0 - this.times[1]!;
    if (!(dt > 0)) return false;
    const p0 = this.points[0]!;
    const p1 = this.points[1]!;
    if (this.count >= 3) {
      // Lagrange's quadratic through the three newest points.
      const t1 = this.times[1]!;
      const t2 = this.times[2]!;
      const p2 = this.points[2]!;
      const l0 = ((t - t1) * (t - t2)) / ((t0 - t1) * (t0 - t2));
      const l1 = ((t - t0) * (t - t2)) / ((t1 - t0) * (t1 - t2));
      const l2 = ((t - t0) * (t - t1)) / ((t2 - t0) * (t2 - t1));
      if (Number.isFinite(l0 + l1 + l2)) {
        for (let k = 1; k < this.size; k++) out[k] = l0 * p0[k]! + l1 * p1[k]! + l2 * p2[k]!;
        return true;
      }
    }
    const s = (t - t0) / dt;
    for (let k = 1; k < this.size; k++) out[k] = p0[k]! + s * (p0[k]! - p1[k]!);
    return true;
  }

  /**
   * Largest ratio LTE / tolerance over unknowns 1..n where `isVoltage`, for
   * a candidate (t, x) solved with a method of `order` (1 or 2); tolerance
   * reltol·max(|x|, |x_prev|) + abstol. Returns 0 with a single point of
   * history; with two, the first-order estimate is used whatever `order`.
   */
  errorRatio(t: number, x: Float64Array, order: 1 | 2, isVoltage: Uint8Array, reltol: number, abstol: number): number {
    if (this.count < 2) return 0;
    // With too little history for the method's order, the first-order estimate stands in (it is larger).
    if (this.count < order + 1) order = 1;
    const p0 = this.points[0]!;
    const p1 = this.points[1]!;
    const t0 = this.times[0]!;
    const t1 = this.times[1]!;
    const h = t - t0;
    let worst = 0;
    for (let i = 1; i < this.size; i++) {
      if (isVoltage[i] === 0) continue;
      const d10 = (x[i]! - p0[i]!) / h;
      const d01 = (p0[i]! - p1[i]!) / (t0 - t1);
      const dd2 = (d10 - d01) / (t - t1);
      let lte: number;
      if (order === 1) {
        lte = Math.abs(h * h * dd2);
      } else {
        const p2 = this.points[2]!;
        const t2 = this.times[2]!;
        const d12 = (p1[i]! - p2[i]!) / (t1 - t2);
        const dd2b = (d01 - d12) / (t0 - t2);
        const dd3 = (dd2 - dd2b) / (t - t2);
        lte = Math.abs((h * h * h * dd3) / 2);
      }
      const tol = reltol * Math.max(Math.abs(x[i]!), Math.abs(p0[i]!)) + abstol;
      const r = lte / tol;
      if (r > worst) worst = r;
    }
    return worst;
  }
}
