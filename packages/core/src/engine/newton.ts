/**
 * Newton-Raphson iteration on the MNA equations (Nagel, UCB/ERL
 * M520, 1975, ch. 4): load every device linearised at the present iterate,
 * factor, solve for the next iterate, test convergence on every unknown.
 * Devices limit their junction voltages themselves (they set
 * `ctx.limited`); an iterate that was limited is never taken as converged.
 * The loop allocates nothing.
 */
import { luFactor, luSolve } from './lu.js';
import type { CompiledCircuit } from './compile.js';

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
}

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

/** Loads every device at `ws.x` into the matrix and right-hand side. */
export function loadAll(c: CompiledCircuit): void {
  const { ws, devices } = c;
  ws.lu.matrix.fill(0);
  ws.rhs.fill(0);
  ws.ctx.limited = false;
  for (let i = 0; i < devices.length; i++) devices[i]!.load(ws.ctx);
}

/**
 * Iterates from the present `ws.x` until every unknown changes by less than
 * reltol·|x| + (vntol or abstol). On success `ws.x` holds the solution.
 */
export function newtonSolve(c: CompiledCircuit, opts: NewtonOptions = DEFAULT_NEWTON): NewtonResult {
  const { ws, unknowns } = c;
  const { x, xNext, ctx } = ws;
  const n = ws.unknowns;
  let worst = 0;
  let lastRatio = Number.POSITIVE_INFINITY;
  for (let iter = 1; iter <= opts.maxIterations; iter++) {
    loadAll(c);
    ctx.initJunctions = false;
    const singular = luFactor(ws.lu);
    if (singular !== 0) return { converged: false, reason: 'singular', iterations: iter, worst: singular, lastRatio };
    luSolve(ws.lu, ws.rhs, xNext);
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
    lastRatio = ratio;
    if (ratio <= 1 && !ctx.limited && iter > 1) return { converged: true, iterations: iter };
  }
  return { converged: false, reason: 'iterations', iterations: opts.maxIterations, worst, lastRatio };
}
