// The sparse LU path (engine/sparse-lu.ts) against the dense one, on
// diode-clamped RC ladders (node k –R– node k+1, C and a diode from each node
// to ground, a source at one end) and a 2-D resistor-diode mesh (a diode from
// every node to ground, a source at one corner). Prints, per circuit, the time
// of one Newton iteration at the DC operating point (device loading, clearing,
// factor, solve, update test) on each path, as ratios within one run: the
// dense path over the sparse one (where the sparse path pays: the threshold),
// the sparse path over a bare sparse LU written here (the same pattern, the
// same column ordering and the same pivot rows, factor and solve only, no
// checks), and the growth slopes of the sparse iteration with n.
// Not a test (no timed tests). Run after `npx -y pnpm@10.34.9 build`:
//   node bench/sparse-threshold.mjs [SCALE]   (SCALE multiplies the repetitions, default 1)
import { performance } from 'node:perf_hooks';
import { readFileSync } from 'node:fs';
import { parseNetlist, prepare } from '@railcheck/core';
import { bareSparse, logSlope } from './lib/floors.mjs';
import { SOLVER_PATH, solveOperatingPoint, newtonSolve, DEFAULT_NEWTON, loadAll, denseOf, createLuWorkspace, luFactor, luSolve } from '@railcheck/core/internal';

const scale = Number(process.argv[2] ?? 1);

/** A ladder with `unknowns` unknowns: unknowns − 1 nodes and the source's branch. */
function ladder(unknowns) {
  const nodes = unknowns - 1;
  const lines = ['diode-clamped RC ladder', 'VS n1 0 5'];
  for (let k = 1; k <= nodes; k++) {
    if (k < nodes) lines.push(`R${k} n${k} n${k + 1} 100`);
    lines.push(`C${k} n${k} 0 1n`, `D${k} n${k} 0 DC`);
  }
  lines.push('.model DC D (IS=1e-14 N=1)', '.end');
  return lines.join('\n') + '\n';
}

/** A side × side mesh of resistors, a diode from each node to ground, the source at one corner (side² + 1 unknowns). */
function mesh(side) {
  const name = (i, j) => `m${i}_${j}`;
  const lines = ['resistor-diode mesh', `VS ${name(0, 0)} 0 5`];
  for (let i = 0; i < side; i++) {
    for (let j = 0; j < side; j++) {
      if (i + 1 < side) lines.push(`RV${i}_${j} ${name(i, j)} ${name(i + 1, j)} 100`);
      if (j + 1 < side) lines.push(`RH${i}_${j} ${name(i, j)} ${name(i, j + 1)} 100`);
      lines.push(`D${i}_${j} ${name(i, j)} 0 DC`);
    }
  }
  lines.push('.model DC D (IS=1e-14 N=1)', '.end');
  return lines.join('\n') + '\n';
}

function compiled(text, force) {
  SOLVER_PATH.force = force;
  const p = prepare(parseNetlist(text));
  SOLVER_PATH.force = undefined;
  if (!p.ok) throw new Error(p.errors[0]?.message);
  const op = solveOperatingPoint(p.compiled);
  if (!op.ok) throw new Error(`no operating point: ${op.reason}`);
  return p.compiled;
}

/** Median of `repeats` timings of `run`, each over `inner` calls, per call (µs). */
function timed(run, inner, repeats = 7) {
  const t = [];
  run();
  for (let r = 0; r < repeats; r++) {
    const t0 = performance.now();
    for (let k = 0; k < inner; k++) run();
    t.push(((performance.now() - t0) * 1000) / inner);
  }
  t.sort((a, b) => a - b);
  return t[Math.floor(t.length / 2)];
}

/** Time of one Newton iteration at the operating point: tolerances 0, so every one of `iters` iterations runs. */
function newtonIteration(c, inner) {
  const iters = 10;
  const opts = { ...DEFAULT_NEWTON, reltol: 0, vntol: 0, abstol: 0, maxIterations: iters };
  const start = new Float64Array(c.ws.x);
  return timed(() => {
    c.ws.x.set(start);
    newtonSolve(c, opts);
  }, inner) / iters;
}

/** The bare dense LU (factor and solve) of the same matrix, copied in each time. */
function bareDense(c) {
  const { ws } = c;
  const dense = denseOf(ws, ws.matrix);
  const lu = createLuWorkspace(ws.unknowns);
  const x = new Float64Array(ws.size);
  return () => {
    lu.matrix.set(dense);
    luFactor(lu);
    luSolve(lu, ws.rhs, x);
  };
}

