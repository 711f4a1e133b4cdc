// The speed benchmarks of railcheck, `npx -y pnpm@10.34.9 bench` (after the
// install, which builds the bundles). Not a test: nothing here passes or
// fails a build. It prints one table and writes bench/results.json, every
// case beside its floor measured in the same run, as ratios:
//   - one Newton iteration (device loading, factor, solve, update test)
//     against a bare dense LU factor and solve of the same matrix (the
//     textbook Doolittle elimination with partial pivoting, Golub and Van
//     Loan, Matrix Computations, 4th ed., algorithm 3.4.1, in bench/lib/floors.mjs;
//     its copy of the matrix timed alone and taken off),
//     on diode-clamped RC ladders and the bridge-rectifier regulator (on
//     the path the engine takes, and on the dense path at every size), and,
//     for circuits on the sparse path, against a bare sparse LU of the same
//     pattern, column order and pivot rows (bench/lib/floors.mjs);
//   - the growth of one iteration with the number of unknowns (the slope of
//     log time on log n, least squares) on ladders and a 2-D mesh;
//   - the rectifier regulator's transient for 1 s and 10 s: steps,
//     rejections, Newton iterations per accepted step, and the whole
//     command's CPU time and peak memory (GNU time) against `node -e 0`;
//   - the demo's figure set: DC solves and transient steps each figure used;
//   - a sine-fed stage's periodic steady state.
// An iteration and its floors are timed in alternating rounds of batched
// calls and each ratio is the median of the rounds' ratios (interleaved
// below: a harness that times every call on its own, as tinybench does,
// adds the timer's cost of some 0.1 µs to a 0.3 µs floor, and a case and
// its floor timed seconds apart see a shared machine at different speeds).
// Options: --quick (shorter timing
// windows, for trying the script), --out FILE (default bench/results.json).
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir, cpus } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { performance } from 'node:perf_hooks';
import { runNetlist } from '@railcheck/core';
import { ENGINE_COUNTS, SOLVER_PATH, denseOf, factorMatrix, loadAll, resetEngineCounts } from '@railcheck/core/internal';
import { bareDense, bareSparse, logSlope } from './lib/floors.mjs';
import { compiled, ladderNetlist, meshNetlist, newtonIteration, toTransientMatrix } from './lib/circuits.mjs';

const rootUrl = new URL('..', import.meta.url);
const root = fileURLToPath(rootUrl);
const args = process.argv.slice(2);
const quick = args.includes('--quick');
const outFile = args.includes('--out') ? args[args.indexOf('--out') + 1] : join(root, 'bench', 'results.json');
/** Interleaved timing (interleaved below): rounds per case and the length of one batch, ms. */
const ROUNDS = quick ? 5 : 21;
const BATCH_MS = quick ? 4 : 20;

const rows = [];
/** One line of the table: what was measured, its value, the floor or reference beside it, the ratio and the target. */
function row(group, name, value, unit, extra = {}) {
  const r = { group, case: name, value, unit, ...extra };
  rows.push(r);
  return r;
}

// ---------------------------------------------------------------------------------------------
// Floors.

/** The matrix and right-hand side the circuit loads at its present state (a copy). */
function loadedSystem(c) {
  loadAll(c);
  return { a: denseOf(c.ws, c.ws.matrix), b: Float64Array.from(c.ws.rhs) };
}

// ---------------------------------------------------------------------------------------------
// 1. One Newton iteration against the dense floor.

/** Median of a list of numbers (the mean of the middle two for an even count). */
function mid(xs) {
  const s = [...xs].sort((p, q) => p - q);
  const k = s.length >> 1;
  return s.length % 2 ? s[k] : (s[k - 1] + s[k]) / 2;
}

/**
 * Per-call times (ms) of each of `fns`, measured in ROUNDS alternating rounds
 * (a batch of calls of each function in turn, every batch about BATCH_MS
 * long, after a warm-up): a case and its floor are timed moments apart, so
 * a machine whose speed drifts (a shared virtual machine's does, by up to
 * 2× over a minute) moves both, and the ratio of each round is taken
 * before the median. Returns one list of ROUNDS times per function.
 */
