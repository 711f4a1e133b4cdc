/**
 * Newton-Raphson iteration on the MNA equations (Nagel, UCB/ERL
 * M520, 1975, ch. 4): load every device linearised at the present iterate,
 * factor, solve for the next iterate, test convergence on every unknown.
 * Devices limit their junction voltages themselves (they set
 * `ctx.limited`); an iterate that was limited is never taken as converged.
 * An iterate whose update passed the test is taken as the solution only
 * when the equations hold there too: the devices are loaded at it (the load
 * the next iteration needs anyway) and the residual A·x − rhs, which for
 * the companion form is the KCL imbalance of every node and the residual of
 * every branch equation, must be small against the currents (or voltages)
 * that meet in each row ({@link residualSettled}). The loop allocates
 * nothing.
 */
import { clearStamps, factorMatrix, solveMatrix } from './workspace.js';
import type { CompiledCircuit } from './compile.js';
import { ENGINE_COUNTS } from './counters.js';

/** Convergence tolerances and iteration limit. */
export interface NewtonOptions {
  /** Relative tolerance on every unknown (default 1e-6). */
  readonly reltol: number;
  /** Absolute tolerance on node voltages, volts (default 1e-9 V). */
  readonly vntol: number;
  /** Absolute tolerance on branch currents, amps (default 1e-12 A). */
  readonly abstol: number;
  /** Iteration limit for one solve (default 200). */
  readonly maxIterations: number;
  /**
   * Residual test at the final iterate, relative to the largest term of each
   * row (default {@link RESIDUAL_RELTOL}); the absolute floors are `abstol`
   * for KCL rows and `vntol` for branch rows.
   */
  readonly residualReltol?: number;
  /**
   * Take the first update as converged when it passes the update test
   * (default false: the first update never counts, since the starting
   * point is a guess). For a start known to be within the tolerances of
   * the solution already, such as a perturbed run guided by the solutions
   * of the unperturbed one (TransientOptions.replayGuide): Newton's error
   * after an update is of the order of the square of the update, and the
   * residual test at the new iterate still decides.
   */
  readonly firstUpdateSettles?: boolean;
  /**
   * Also take an iterate as converged when its update failed the update
   * test but the contraction of the last two updates says the iterate itself
   * is within the tolerances (default false). With r_k the largest update
   * of iteration k relative to each unknown's tolerance and Θ = r_k / r_(k−1)
   * < 1, the error left in the new iterate is estimated as Θ/(1 − Θ)·r_k
   * tolerances (Deuflhard, Newton Methods for Nonlinear Problems, 2004,
   * §1.1 and §2.1; Hairer and Wanner, Solving ODE II, §IV.8, the stopping
   * rule η_k·‖Δ_k‖ ≤ κ·Tol with η_k = Θ_k/(1 − Θ_k); both from memory);
   * it is accepted when that is at most 1. For quadratic convergence the
   * error is about Θ²·r_k, so the estimate is on the safe side. Only from
   * the second update on, only when neither of the two loads was limited,
   * and the residual test at the new iterate still decides. The transient
   * stepper sets it (its Newton tolerance is 1e-3 of the truncation-error
   * tolerance, so κ = 1 here is κ = 1e-3 against the integration's; the
   * reference recommends 1e-1 to 1e-2); DC solves do not.
   */
  readonly contractionSettles?: boolean;
}

/**
 * Default relative tolerance of the residual test: the customary relative
 * tolerance of circuit simulators' per-device current test (Nagel 1975,
 * reltol 1e-3), applied to the whole KCL row. Newton converges
 * quadratically, so a true solution passes it by many orders; it refuses
 * iterates that stopped moving without solving the equations.
 */
export const RESIDUAL_RELTOL = 1e-3;

/**
 * Defaults. They are tighter than the customary circuit-simulator values
 * (reltol 1e-3, vntol 1 µV, abstol 1 pA; Nagel 1975) because supply figures
 * are small differences of large voltages: a line regulation of 1 mV/V on a
 * 12 V rail must not drown in a 12 mV tolerance. Newton converges
 * quadratically near the solution, so the tighter test costs one or two
 * iterations.
 */
export const DEFAULT_NEWTON: NewtonOptions = { reltol: 1e-6, vntol: 1e-9, abstol: 1e-12, maxIterations: 200 };

/** Outcome of one Newton solve. */
export type NewtonResult =
  | { readonly converged: true; readonly iterations: number }
  | {
      readonly converged: false;
      readonly reason: 'singular' | 'iterations' | 'non-finite';
      readonly iterations: number;
      /** For 'singular': the unknown without a pivot. For the others: the unknown that moved most, relative to its tolerance. */
      readonly worst: number;
      /** Largest update relative to its tolerance in the last iteration (1 = just at tolerance). */
      readonly lastRatio: number;
    };

