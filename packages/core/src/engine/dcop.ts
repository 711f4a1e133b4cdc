/**
 * DC operating point: plain Newton first; if that fails, gmin stepping, then
 * source stepping (both as in Nagel 1975 and the homotopy survey of
 * Roychowdhury and Melville, IEEE TCAD 25(12), 2006). The result says which
 * way the point was found. A final gmin of {@link FINAL_GMIN} stays across
 * every junction in the solution (models.md allows at most 1e-12 S).
 */
import { TNOM, ZERO_CELSIUS } from '@railcheck/devices';
import type { CompiledCircuit } from './compile.js';
import { DEFAULT_NEWTON, loadAll, newtonSolve, type NewtonOptions, type NewtonResult } from './newton.js';
import { factorMatrix, solveMatrix } from './workspace.js';

/** Junction conductance kept in every final solution, siemens. */
export const FINAL_GMIN = 1e-12;

/** gmin stepping starts here, siemens, and divides by ten per step (Nagel 1975 practice). */
const GMIN_START = 1e-2;

/** Source stepping: the smallest fraction of a step tried before giving up. */
const MIN_SOURCE_STEP = 1e-6;

/**
 * How an operating point was reached: plain Newton from the starting point
 * (zero with junctions at their critical voltages, or the given solution
 * with `warmStart`); gmin stepping; source stepping; or, when both steppings
 * failed, plain Newton at full sources from the last point source stepping
 * reached.
 */
export type OpMethod = 'newton' | 'gmin-stepping' | 'source-stepping' | 'newton-after-stepping';

/** One unknown that failed to settle, for diagnostics. */
export interface Straggler {
  /** Node or branch name. */
  readonly name: string;
  /** Value at the last iterate (V or A). */
  readonly value: number;
  /** Last Newton update (V or A). */
  readonly update: number;
  /** KCL residual (A) for a node, or branch-equation residual (V) for a branch. */
  readonly residual: number;
}

/** Outcome of an operating-point search. */
export type OpOutcome =
  | { readonly ok: true; readonly method: OpMethod; readonly iterations: number }
  | { readonly ok: false; readonly reason: 'singular' | 'iterations' | 'non-finite'; readonly iterations: number; readonly stragglers: readonly Straggler[]; readonly singularAt: string | undefined };

/** Sets every device to `celsius`. */
export function setCircuitTemperature(c: CompiledCircuit, celsius: number): void {
  const kelvin = celsius + ZERO_CELSIUS;
  for (const d of c.devices) d.setTemperature(Number.isFinite(kelvin) ? kelvin : TNOM);
}

/** Worst-settling unknowns at the present iterate: residuals and updates (not for the hot loop). */
export function stragglers(c: CompiledCircuit, count = 3): Straggler[] {
  const { ws, unknowns } = c;
  const n = ws.unknowns;
  loadAll(c);
  const s = ws.size;
  const a = ws.matrix;
  const { cols, offsets, rowStart } = ws.stamps;
  const residual = new Float64Array(s);
  for (let i = 1; i <= n; i++) {
    let sum = -ws.rhs[i]!;
    for (let k = rowStart[i]!; k < rowStart[i + 1]!; k++) sum += a[offsets[k]!]! * ws.x[cols[k]!]!;
    residual[i] = sum;
  }
  const update = new Float64Array(s);
  if (factorMatrix(ws) === 0) {
    solveMatrix(ws, ws.rhs, update);
    for (let i = 1; i <= n; i++) update[i] = update[i]! - ws.x[i]!;
  }
  const rows = Array.from({ length: n }, (_, k) => k + 1).map((i) => ({
    name: unknowns[i]!.kind === 'node' ? `V(${unknowns[i]!.name})` : unknowns[i]!.kind === 'branch' ? `I(${unknowns[i]!.name})` : `V(${unknowns[i]!.name})`,
    value: ws.x[i]!,
    update: update[i]!,
    residual: residual[i]!,
  }));
  const score = (r: Straggler): number => (Number.isFinite(r.update) ? Math.abs(r.update) : Infinity) + (Number.isFinite(r.residual) ? Math.abs(r.residual) : Infinity);
  return rows.sort((p, q) => score(q) - score(p)).slice(0, count);
}