function interleaved(fns) {
  const counts = fns.map((fn) => {
    for (let n = 1; ; n *= 2) {
      const t0 = performance.now();
      for (let i = 0; i < n; i++) fn();
      if (performance.now() - t0 >= BATCH_MS) return n;
    }
  });
  const times = fns.map(() => []);
  for (let r = 0; r < ROUNDS; r++) {
    fns.forEach((fn, k) => {
      const n = counts[k];
      const t0 = performance.now();
      for (let i = 0; i < n; i++) fn();
      times[k].push((performance.now() - t0) / n);
    });
  }
  return times;
}

async function iterationCase(group, name, c, target) {
  const iterate = () => newtonIteration(c);
  const { a, b } = loadedSystem(c);
  const floor = bareDense(c.ws.size);
  // The floor's copy of the matrix (a fresh one for each repetition) is timed alone and taken off.
  const scratch = new Float64Array(a.length);
  const fns = [iterate, () => scratch.set(a), () => floor(a, b)];
  const path = c.ws.solver.kind;
  if (path === 'sparse') {
    // The bare sparse LU of the same pattern, column order and pivot rows (bench/lib/floors.mjs).
    loadAll(c);
    factorMatrix(c.ws);
    fns.push(bareSparse(c).run);
  }
  const [ti, tc, tf, ts] = interleaved(fns);
  const floors = tf.map((t, k) => t - tc[k]);
  const tIter = mid(ti);
  const ratio = mid(ti.map((t, k) => t / floors[k]));
  const extra = {};
  if (ts) {
    extra.sparseFloor = mid(ts) * 1e3;
    extra.sparseRatio = mid(ti.map((t, k) => t / ts[k]));
  }
  return row(group, name, tIter * 1e3, 'µs / iteration', { unknowns: c.ws.unknowns, path, floor: mid(floors) * 1e3, floorName: 'bare dense LU', ratio, ...extra, target: target === undefined ? undefined : `≤ ${target}×`, met: target === undefined ? undefined : ratio <= target });
}

console.error('railcheck benchmarks: one Newton iteration against the dense LU floor …');
for (const n of [10, 20, 40, 80]) {
  const c = toTransientMatrix(compiled(ladderNetlist(n)), 2e-4, 1e-6);
  await iterationCase('iteration', `ladder n=${n}`, c, 2);
  if (c.ws.solver.kind === 'sparse') {
    // The same ladder on the dense path: the dense hot loop against its floor.
    SOLVER_PATH.force = 'dense';
    const dense = compiled(ladderNetlist(n));
    SOLVER_PATH.force = undefined;
    await iterationCase('iteration', `ladder n=${n}, dense path`, toTransientMatrix(dense, 2e-4, 1e-6), 2);
  }
}
const regulatorText = readFileSync(join(root, 'bench/cases/rectifier-regulator-1s.cir'), 'utf8');
// The rectifier regulator 25 ms in (the bridge conducting), at a 20 µs trapezoidal step.
await iterationCase('iteration', 'rectifier regulator', toTransientMatrix(compiled(regulatorText.replace(/^\.supply.*$/m, '')), 0.025, 2e-5), 2.5);

// 2. Growth with the number of unknowns.
console.error('… growth with the number of unknowns …');
const ladderPoints = [];
for (const n of [50, 100, 200, 400, 800]) {
  const r = await iterationCase('growth', `ladder n=${n}`, toTransientMatrix(compiled(ladderNetlist(n)), 2e-4, 1e-6), undefined);
  ladderPoints.push([n, r.value]);
}
const meshPoints = [];
for (const side of quick ? [5, 10, 14] : [5, 7, 10, 14, 20]) {
  const r = await iterationCase('growth', `mesh ${side}×${side}`, toTransientMatrix(compiled(meshNetlist(side)), 2e-4, 1e-6), undefined);
  meshPoints.push([r.unknowns, r.value]);
}
const at800 = rows.find((r) => r.case === 'ladder n=800');
if (at800?.sparseRatio !== undefined) row('growth', 'ladder n=800 against the bare sparse LU', at800.sparseRatio, '× bare sparse LU (same pattern, order, pivots)', { floor: at800.sparseFloor, floorName: 'bare sparse LU, µs', target: '≤ 3×', met: at800.sparseRatio <= 3 });
const ladderSlope = logSlope(ladderPoints);
const meshSlope = logSlope(meshPoints);
row('growth', 'ladder n=50…800', ladderSlope, 'slope of log t on log n', { target: '≤ 1.2', met: ladderSlope <= 1.2 });
row('growth', `mesh n=${meshPoints[0][0]}…${meshPoints[meshPoints.length - 1][0]}`, meshSlope, 'slope of log t on log n', { target: '≤ 1.5', met: meshSlope <= 1.5 });