function caseRow(kind, n, text) {
  n ??= compiled(text, 'sparse').ws.unknowns;
  const inner = Math.max(2, Math.round((scale * 20000) / n));
  const sparse = compiled(text, 'sparse');
  const tSparse = newtonIteration(sparse, inner);
  const pivotings = sparse.ws.solver.lu.pivotings;
  loadAll(sparse);
  const bare = bareSparse(sparse);
  const tBare = timed(bare.run, inner * 4);
  // The bare solve gives the engine's next iterate at the solution: a check that it factors the same matrix.
  let diff = 0;
  for (let i = 1; i <= n; i++) diff = Math.max(diff, Math.abs(bare.x[i] - sparse.ws.x[i]));
  const row = { kind, n, tSparse, tBare, pivotings, bareDiff: diff, fill: sparse.ws.solver.lu.factorEntries, entries: sparse.ws.stamps.count };
  if (n <= 800) {
    const dense = compiled(text, 'dense');
    row.tDense = newtonIteration(dense, Math.max(1, Math.round(inner / Math.max(1, n / 40))));
    row.tBareDense = timed(bareDense(dense), Math.max(1, Math.round(inner / Math.max(1, n / 40))));
  }
  return row;
}

/** Growth exponent of the sparse iteration over rows. */
function slope(rows) {
  return logSlope(rows.map((r) => [r.n, r.tSparse]));
}

const rows = [];
// The demo stages (their own DC operating point; figures, limits and analyses left out), small circuits for the threshold.
for (const file of ['sensor-rail-follower.cir', 'railway-transformer-follower.cir', 'railway-capacitance-multiplier.cir', 'follower-led-reference.cir']) {
  const text = readFileSync(new URL(`../examples/${file}`, import.meta.url), 'utf8').replace(/^\.(figure|limit|tran|ac|dc|spread|supply)\b.*$/gim, '');
  rows.push(caseRow(file.replace(/\.cir$/, '').slice(0, 8), undefined, text));
}
for (const n of [4, 6, 8]) rows.push(caseRow('ladder', n, ladder(n)));
for (const n of [10, 20, 30, 40, 50, 60, 80, 100, 200, 400, 800]) rows.push(caseRow('ladder', n, ladder(n)));
for (const side of [5, 7, 10, 14, 20, 28]) rows.push(caseRow('mesh', side * side + 1, mesh(side)));

const f = (v, d = 2) => (v === undefined ? '—' : v.toFixed(d));
console.log('circuit   unknowns  entries  L+U   sparse iter µs  dense/sparse  sparse/bare sparse  dense/bare dense  pivotings  |x_bare − x|');
for (const r of rows) {
  console.log(
    `${r.kind.padEnd(9)} ${String(r.n).padStart(8)} ${String(r.entries).padStart(8)} ${String(r.fill).padStart(5)}  ${f(r.tSparse, 1).padStart(14)}  ${f(r.tDense === undefined ? undefined : r.tDense / r.tSparse).padStart(12)}  ${f(r.tSparse / r.tBare).padStart(18)}  ${f(r.tDense === undefined ? undefined : r.tDense / r.tBareDense).padStart(16)}  ${String(r.pivotings).padStart(9)}  ${r.bareDiff.toExponential(1)}`,
  );
}
const ladders = rows.filter((r) => r.kind === 'ladder' && r.n >= 50 && r.n <= 800);
const meshes = rows.filter((r) => r.kind === 'mesh');
console.log(`growth of one sparse Newton iteration: ladders ${ladders[0].n}..${ladders.at(-1).n} n^${slope(ladders).toFixed(2)}, mesh ${meshes[0].n}..${meshes.at(-1).n} n^${slope(meshes).toFixed(2)}`);
const measured = rows.filter((r) => r.kind === 'ladder' && r.tDense !== undefined).sort((a, b) => a.n - b.n);
const cross = measured.find((r, k) => measured.slice(k).every((q) => q.tDense > 1.25 * q.tSparse));
console.log(`smallest ladder from which on the sparse iteration is at least 1.25× faster than the dense one: ${cross ? cross.n : 'none measured'} unknowns (engine threshold SOLVER_PATH.threshold = ${SOLVER_PATH.threshold})`);

// A library's sparse LU on the same matrix: mathjs's slu (a port of CSparse's cs_lu with cs_amd
// ordering on A + Aᵀ, order = 1) and lusolve, on the 800-unknown ladder: factor and solve per call.
{
  const { create, all } = await import('mathjs');
  const math = create(all);
  const c = compiled(ladder(800), 'sparse');
  loadAll(c);
  const dense = denseOf(c.ws, c.ws.matrix);
  const n = c.ws.unknowns;
  const rows = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => dense[(i + 1) * (n + 1) + j + 1]));
  const A = math.sparse(rows);
  const b = math.matrix(Array.from(c.ws.rhs.subarray(1)).map((v) => [v]));
  const tLib = timed(() => math.lusolve(math.slu(A, 1, 0.001), b), 3, 5);
  const bare = bareSparse(c);
  const tBare = timed(bare.run, 200);
  const lu = c.ws.solver.lu;
  const values = c.ws.matrix;
  const x = new Float64Array(n + 1);
  const tOurs = timed(() => { lu.factor(values); lu.solve(c.ws.rhs, x); }, 200);
  console.log(`ladder 800, factor and solve: mathjs slu + lusolve / ours = ${(tLib / tOurs).toFixed(0)}, ours / bare = ${(tOurs / tBare).toFixed(2)} (ours ${tOurs.toFixed(1)} µs)`);
}
