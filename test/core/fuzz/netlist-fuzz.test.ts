/**
 * The netlist fuzzer: hostile and careless netlists (the examples and the
 * tests' netlists mutated token by token, fresh directives with extreme
 * arguments, random bytes) run through the whole pipeline and every
 * presenter of the command line, each case in a worker thread with a
 * memory cap and a time budget (pool.ts). Every case must end as a clean
 * result or a clean error (located diagnostics of railcheck's own): none
 * may crash (a foreign exception, an internal error, a dead worker), hang
 * (past the budget) or report a non-finite number (house rule: a figure
 * that cannot be measured says so and why, never NaN/Infinity).
 *
 * Seeded: FC_SEED replays a run case for case. FUZZ_CASES sets the number
 * of cases (default 300, the CI size), FUZZ_CASE_MS the budget per case
 * (default 60000 ms), FUZZ_WORKERS the worker threads (default 1: CI has
 * two cores). The extreme inputs (mutate.ts) and the reproducers of
 * pending.ts are in by default; FUZZ_PENDING=0 holds them back. The
 * failing cases are written to a folder that the failure message names.
 */
import fc from 'fast-check';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { fcSeed } from '../../helpers/device-harness.js';
import type { CaseOutcome, CaseRequest } from './classify.js';
import { fuzzCase, seedNetlists } from './mutate.js';
import { runCases } from './pool.js';
import { pendingCases } from './pending.js';

const seed = fcSeed('core/fuzz/netlist-fuzz.test.ts');
const env = (name: string, fallback: number): number => {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v > 0 ? v : fallback;
};
const CASES = env('FUZZ_CASES', 300);
// Past 60 s a case is a hang: a run that exhausts its budgets (a .tran at MAX_TRAN_STEPS, about ten seconds; the figures at
// MAX_BENCH_STEPS, about twenty) ends well before, even on a loaded two-core machine.
const CASE_MS = env('FUZZ_CASE_MS', 60_000);
const WORKERS = env('FUZZ_WORKERS', 1);
// The extreme inputs (femtosecond times, huge magnitudes) and the reproducers of pending.ts are in by default; FUZZ_PENDING=0 holds them back.
const PENDING = process.env['FUZZ_PENDING'] !== '0';

describe('netlist fuzzing', () => {
  test('the seed netlists are there to mutate', () => {
    const seeds = seedNetlists();
    // Six examples and the netlists written out in the tests.
    expect(seeds.length).toBeGreaterThan(20);
  });

  test(`${CASES} hostile netlists: no crash, hang or non-finite number`, async () => {
    const seeds = seedNetlists();
    const cases: CaseRequest[] = fc.sample(fuzzCase(seeds, PENDING), { seed, numRuns: CASES }).map((c, k) => ({ ...c, viaCommand: k % 4 === 0 }));
    const outcomes = await runCases(cases, { oldMb: 256, youngMb: 32, caseMs: CASE_MS, workers: WORKERS });
    const count = (kind: CaseOutcome['kind']): number => outcomes.filter((o) => o.kind === kind).length;
    const unlocatedDetails = [...new Set(outcomes.flatMap((o) => (o.kind === 'clean-error' && o.unlocated ? [o.detail] : [])))];
    const unlocated = outcomes.filter((o) => o.kind === 'clean-error' && o.unlocated).length;
    console.log(
      `[fuzz] seed ${seed}${PENDING ? ' (pending inputs in)' : ''}: ${CASES} cases, ${count('ok')} clean results, ${count('clean-error')} clean errors (${unlocated} with an unlocated diagnostic), ` +
        `${count('crash')} crashes, ${count('hang')} hangs, ${count('non-finite')} non-finite${unlocatedDetails.length ? `; ${unlocatedDetails.join('; ')}` : ''}`,
    );
    const bad = outcomes.map((o, k) => ({ o, k })).filter(({ o }) => o.kind === 'crash' || o.kind === 'hang' || o.kind === 'non-finite');
    let where = '';
    if (bad.length > 0) {
      const dir = mkdtempSync(join(tmpdir(), 'railcheck-fuzz-failures-'));
      for (const { o, k } of bad) {
        writeFileSync(join(dir, `case${k}.cir`), cases[k]!.text, 'latin1');
        writeFileSync(join(dir, `case${k}.lib`), cases[k]!.lib, 'latin1');
        writeFileSync(join(dir, `case${k}.txt`), `${o.kind}: ${o.detail}\nflags: ${cases[k]!.flags.join(' ')}\n`);
      }
      where = ` (cases written to ${dir})`;
    }
    expect(bad.map(({ o, k }) => `case ${k}: ${o.kind}: ${o.detail.split('\n')[0]}`), `failures${where}`).toEqual([]);
    // The vitest budget covers every case running to its own budget; a healthy CI-size run takes about 15 s.
  }, 60_000 + (CASES * CASE_MS) / WORKERS);

  // The reproducers the fuzzer once found crashing or hanging (pending.ts).
  test.skipIf(!PENDING)('the pending reproducers end cleanly', async () => {
    const pending = pendingCases();
    const outcomes = await runCases(pending.map((p) => ({ text: p.text, lib: '', flags: [], viaCommand: false })), { oldMb: 256, youngMb: 32, caseMs: CASE_MS, workers: WORKERS });
    const lines = outcomes.map((o, k) => `${o.kind.padEnd(11)} [${pending[k]!.waitsFor}] ${pending[k]!.what}${o.detail ? `: ${o.detail.split('\n')[0]}` : ''}`);
    console.log(`[fuzz] pending reproducers:\n${lines.join('\n')}`);
    expect(lines.filter((_, k) => !['ok', 'clean-error'].includes(outcomes[k]!.kind))).toEqual([]);
  }, 60_000 + (pendingCases().length * CASE_MS) / WORKERS);
});