// 3. The rectifier regulator's transient, in process (counts) and as a command (CPU, memory).
console.error('… the rectifier regulator transient …');
const gnuTime = ['/usr/bin/time', '/bin/time'].find((p) => existsSync(p));
/** CPU seconds (user + system) and peak resident memory (MB) of a command, by GNU time; undefined without it. */
function measureCommand(cmd, cmdArgs) {
  if (!gnuTime) return undefined;
  const r = spawnSync(gnuTime, ['-f', '%U %S %M', cmd, ...cmdArgs], { cwd: root, encoding: 'utf8', maxBuffer: 1 << 30 });
  if (r.status !== 0) throw new Error(`${cmd} ${cmdArgs.join(' ')} exited ${r.status}: ${r.stderr.slice(-400)}`);
  const last = r.stderr.trim().split('\n').pop().split(' ').map(Number);
  return { cpu: last[0] + last[1], rssMb: last[2] / 1024 };
}
/** The peak memory of `node -e 0` (MB), median of five runs; undefined without GNU time. */
const nodeFloor = gnuTime ? { rssMb: mid(Array.from({ length: 5 }, () => measureCommand(process.execPath, ['-e', '0']).rssMb)) } : undefined;
const launcher = join(root, 'railcheck');
const scratch = mkdtempSync(join(tmpdir(), 'railcheck-bench-'));
for (const seconds of [1, 10]) {
  const file = `bench/cases/rectifier-regulator-${seconds}s.cir`;
  resetEngineCounts();
  const t0 = performance.now();
  const r = runNetlist(readFileSync(join(root, file), 'utf8'), { file });
  const ms = performance.now() - t0;
  if (!r.ok) throw new Error(`${file}: ${r.errors[0]?.message}`);
  const s = r.report.transients[0].stats;
  const perStep = s.newtonIterations / s.accepted;
  row('transient', `rectifier regulator ${seconds} s`, perStep, 'Newton iterations / accepted step', { accepted: s.accepted, rejectedLte: s.rejectedLte, rejectedNewton: s.rejectedNewton, inProcessMs: ms, target: '≤ 2.5', met: perStep <= 2.5 });
  const outputs = seconds === 1 ? [['text', []]] : [['text', []], ['--csv', ['--csv', join(scratch, 'out.csv')]], ['--json', ['--json']]];
  for (const [label, extra] of outputs) {
    if (!nodeFloor) {
      row('command', `rectifier regulator ${seconds} s, ${label}`, undefined, '', { note: 'not measured: GNU time (/usr/bin/time) is not installed' });
      continue;
    }
    let m;
    if (seconds === 1) {
      // The command and `node -e 0` in alternation, the ratio of each pair before the median (as for the iterations);
      // the command's peak memory is the median of the same runs.
      const pairs = Array.from({ length: 5 }, () => [measureCommand(process.execPath, ['-e', '0']), measureCommand(launcher, ['run', file, ...extra])]);
      const ratio = mid(pairs.map(([f, c]) => c.cpu / f.cpu));
      m = { cpu: mid(pairs.map(([, c]) => c.cpu)), rssMb: mid(pairs.map(([, c]) => c.rssMb)) };
      row('command', `./railcheck run ${file}`, m.cpu, 's CPU', { floor: mid(pairs.map(([f]) => f.cpu)), floorName: 'node -e 0', ratio, target: '≤ 4×', met: ratio <= 4 });
    } else {
      m = measureCommand(launcher, ['run', file, ...extra]);
    }
    row('memory', `rectifier regulator ${seconds} s, ${label}`, m.rssMb, 'MB peak RSS', { floor: nodeFloor.rssMb, floorName: 'node -e 0', ratio: m.rssMb / nodeFloor.rssMb, target: seconds === 10 ? '≤ 80 MB' : undefined, met: seconds === 10 ? m.rssMb <= 80 : undefined });
  }
}
rmSync(scratch, { recursive: true, force: true });