/** Loads every device at `ws.x` into the matrix and right-hand side, both cleared first ({@link clearStamps}: the whole dense matrix, or the sparse path's stamped entries). */
export function loadAll(c: CompiledCircuit): void {
  const { ws, devices } = c;
  clearStamps(ws);
  ws.rhs.fill(0);
  ws.ctx.limited = false;
  for (let i = 0; i < devices.length; i++) devices[i]!.load(ws.ctx);
}

/**
 * True when, for every row i of the system loaded at `ws.x`, the residual
 * |Σj A_ij·x_j − rhs_i| is at most reltol·(largest |A_ij·x_j| or |rhs_i|) +
 * floor, the floor being `abstol` (A) for a KCL row and `vntol` (V) for a
 * branch row. For the companion form this residual is the KCL imbalance at
 * the node (Nagel 1975, ch. 4). Allocates nothing; the matrix must not yet
 * be factored. Walks the stamped entries only (workspace.ts, `StampList`).
 */
export function residualSettled(c: CompiledCircuit, opts: NewtonOptions): boolean {
  const { ws, unknowns } = c;
  const a = ws.matrix;
  const { x, rhs, size } = ws;
  const { cols, offsets, rowStart } = ws.stamps;
  const rel = opts.residualReltol ?? RESIDUAL_RELTOL;
  for (let i = 1; i < size; i++) {
    const b = rhs[i]!;
    let sum = -b;
    let scale = Math.abs(b);
    // The stamped entries of row i in column order: the dense row's sum without its structural zeros.
    for (let k = rowStart[i]!; k < rowStart[i + 1]!; k++) {
      const term = a[offsets[k]!]! * x[cols[k]!]!;
      sum += term;
      const m = Math.abs(term);
      if (m > scale) scale = m;
    }
    const floor = unknowns[i]!.kind === 'branch' ? opts.vntol : opts.abstol;
    if (!(Math.abs(sum) <= rel * scale + floor)) return false;
  }
  return true;
}

/**
 * Iterates from the present `ws.x` until every unknown changes by less than
 * reltol·|x| + (vntol or abstol), or with {@link NewtonOptions.contractionSettles}
 * the contraction estimate puts the new iterate within those tolerances,
 * and the equations hold at the new iterate ({@link residualSettled}). On success `ws.x` holds the solution and the
 * devices' state was last loaded at it.
 */
export function newtonSolve(c: CompiledCircuit, opts: NewtonOptions = DEFAULT_NEWTON): NewtonResult {
  const r = newtonIterate(c, opts);
  if (c.ws.ctx.mode === 'tran') {
    ENGINE_COUNTS.tranSolves++;
    ENGINE_COUNTS.tranIterations += r.iterations;
  } else {
    ENGINE_COUNTS.dcSolves++;
    ENGINE_COUNTS.dcIterations += r.iterations;
  }
  return r;
}

function newtonIterate(c: CompiledCircuit, opts: NewtonOptions): NewtonResult {
  const { ws, unknowns } = c;
  const { x, xNext, ctx } = ws;
  const n = ws.unknowns;
  let worst = 0;
  let lastRatio = Number.POSITIVE_INFINITY;
  // The last update passed the update test (or the contraction test): the load at the new iterate decides.
  let settled = false;
  // Whether the load of the last iteration was limited (its update is then no Newton update).
  let lastLimited = true;
  for (let iter = 1; iter <= opts.maxIterations + 1; iter++) {
    loadAll(c);
    ctx.initJunctions = false;
    if (settled && !ctx.limited && residualSettled(c, opts)) return { converged: true, iterations: iter - 1 };
    if (iter > opts.maxIterations) break;
    const singular = factorMatrix(ws);
    if (singular !== 0) return { converged: false, reason: 'singular', iterations: iter, worst: singular, lastRatio };
    solveMatrix(ws, ws.rhs, xNext);
    let ratio = 0;
    worst = 0;
    for (let i = 1; i <= n; i++) {
      const next = xNext[i]!;
      if (!Number.isFinite(next)) return { converged: false, reason: 'non-finite', iterations: iter, worst: i, lastRatio };
      const prev = x[i]!;
      const tol = opts.reltol * Math.max(Math.abs(next), Math.abs(prev)) + (unknowns[i]!.kind === 'branch' ? opts.abstol : opts.vntol);
      const r = Math.abs(next - prev) / tol;
      if (r > ratio) {
        ratio = r;
        worst = i;
      }
    }
    x.set(xNext);
    // Contraction of the last two updates; only between two updates from unlimited loads.
    const theta = lastLimited ? 1 : ratio / lastRatio;
    const contracted = opts.contractionSettles === true && iter > 1 && theta < 1 && (theta / (1 - theta)) * ratio <= 1;
    lastRatio = ratio;
    lastLimited = ctx.limited;
    settled = (ratio <= 1 || contracted) && !ctx.limited && (iter > 1 || opts.firstUpdateSettles === true);
  }
  return { converged: false, reason: 'iterations', iterations: opts.maxIterations, worst, lastRatio };
}
