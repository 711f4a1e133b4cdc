// Start-up of the command (not part of the tests; no timed tests): the
// median wall time of `railcheck --version` through the root launcher and
// through the pnpm script's launcher (scripts/railcheck.mjs, with its
// rebuild check), against `node -e 0`, as ratios within one run.
// Run: node bench/startup.mjs [RUNS]   (default 20 runs of each, interleaved)
import { spawnSync } from 'node:child_process';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';

const root = fileURLToPath(new URL('..', import.meta.url));
const runs = Number(process.argv[2] ?? 20);
const cases = {
  'node -e 0': [process.execPath, ['-e', '0']],
  './railcheck --version': [join(root, 'railcheck'), ['--version']],
  'node scripts/railcheck.mjs --version': [process.execPath, [join(root, 'scripts/railcheck.mjs'), '--version']],
};
const times = Object.fromEntries(Object.keys(cases).map((k) => [k, []]));
for (let i = 0; i < runs; i++) {
  for (const [name, [cmd, args]] of Object.entries(cases)) {
    const t0 = performance.now();
    const r = spawnSync(cmd, args, { cwd: root, stdio: 'ignore' });
    times[name].push(performance.now() - t0);
    if (r.status !== 0) throw new Error(`${name} exited ${r.status}`);
  }
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const base = median(times['node -e 0']);
for (const [name, xs] of Object.entries(times)) {
  console.log(`${name.padEnd(38)} median ${median(xs).toFixed(1).padStart(7)} ms  (${(median(xs) / base).toFixed(2)}x node -e 0, ${runs} runs)`);
}
