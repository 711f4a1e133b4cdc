// Speed of `railcheck spread` (issue 12): 1000 Monte Carlo runs of the weather-station stage
// (examples/sensor-rail-spread.cir: its line, load, dropout and ripple figures) at one temperature,
// on the calling thread (jobs 1) and on two worker threads (jobs 2). Prints runs per second and the
// ratio of the two rates measured in this one process. Not a test: the numbers depend on the machine.
//   node bench/spread.mjs [RUNS]      (pnpm bench:spread)
import { mkdtempSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build } from 'esbuild';

const root = fileURLToPath(new URL('..', import.meta.url));
const out = mkdtempSync(join(tmpdir(), 'railcheck-spread-bench-'));
// Bundle the library and its worker from the sources, so the bench needs no prior build.
await build({
  entryPoints: [{ in: join(root, 'packages/core/src/index.ts'), out: 'core' }, { in: join(root, 'packages/core/src/pipeline/spread-worker.ts'), out: 'spread-worker' }],
  outdir: out, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'warning', outExtension: { '.js': '.mjs' },
  alias: { '@railcheck/devices': join(root, 'packages/devices/src/index.ts') }, nodePaths: [join(root, 'node_modules'), join(root, 'packages/core/node_modules')],
});
const { spreadNetlistFile } = await import(pathToFileURL(join(out, 'core.mjs')).href);
const runs = Number(process.argv[2] ?? 1000);
const file = join(root, 'examples/sensor-rail-spread.cir');
const workerScript = join(out, 'spread-worker.mjs');

async function rate(jobs) {
  const t0 = performance.now();
  const o = await spreadNetlistFile(file, { runs, seed: 1, jobs, temperatures: [27], workerScript });
  const seconds = (performance.now() - t0) / 1000;
  if (!o.ok) throw new Error(o.errors.map((e) => e.message).join('\n'));
  return { seconds, perSecond: runs / seconds, result: o.result };
}

const cold = await rate(1); // the first pass on this thread, before the JIT has warmed up (each worker thread starts cold like this)
const one = await rate(1);
const two = await rate(2);
const same = JSON.stringify({ ...one.result, runsPerSecond: null }) === JSON.stringify({ ...two.result, runsPerSecond: null });
console.log(`spread of ${runs} runs (line, load, dropout, ripple; 27 °C); ${availableParallelism()} cores, load average ${loadavg().map((l) => l.toFixed(1)).join(' ')} (other work on the machine lowers the jobs 2 ratio)`);
console.log(`  jobs 1, first pass (cold): ${cold.seconds.toFixed(2)} s, ${cold.perSecond.toFixed(1)} runs/s`);
console.log(`  jobs 1: ${one.seconds.toFixed(2)} s, ${one.perSecond.toFixed(1)} runs/s`);
console.log(`  jobs 2: ${two.seconds.toFixed(2)} s, ${two.perSecond.toFixed(1)} runs/s`);
console.log(`  ratio jobs 2 / jobs 1: ${(two.perSecond / one.perSecond).toFixed(2)}; jobs 2 / jobs 1 cold: ${(two.perSecond / cold.perSecond).toFixed(2)}  (same result: ${same})`);