// 4. The demo's figure set, one figure at a time.
console.error('… the demo figure set …');
const demoFile = 'examples/sensor-rail-follower.cir';
const demoText = readFileSync(join(root, demoFile), 'utf8');
const figureLines = demoText.split('\n').filter((l) => /^\.figure\b/i.test(l));
const bare = demoText.replace(/^\.(figure|limit)\b.*$/gim, '');
for (const line of figureLines) {
  const text = bare.replace(/^\.end\b/im, `${line}\n.end`);
  resetEngineCounts();
  const t0 = performance.now();
  const r = runNetlist(text, { file: demoFile });
  const ms = performance.now() - t0;
  if (!r.ok) throw new Error(`${demoFile} with ${line}: ${r.errors[0]?.message}`);
  row('figures', `demo ${line.trim()}`, ms, 'ms', { dcSolves: ENGINE_COUNTS.dcSolves, dcIterations: ENGINE_COUNTS.dcIterations, tranSteps: ENGINE_COUNTS.tranSolves, tranIterations: ENGINE_COUNTS.tranIterations });
}
{
  resetEngineCounts();
  const t0 = performance.now();
  const r = runNetlist(demoText, { file: demoFile });
  const ms = performance.now() - t0;
  if (!r.ok) throw new Error(`${demoFile}: ${r.errors[0]?.message}`);
  row('figures', 'demo, every figure together', ms, 'ms', { dcSolves: ENGINE_COUNTS.dcSolves, dcIterations: ENGINE_COUNTS.dcIterations, tranSteps: ENGINE_COUNTS.tranSolves, tranIterations: ENGINE_COUNTS.tranIterations });
}

// 5. A sine-fed stage's periodic steady state (the operating point of the mains-fed example).
console.error('… a periodic steady state …');
{
  const file = 'examples/railway-transformer-follower.cir';
  const text = readFileSync(join(root, file), 'utf8').replace(/^\.(figure|limit|tran)\b.*$/gim, '');
  resetEngineCounts();
  const t0 = performance.now();
  const r = runNetlist(text, { file });
  const ms = performance.now() - t0;
  if (!r.ok) throw new Error(`${file}: ${r.errors[0]?.message}`);
  row('steady state', 'railway transformer follower, operating point', ms, 'ms', { dcSolves: ENGINE_COUNTS.dcSolves, tranSteps: ENGINE_COUNTS.tranSolves, tranIterations: ENGINE_COUNTS.tranIterations, iterationsPerStep: ENGINE_COUNTS.tranIterations / ENGINE_COUNTS.tranSolves });
}

// ---------------------------------------------------------------------------------------------
// The table and the file.
const fmt = (v) => (v === undefined ? '' : typeof v !== 'number' ? String(v) : Math.abs(v) >= 100 ? v.toFixed(0) : Math.abs(v) >= 10 ? v.toFixed(1) : v.toPrecision(3));
const detail = (r) =>
  [
    r.unknowns !== undefined ? `n=${r.unknowns}, ${r.path}` : '',
    r.sparseRatio !== undefined ? `${fmt(r.sparseRatio)}× the bare sparse LU (${fmt(r.sparseFloor)} µs)` : '',
    r.accepted !== undefined ? `${r.accepted} steps, ${r.rejectedLte + r.rejectedNewton} rejected` : '',
    r.dcSolves !== undefined ? `${r.dcSolves} DC solves` : '',
    r.tranSteps !== undefined ? `${r.tranSteps} steps tried` : '',
    r.note ?? '',
  ].filter(Boolean).join(', ');
const table = [['group', 'case', 'value', 'unit', 'floor', 'ratio', 'target', 'met', 'detail']];
for (const r of rows) table.push([r.group, r.case, fmt(r.value), r.unit, r.floor === undefined ? '' : `${fmt(r.floor)} (${r.floorName})`, r.ratio === undefined ? '' : `${fmt(r.ratio)}×`, r.target ?? '', r.met === undefined ? '' : r.met ? 'yes' : 'NO', detail(r)]);
const widths = table[0].map((_, k) => Math.max(...table.map((t) => t[k].length)));
for (const t of table) console.log(t.map((c, k) => c.padEnd(widths[k])).join('  ').trimEnd());
const commit = spawnSync('git', ['rev-parse', '--short', 'HEAD'], { cwd: root, encoding: 'utf8' }).stdout.trim() || undefined;
writeFileSync(outFile, `${JSON.stringify({ format: 'railcheck-bench', version: 1, date: new Date().toISOString(), commit, node: process.version, cpu: cpus()[0]?.model, cores: cpus().length, quick, rows }, null, 2)}\n`);
console.error(`written ${outFile}`);
