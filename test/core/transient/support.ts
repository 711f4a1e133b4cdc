/**
 * Shared plumbing for the transient tests: compile a netlist, run the
 * stepper, read unknowns out of the trace, and load the ODEX reference
 * solver (Hairer and Wanner's extrapolation code, npm package odex).
 */
import { createRequire } from 'node:module';
import { parseNetlist, prepare, type CompiledCircuit } from '@railcheck/core';
import { runTransient, type TransientOptions, type TransientStats, type TransientTrace } from '@railcheck/core/internal';

/** Compiles netlist text, throwing on any error (a test bug, not a finding). */
export function compile(text: string): CompiledCircuit {
  const p = prepare(parseNetlist(text));
  if (!p.ok) throw new Error(`netlist did not compile: ${JSON.stringify(p.errors)}`);
  return p.compiled;
}

/** A successful run (throws with the reason otherwise). */
export function run(c: CompiledCircuit, opts: TransientOptions): { trace: TransientTrace; stats: TransientStats } {
  const r = runTransient(c, opts);
  if (!r.ok) throw new Error(`transient failed: ${r.reason} at t = ${r.time}`);
  return { trace: r.trace, stats: r.stats };
}

/** Unknown index of node `name` (case-insensitive). */
export function node(c: CompiledCircuit, name: string): number {
  const i = c.nodeIndex.get(name.toLowerCase());
  if (i === undefined) throw new Error(`no node ${name}`);
  return i;
}

/** Unknown index of the branch current of element `name` (a V source or an inductor). */
export function branch(c: CompiledCircuit, name: string): number {
  const d = c.deviceByKey.get(name.toLowerCase());
  const i = d !== undefined && 'branchIndex' in d && typeof d.branchIndex === 'number' ? d.branchIndex : -1;
  if (i <= 0 || c.unknowns[i]?.kind !== 'branch') throw new Error(`no branch ${name}`);
  return i;
}

/** Value of unknown `index` at accepted point `k`. */
export function at(trace: TransientTrace, k: number, index: number): number {
  return trace.values[k * trace.size + index]!;
}

/** Accepted times as a plain array. */
export function times(trace: TransientTrace): number[] {
  return Array.from(trace.times.subarray(0, trace.count));
}

/** Largest |engine − reference(t)| over the accepted points with t ≥ from. */
export function maxError(trace: TransientTrace, index: number, reference: (t: number) => number, from = 0): number {
  let worst = 0;
  for (let k = 0; k < trace.count; k++) {
    const t = trace.times[k]!;
    if (t < from) continue;
    worst = Math.max(worst, Math.abs(at(trace, k, index) - reference(t)));
  }
  return worst;
}

/** Linear interpolation of unknown `index` between accepted points (for a time that is not one of them). */
export function interpolate(trace: TransientTrace, index: number, t: number): number {
  let lo = 0;
  let hi = trace.count - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (trace.times[mid]! <= t) lo = mid;
    else hi = mid;
  }
  const t0 = trace.times[lo]!;
  const t1 = trace.times[hi]!;
  const v0 = at(trace, lo, index);
  const v1 = at(trace, hi, index);
  return t1 > t0 ? v0 + ((v1 - v0) * (t - t0)) / (t1 - t0) : v0;
}

/** The slice of ODEX's Solver these tests use (odex ships TypeScript source only, not declarations). */
export interface OdexSolver {
  absoluteTolerance: number | number[];
  relativeTolerance: number | number[];
  maxSteps: number;
  maxStepSize: number;
  initialStepSize: number;
  denseOutput: boolean;
  solve(
    f: (x: number, y: number[]) => number[],
    x0: number,
    y0: number[],
    xEnd: number,
    out?: (n: number, xOld: number, x: number, y: number[], dense?: (i: number, x: number) => number) => boolean | void,
  ): { y: number[]; outcome: number; nStep: number; nAccept: number; nReject: number };
}

// Loaded through require so that the compiler does not type-check odex's own TypeScript source under our strict flags.
const requireCjs = createRequire(import.meta.url);
const odex = requireCjs('odex') as { Solver: new (n: number) => OdexSolver };

/** A new ODEX solver for `n` equations. */
export function odexSolver(n: number): OdexSolver {
  return new odex.Solver(n);
}

/**
 * Samples an ODEX solution at `grid` (ascending, first ≥ x0) with its dense
 * output (Hairer, Nørsett and Wanner, Solving ODEs I, §II.9).
 */
export function odexOnGrid(s: OdexSolver, f: (x: number, y: number[]) => number[], x0: number, y0: number[], grid: readonly number[]): number[][] {
  s.denseOutput = true;
  const out: number[][] = [];
  let g = 0;
  const res = s.solve(f, x0, y0, grid[grid.length - 1]!, (_n, xOld, x, y, dense) => {
    while (g < grid.length && grid[g]! <= x) {
      const tg = grid[g]!;
      out.push(tg === x || dense === undefined || x === xOld ? [...y] : y.map((_, i) => dense(i, tg)));
      g++;
    }
  });
  if (res.outcome !== 0) throw new Error(`odex did not converge (outcome ${res.outcome})`);
  return out;
}

/**
 * Brute force for periodic steady state: `cycles` whole periods of a plain
 * transient from the operating point, every boundary landed on; hands each
 * accepted point of the last period (time in s, solution vector) to `onPoint`.
 */
export function lastCycleOfBruteForce(c: CompiledCircuit, period: number, cycles: number, onPoint: (t: number, x: Float64Array) => void): void {
  const tEnd = cycles * period;
  const r = runTransient(c, {
    tstep: period / 50, tstop: tEnd, stepsPerCycle: 200, keepTrace: false,
    extraBreakpoints: Array.from({ length: cycles }, (_, k) => (k + 1) * period),
    onAccept: (t, ctx) => {
      if (t >= tEnd - period * (1 + 1e-9)) onPoint(t, ctx.x);
    },
  });
  if (!r.ok) throw new Error(`brute-force transient failed: ${r.reason} at t = ${r.time}`);
}
