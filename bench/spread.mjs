// Speed of `railcheck spread` (issue 12): Monte Carlo runs of the weather-station stage
// (examples/sensor-rail-spread.cir: its line, load, dropout and ripple figures) at one temperature.
// Each case runs in a process of its own, from a cold start as a user's command would:
//   jobs 1 on one core   (taskset -c 0: the rate "on one core of this machine")
//   jobs 1 on all cores  (V8's background compiler and garbage collector then use the idle core too)
//   jobs 2 on two cores  (taskset -c 0,1)
// and prints runs per second and the ratios of those rates, measured in this one run. Not a test:
// the numbers depend on the machine. Where `taskset` is missing, the pinned cases run unpinned.
//   node bench/spread.mjs [RUNS]      (pnpm bench:spread; RUNS default 1000)
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const file = join(root, 'examples/sensor-rail-spread.cir');

if (process.argv[2] === '--child') {
  // A child: one spread with the bundle in DIR; prints its time, rate and a digest of the result.
  const [, , , dir, jobsText, runsText] = process.argv;
  const jobs = Number(jobsText);
  const runs = Number(runsText);
  const t0 = performance.now();
  const { spreadNetlistFile } = await import(pathToFileURL(join(dir, 'core.mjs')).href);
  const o = await spreadNetlistFile(file, { runs, seed: 1, jobs, temperatures: [27], workerScript: join(dir, 'spread-worker.mjs') });
  const seconds = (performance.now() - t0) / 1000;
  if (!o.ok) throw new Error(o.errors.map((e) => e.message).join('\n'));
  const digest = createHash('sha256').update(JSON.stringify({ ...o.result, runsPerSecond: null })).digest('hex').slice(0, 16);
  console.log(JSON.stringify({ seconds, perSecond: runs / seconds, digest }));
  process.exit(0);
}

const { build } = await import('esbuild');
const out = mkdtempSync(join(tmpdir(), 'railcheck-spread-bench-'));
// Bundle the library and its worker from the sources, so the bench needs no prior build.
await build({
  entryPoints: [{ in: join(root, 'packages/core/src/index.ts'), out: 'core' }, { in: join(root, 'packages/core/src/pipeline/spread-worker.ts'), out: 'spread-worker' }],
  outdir: out, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'warning', outExtension: { '.js': '.mjs' },
  alias: { '@railcheck/devices': join(root, 'packages/devices/src/index.ts') }, nodePaths: [join(root, 'node_modules'), join(root, 'packages/core/node_modules')],
});
const runs = Number(process.argv[2] ?? 1000);
let pin = true;
try {
  execFileSync('taskset', ['-c', '0', 'true']);
} catch {
  pin = false;
}

function rate(jobs, cores) {
  const child = [fileURLToPath(import.meta.url), '--child', out, String(jobs), String(runs)];
  const [cmd, args] = pin && cores !== undefined ? ['taskset', ['-c', cores, process.execPath, ...child]] : [process.execPath, child];
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout.trim().split('\n').pop());
}

const oneCore = rate(1, '0');
const oneAll = rate(1, undefined);
const two = rate(2, '0,1');
const f = (r) => `${r.seconds.toFixed(2)} s, ${r.perSecond.toFixed(1)} runs/s`;
console.log(`spread of ${runs} runs (line, load, dropout, ripple; 27 °C), each case a fresh process; ${availableParallelism()} cores, load average ${loadavg().map((l) => l.toFixed(1)).join(' ')}${pin ? '' : ' (no taskset: nothing pinned)'}`);
console.log(`  jobs 1, one core:   ${f(oneCore)}`);
console.log(`  jobs 1, all cores:  ${f(oneAll)}`);
console.log(`  jobs 2, two cores:  ${f(two)}`);
console.log(`  ratio jobs 2 / jobs 1 on one core: ${(two.perSecond / oneCore.perSecond).toFixed(2)}; jobs 2 / jobs 1 on all cores: ${(two.perSecond / oneAll.perSecond).toFixed(2)}`);
console.log(`  same result in every case: ${oneCore.digest === two.digest && oneAll.digest === two.digest}`);
