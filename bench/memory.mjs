// Peak memory (largest resident set, getrusage's ru_maxrss) of the command
// `railcheck run` on the rectifier follower example run for 1 s and 10 s of
// 50 Hz (its figures, limits and own .tran line left out, `.tran 0.1m T`
// added, as bench/predictor.mjs does), with each output option: the text
// report, --csv FILE and --json (standard output to a file), each in a
// child process of its own, beside the peak of `node -e 0` measured the same
// way in the same run. Memory that does not grow with simulated time shows
// as 10 s close to 1 s (docs/transient.md, "Output").
// Not part of the tests (no timed tests). Run: node bench/memory.mjs [REPEATS]
// after `npx -y pnpm@10.34.9 build`; each figure is the median of REPEATS runs (default 3).
import { mkdtempSync, readFileSync, rmSync, writeFileSync, openSync, closeSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';

const root = fileURLToPath(new URL('..', import.meta.url));
// RAILCHECK_BUNDLE runs another build of the command (an older one, to compare).
const bundle = process.env.RAILCHECK_BUNDLE ?? join(root, 'packages', 'cli', 'dist', 'railcheck.mjs');
const repeats = Number(process.argv[2] ?? 3);
const dir = mkdtempSync(join(tmpdir(), 'railcheck-memory-'));
// Each child reports its own peak as it exits (process.resourceUsage().maxRSS, kB), so no outside tool is needed.
const hook = join(dir, 'peak.cjs');
writeFileSync(hook, "process.on('exit', () => require('node:fs').writeFileSync(process.env.RAILCHECK_PEAK_FILE, String(process.resourceUsage().maxRSS)));\n");

/** Peak resident set of `node ARGS` in MB, standard output to a file. */
function peak(args) {
  const out = join(dir, 'stdout');
  const peakFile = join(dir, 'peak');
  const fd = openSync(out, 'w');
  const r = spawnSync(process.execPath, ['--require', hook, ...args], { stdio: ['ignore', fd, 'pipe'], env: { ...process.env, RAILCHECK_PEAK_FILE: peakFile } });
  closeSync(fd);
  // The example's limits are left out, so anything but 0 is a failure (a missing bundle or package exits with 1).
  if (r.status !== 0) throw new Error(`node ${args.join(' ')} exited with ${r.status}: ${r.stderr}`);
  return Number(readFileSync(peakFile, 'utf8')) / 1024;
}

function median(f) {
  const xs = Array.from({ length: repeats }, f).sort((a, b) => a - b);
  return xs[Math.floor(xs.length / 2)];
}

const text = readFileSync(join(root, 'examples', 'railway-transformer-follower.cir'), 'utf8').replace(/^\.(figure|limit|tran)\b.*$/gm, '');
const floor = median(() => peak(['-e', '0']));
const options = [
  ['text', []],
  ['--csv', ['--csv', join(dir, 'out.csv')]],
  ['--json', ['--json']],
];
const rows = [];
for (const seconds of [1, 10]) {
  const file = join(dir, `follower-${seconds}s.cir`);
  writeFileSync(file, text.replace(/^\.end\b/im, `.tran 0.1m ${seconds}\n.end`));
  for (const [name, flags] of options) rows.push({ seconds, name, mb: median(() => peak([bundle, 'run', file, ...flags])) });
}
rmSync(dir, { recursive: true, force: true });
console.log(`peak memory (max RSS, MB; median of ${repeats}); node -e 0: ${floor.toFixed(1)} MB`);
console.log('run          output      peak MB   over node -e 0   ratio');
for (const r of rows) console.log(`${`${r.seconds} s`.padEnd(12)} ${r.name.padEnd(10)} ${r.mb.toFixed(1).padStart(8)} ${(r.mb - floor).toFixed(1).padStart(16)} ${(r.mb / floor).toFixed(2).padStart(7)}`);