function failure(c: CompiledCircuit, r: Extract<NewtonResult, { converged: false }>, iterations: number): OpOutcome {
  return {
    ok: false,
    reason: r.reason,
    iterations,
    stragglers: stragglers(c),
    singularAt: r.reason === 'singular' ? c.unknowns[r.worst]?.name : undefined,
  };
}

function gminStepping(c: CompiledCircuit, opts: NewtonOptions): { ok: boolean; iterations: number } {
  const { ctx, x } = c.ws;
  let iterations = 0;
  x.fill(0);
  ctx.initJunctions = true;
  ctx.sourceScale = 1;
  const saved = new Float64Array(x.length);
  let gmin = GMIN_START;
  let factor = 10;
  for (let tries = 0; tries < 200; tries++) {
    ctx.gmin = Math.max(gmin, FINAL_GMIN);
    const r = newtonSolve(c, opts);
    iterations += r.iterations;
    if (r.converged) {
      if (ctx.gmin === FINAL_GMIN) return { ok: true, iterations };
      saved.set(x);
      gmin /= factor;
    } else {
      if (gmin === GMIN_START || factor < 1.01) return { ok: false, iterations };
      x.set(saved);
      gmin *= factor;
      factor = Math.sqrt(factor);
      gmin /= factor;
    }
  }
  return { ok: false, iterations };
}

function sourceStepping(c: CompiledCircuit, opts: NewtonOptions): { ok: boolean; iterations: number } {
  const { ctx, x } = c.ws;
  let iterations = 0;
  x.fill(0);
  ctx.gmin = FINAL_GMIN;
  ctx.initJunctions = true;
  const saved = new Float64Array(x.length);
  let scale = 0;
  let step = 0.1;
  while (step >= MIN_SOURCE_STEP) {
    const target = Math.min(1, scale + step);
    ctx.sourceScale = target;
    const r = newtonSolve(c, opts);
    iterations += r.iterations;
    if (r.converged) {
      saved.set(x);
      scale = target;
      if (scale >= 1) return { ok: true, iterations };
      step = Math.min(step * 2, 0.5);
    } else {
      x.set(saved);
      step /= 4;
    }
  }
  ctx.sourceScale = 1;
  return { ok: false, iterations };
}

/**
 * Finds the DC operating point. With `warmStart` the present `ws.x` is the
 * first guess (continuation in sweeps); otherwise Newton starts from zero
 * with junctions at their critical voltages.
 */
export function solveOperatingPoint(c: CompiledCircuit, warmStart = false, opts: NewtonOptions = DEFAULT_NEWTON): OpOutcome {
  const { ctx, x } = c.ws;
  ctx.mode = 'dc';
  ctx.time = 0;
  ctx.sourceScale = 1;
  ctx.gmin = FINAL_GMIN;
  if (!warmStart) x.fill(0);
  ctx.initJunctions = !warmStart;
  const first = newtonSolve(c, opts);
  if (first.converged) return { ok: true, method: 'newton', iterations: first.iterations };
  let iterations = first.iterations;
  if (first.reason === 'singular') return failure(c, first, iterations);
  const g = gminStepping(c, opts);
  iterations += g.iterations;
  if (g.ok) return { ok: true, method: 'gmin-stepping', iterations };
  const s = sourceStepping(c, opts);
  iterations += s.iterations;
  ctx.sourceScale = 1;
  ctx.gmin = FINAL_GMIN;
  if (s.ok) return { ok: true, method: 'source-stepping', iterations };
  // Source stepping leaves the last scale it reached in x: one more try at full sources from there.
  const last = newtonSolve(c, opts);
  if (last.converged) return { ok: true, method: 'newton-after-stepping', iterations: iterations + last.iterations };
  return failure(c, last, iterations + last.iterations);
}
