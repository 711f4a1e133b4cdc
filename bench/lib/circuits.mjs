// Circuits of the speed benchmarks (bench/run.mjs and the scripts beside it):
// netlist generators and the step that brings a compiled circuit to a
// transient matrix to time Newton iterations on. Invented circuits, for
// benchmarks only.
import { readFileSync } from 'node:fs';
import { parseNetlist, prepare } from '@railcheck/core';
import { DEFAULT_NEWTON, factorMatrix, loadAll, runTransient, solveMatrix } from '@railcheck/core/internal';

/**
 * A diode-clamped RC ladder with `unknowns` unknowns: a 5 V source at node
 * n1, then n1 –1 kΩ– n2 –1 kΩ– … with 1 nF and a clamp diode (no series
 * resistance, so no internal node) from every node to ground. Nodes are
 * unknowns − 1 (the source's branch current is the last unknown).
 */
export function ladderNetlist(unknowns) {
  const nodes = unknowns - 1;
  const lines = [`diode-clamped RC ladder, ${unknowns} unknowns`, 'V1 n1 0 sin(2 3 1k)'];
  for (let k = 1; k <= nodes; k++) {
    if (k < nodes) lines.push(`R${k} n${k} n${k + 1} 1k`);
    lines.push(`C${k} n${k} 0 1n`, `D${k} n${k} 0 DCLAMP`);
  }
  lines.push('.model DCLAMP D (IS=1e-14 N=1 CJO=2p)', '.end', '');
  return lines.join('\n');
}

/**
 * A two-dimensional resistor-diode mesh of side `side`: side² nodes, 1 kΩ
 * between horizontal and vertical neighbours, a diode and 1 nF from every
 * node to ground, a source at one corner; side² + 1 unknowns.
 */
export function meshNetlist(side) {
  const id = (i, j) => `m${i}_${j}`;
  const lines = [`resistor-diode mesh ${side}×${side}`, `V1 ${id(0, 0)} 0 sin(2 3 1k)`];
  let r = 0;
  for (let i = 0; i < side; i++) {
    for (let j = 0; j < side; j++) {
      if (j + 1 < side) lines.push(`R${++r} ${id(i, j)} ${id(i, j + 1)} 1k`);
      if (i + 1 < side) lines.push(`R${++r} ${id(i, j)} ${id(i + 1, j)} 1k`);
      lines.push(`C${i}_${j} ${id(i, j)} 0 1n`, `D${i}_${j} ${id(i, j)} 0 DCLAMP`);
    }
  }
  lines.push('.model DCLAMP D (IS=1e-14 N=1 CJO=2p)', '.end', '');
  return lines.join('\n');
}

/** The netlist text of a file under bench/cases/ or examples/ (path from the repository root). */
export function readCase(root, path) {
  return readFileSync(new URL(path, root), 'utf8');
}

/** Parses and compiles a netlist; throws with the first diagnostic when it does not compile. */
export function compiled(text) {
  const p = prepare(parseNetlist(text));
  if (!p.ok) throw new Error(`benchmark netlist does not compile: ${p.errors?.[0]?.message ?? 'unknown'}`);
  return p.compiled;
}

/**
 * Runs the circuit's transient until `until` seconds and stops there, so
 * that the workspace holds a transient state (charges, junction memory)
 * and the load context the coefficients of a trapezoidal step of `h`
 * seconds: what one Newton iteration of a time step loads and solves.
 */
export function toTransientMatrix(c, until, h) {
  const r = runTransient(c, { tstep: h, tstop: until * 2, keepTrace: false, onAccept: (t) => t >= until });
  if (!r.ok) throw new Error(`benchmark transient failed: ${r.reason}`);
  const ctx = c.ws.ctx;
  ctx.mode = 'tran';
  ctx.coefficients.a0 = 2 / h;
  ctx.coefficients.a1 = -1;
  ctx.time = until + h;
  return c;
}

/**
 * One Newton iteration as engine/newton.ts runs it, on the circuit as it
 * stands and without moving the iterate (so every repetition does the same
 * work): load every device, factor (`factor`, default the workspace's own
 * solver), solve, the update test on every unknown. Returns the largest
 * update relative to its tolerance.
 */
export function newtonIteration(c, opts = DEFAULT_NEWTON, factor = factorMatrix) {
  const { ws, unknowns } = c;
  const { x, xNext } = ws;
  loadAll(c);
  ws.ctx.initJunctions = false;
  if (factor(ws) !== 0) throw new Error('singular');
  solveMatrix(ws, ws.rhs, xNext);
  let ratio = 0;
  for (let i = 1; i <= ws.unknowns; i++) {
    const next = xNext[i];
    if (!Number.isFinite(next)) throw new Error('non-finite');
    const prev = x[i];
    const tol = opts.reltol * Math.max(Math.abs(next), Math.abs(prev)) + (unknowns[i].kind === 'branch' ? opts.abstol : opts.vntol);
    const r = Math.abs(next - prev) / tol;
    if (r > ratio) ratio = r;
  }
  return ratio;
}
