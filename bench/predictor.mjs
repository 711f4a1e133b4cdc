// Newton iterations per accepted transient step without the stepper's aids
// to Newton, with the predictor of each step's first iterate
// (engine/history.ts, predict), and with the predictor and the contraction
// test (engine/newton.ts, NewtonOptions.contractionSettles), on
// the mains-fed examples run for 1 s of 50 Hz (their figures, limits and own
// .tran lines left out), and the time of each run, as ratios within one run.
// Not part of the tests (no timed tests). Run: node bench/predictor.mjs [REPEATS]
// after `npx -y pnpm@10.34.9 build`.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { runNetlist } from '@railcheck/core';
import { CONTRACTION, PREDICTOR } from '@railcheck/core/internal';

const root = fileURLToPath(new URL('..', import.meta.url));
const repeats = Number(process.argv[2] ?? 3);
const files = ['railway-transformer-follower.cir', 'greenhouse-valve-stress.cir', 'railway-accessory-transformer.cir'];
const rows = [];
for (const f of files) {
  const text = readFileSync(join(root, 'examples', f), 'utf8').replace(/^\.(figure|limit|tran)\b.*$/gm, '').replace(/^\.end\b/im, '.tran 0.1m 1\n.end');
  const result = {};
  for (const [key, predictor, contraction] of [['off', false, false], ['predictor', true, false], ['both', true, true]]) {
    PREDICTOR.on = predictor;
    CONTRACTION.on = contraction;
    const times = [];
    let stats;
    for (let k = 0; k < repeats; k++) {
      const t0 = performance.now();
      const r = runNetlist(text, { file: f });
      times.push(performance.now() - t0);
      if (!r.ok) throw new Error(`${f}: ${r.errors[0]?.message}`);
      stats = r.report.transients[0].stats;
    }
    times.sort((a, b) => a - b);
    result[key] = { ms: times[Math.floor(times.length / 2)], perStep: stats.newtonIterations / stats.accepted, accepted: stats.accepted, rejected: stats.rejectedLte + stats.rejectedNewton };
  }
  rows.push({ f, ...result });
}
PREDICTOR.on = true;
CONTRACTION.on = true;
console.log('example (1 s at 50 Hz)                 iterations/step: none → predictor → both   accepted  rejected (both)   time both/none');
for (const r of rows) {
  console.log(`${r.f.padEnd(40)} ${r.off.perStep.toFixed(2).padStart(8)} → ${r.predictor.perStep.toFixed(2).padStart(5)} → ${r.both.perStep.toFixed(2).padEnd(8)} ${String(r.both.accepted).padStart(8)} ${String(r.both.rejected).padStart(9)}        ${(r.both.ms / r.off.ms).toFixed(2)}`);
}
