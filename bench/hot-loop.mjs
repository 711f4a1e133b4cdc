// One Newton iteration (load every device, factor, solve, the update test)
// against the bare dense LU factor and solve of the same matrix, as ratios
// within one run: diode-clamped RC ladders of 10, 20, 40 and 80 unknowns
// and the bridge-rectifier regulator (examples/railway-transformer-follower.cir,
// its figures, limits and .tran left out, run as `.tran 0.1m 1`), each at a
// matrix of its own transient (the state of an accepted point near a mains
// peak, or mid-run for the ladders, put back before timing).
// The floor is a textbook Doolittle elimination with partial pivoting
// (Golub and Van Loan, Matrix Computations, 4th ed., algorithm 3.4.1) and
// forward/back substitution, written here on the engine's storage (row-major,
// stride n + 1, ground row and column unused), with no pivot tolerance and no
// round-off bound. The copy that gives it a fresh matrix for each repetition
// is timed on its own and taken off. The last column times the same
// iteration with the round-off bound tracked on every factorisation
// (luFactorBounded, what luFactor did before it was kept for the pivots that
// need it).
// Not part of the tests (no timed tests). Run after `npx -y pnpm@10.34.9 build`:
//   node bench/hot-loop.mjs [SAMPLES]
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { parseNetlist, prepare } from '@railcheck/core';
import { bareFactorSolve } from './lib/floors.mjs';
import { newtonIteration } from './lib/circuits.mjs';
import { loadAll, luFactorBounded, runTransient, DEFAULT_NEWTON, SOLVER_PATH } from '@railcheck/core/internal';

const root = fileURLToPath(new URL('..', import.meta.url));
const samples = Number(process.argv[2] ?? 201);

function ladder(n) {
  // n unknowns: the source's branch current, its node and n − 2 more, each with a shunt capacitor and a clamp diode.
  const lines = [`ladder ${n}`, 'VIN n0 0 sin(0 5 1k)'];
  for (let k = 1; k < n - 1; k++) lines.push(`R${k} n${k - 1} n${k} 100`, `C${k} n${k} 0 10n`, `D${k} n${k} 0 DCL`);
  lines.push('.model DCL D (IS=1e-12 N=1.5 CJO=5p)', '.end', '');
  return { text: lines.join('\n'), tran: { tstep: 1e-6, tstop: 1e-3 }, at: 0.25e-3 };
}

function rectifier() {
  const f = 'railway-transformer-follower.cir';
  const text = readFileSync(join(root, 'examples', f), 'utf8').replace(/^\.(figure|limit|tran)\b.*$/gm, '').replace(/^\.end\b/im, '.end');
  return { text, tran: { tstep: 1e-4, tstop: 1 }, at: 0.905 };
}

/** Compiles, runs the transient and puts back the state of the accepted point nearest `at` (s). */
function atTransientMatrix({ text, tran, at }) {
  // The dense path at every size: the floor is a dense LU (the sparse one has bench/sparse-threshold.mjs).
  SOLVER_PATH.force = 'dense';
  const p = prepare(parseNetlist(text));
  SOLVER_PATH.force = undefined;
  if (!p.ok) throw new Error('does not compile');
  const c = p.compiled;
  const { ws } = c;
  let snap;
  const r = runTransient(c, {
    ...tran,
    onAccept: (t, ctx) => {
      if (snap === undefined || Math.abs(t - at) < Math.abs(snap.t - at)) {
        snap = { t, x: Float64Array.from(ws.x), s0: Float64Array.from(ws.states[0]), s1: Float64Array.from(ws.states[1]), a0: ctx.coefficients.a0, a1: ctx.coefficients.a1, time: ctx.time };
      }
    },
  });
  if (!r.ok) throw new Error(`transient failed: ${r.reason}`);
  ws.x.set(snap.x);
  ws.states[0].set(snap.s0);
  ws.states[1].set(snap.s1);
  ws.ctx.mode = 'tran';
  ws.ctx.coefficients.a0 = snap.a0;
  ws.ctx.coefficients.a1 = snap.a1;
  ws.ctx.time = snap.time;
  return c;
}

function median(v) {
  const s = [...v].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function measure(name, c) {
  const { ws } = c;
  const s = ws.size;
  const opts = DEFAULT_NEWTON;
  // The loaded matrix, unfactored, for the floor.
  loadAll(c);
  const original = Float64Array.from(ws.matrix);
  const rhs = Float64Array.from(ws.rhs);
  const work = new Float64Array(original.length);
  const perm = new Int32Array(s);
  const x = new Float64Array(s);
  // Repetitions per sample: about 0.2 ms of Newton iterations.
  let reps = 1;
  for (;;) {
    const t0 = performance.now();
    for (let k = 0; k < reps; k++) newtonIteration(c, opts);
    if (performance.now() - t0 > 0.2) break;
    reps *= 2;
  }
  const newton = [];
  const bounded = [];
  const floor = [];
  const copy = [];
  let sink = 0;
  for (let w = 0; w < 2; w++) {
    newton.length = bounded.length = floor.length = copy.length = 0;
    for (let k = 0; k < samples; k++) {
      let t0 = performance.now();
      for (let r = 0; r < reps; r++) sink += newtonIteration(c, opts);
      newton.push((performance.now() - t0) / reps);
      t0 = performance.now();
      for (let r = 0; r < reps; r++) sink += newtonIteration(c, opts, (ws) => luFactorBounded(ws.solver.lu));
      bounded.push((performance.now() - t0) / reps);
      t0 = performance.now();
      for (let r = 0; r < reps; r++) {
        work.set(original);
        sink += bareFactorSolve(work, s, perm, rhs, x);
      }
      floor.push((performance.now() - t0) / reps);
      t0 = performance.now();
      for (let r = 0; r < reps; r++) {
        work.set(original);
        sink += work[s + 1];
      }
      copy.push((performance.now() - t0) / reps);
    }
  }
  const n = median(newton) * 1e3;
  const f = (median(floor) - median(copy)) * 1e3;
  const nb = median(bounded) * 1e3;
  return { name, unknowns: ws.unknowns, newtonUs: n, floorUs: f, ratio: n / f, boundedRatio: nb / f, sink };
}

const cases = [...[10, 20, 40, 80].map((n) => [`ladder n = ${n}`, ladder(n)]), ['rectifier regulator', rectifier()]];
const rows = cases.map(([name, spec]) => measure(name, atTransientMatrix(spec)));
console.log('case                   unknowns   Newton iteration µs   bare LU µs   ratio   ratio, bound always tracked');
for (const r of rows) {
  console.log(`${r.name.padEnd(22)} ${String(r.unknowns).padStart(8)} ${r.newtonUs.toFixed(3).padStart(21)} ${r.floorUs.toFixed(3).padStart(12)} ${r.ratio.toFixed(2).padStart(7)} ${r.boundedRatio.toFixed(2).padStart(9)}`);
}
